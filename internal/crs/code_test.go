package crs

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseCode(t *testing.T) {
	good := []struct{ in, canonical string }{
		{"EPSG:32617", "EPSG:32617"},
		{"epsg:2272", "EPSG:2272"},
		{"Epsg:4326", "EPSG:4326"}, // well formed; Open refuses it as geographic
		{"EPSG:999999", "EPSG:999999"},
	}
	for _, c := range good {
		got, _, err := ParseCode(c.in)
		if err != nil || got != c.canonical {
			t.Errorf("ParseCode(%q) = %q, %v; want %q", c.in, got, err, c.canonical)
		}
	}
	bad := []string{
		"", "32617", "EPSG", "EPSG:", "EPSG:0", "EPSG:-32617", "EPSG:+32617", "EPSG:032617",
		"EPSG:32617 ", " EPSG:32617", "EPSG: 32617", "EPSG:32617.0", "EPSG:1e4", "EPSG:1234567",
		"ESRI:102003", "urn:ogc:def:crs:EPSG::32617", "EPSG:32617+5703", "+proj=utm +zone=17",
		"EPSG:３２６１７", "EPSG::32617", "EPSG:32617:1", strings.Repeat("9", 100),
	}
	for _, in := range bad {
		_, _, err := ParseCode(in)
		var e *Error
		if !errors.Is(err, ErrMalformedCode) || !errors.As(err, &e) || e.Code != in {
			t.Errorf("ParseCode(%q) err = %v; want a *Error of kind ErrMalformedCode", in, err)
			continue
		}
		if !strings.Contains(err.Error(), "EPSG:") || len(err.Error()) > 200 {
			t.Errorf("ParseCode(%q) message %q should show the expected form briefly", in, err)
		}
	}
}

func TestAreaContains(t *testing.T) {
	pa := Area{West: -80.53, South: 39.71, East: -74.72, North: 41.18}
	fiji := Area{West: 176, South: -20, East: -178, North: -12} // across the antimeridian
	cases := []struct {
		a        Area
		lon, lat float64
		want     bool
	}{
		{pa, -77, 40, true}, {pa, -81, 40, false}, {pa, -77, 42, false}, {pa, -80.53, 39.71, true},
		{fiji, 179, -17, true}, {fiji, -179, -17, true}, {fiji, 0, -17, false}, {fiji, 179, -25, false},
	}
	for _, c := range cases {
		if got := c.a.Contains(c.lon, c.lat); got != c.want {
			t.Errorf("%+v.Contains(%g, %g) = %v", c.a, c.lon, c.lat, got)
		}
	}
}

func TestSingularValues(t *testing.T) {
	// [3 0; 4 5]: A^T A = [25 20; 20 25], eigenvalues 45 and 5, so the
	// singular values are sqrt(45) and sqrt(5) (hand computation).
	big, small := singularValues(3, 0, 4, 5)
	if math.Abs(big-6.708203932499369) > 1e-14 {
		t.Errorf("largest = %.17g, want sqrt(45)", big)
	}
	if math.Abs(small-2.23606797749979) > 1e-14 {
		t.Errorf("smallest = %.17g, want sqrt(5)", small)
	}
	// A scaled rotation (conformal): both equal the scale, to rounding.
	s, c := 0.9996*0.6, 0.9996*0.8
	big, small = singularValues(c, -s, s, c)
	if math.Abs(big-0.9996) > 4e-16 || math.Abs(small-0.9996) > 4e-16 {
		t.Errorf("scaled rotation: %.17g, %.17g; want 0.9996 twice", big, small)
	}
}

func TestMeanAzimuth(t *testing.T) {
	cases := []struct{ a1, a2, want float64 }{
		{10, 20, 15}, {179, -179, 180}, {-179, 179, 180}, {-1, 1, 0}, {90, 90, 90},
	}
	for _, c := range cases {
		if got := meanAzimuth(c.a1, c.a2); got != c.want {
			t.Errorf("meanAzimuth(%g, %g) = %g, want %g", c.a1, c.a2, got, c.want)
		}
	}
}
