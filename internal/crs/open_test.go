//go:build cgo

package crs

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The unit factors are the EPSG dataset's: metre 1 (EPSG:9001), foot
// 0.3048 exactly (EPSG:9002, international foot), US survey foot
// 1200/3937 (EPSG:9003).
func TestOpenProjected(t *testing.T) {
	cases := []struct {
		code, name, geodetic, unit, unitCode string
		toMetres                             float64
	}{
		{"EPSG:32617", "WGS 84 / UTM zone 17N", "WGS 84", "metre", "EPSG:9001", 1},
		{"epsg:2272", "NAD83 / Pennsylvania South (ftUS)", "NAD83", "US survey foot", "EPSG:9003", 1200.0 / 3937},
		{"EPSG:2222", "NAD83 / Arizona East (ft)", "NAD83", "foot", "EPSG:9002", 0.3048},
		{"EPSG:27700", "OSGB36 / British National Grid", "OSGB36", "metre", "EPSG:9001", 1},
		{"EPSG:2193", "NZGD2000 / New Zealand Transverse Mercator 2000", "NZGD2000", "metre", "EPSG:9001", 1},
	}
	for _, c := range cases {
		f, err := Open(c.code)
		if err != nil {
			t.Errorf("Open(%q): %v", c.code, err)
			continue
		}
		u := f.Unit()
		if f.Code() != strings.ToUpper(c.code) || f.Name() != c.name || f.GeodeticCRS() != c.geodetic ||
			u.Name != c.unit || u.Code != c.unitCode || math.Abs(u.ToMetres-c.toMetres) > 1e-15 {
			t.Errorf("Open(%q) = %s %q on %q, unit %+v; want %q on %q, %s %s %.17g", c.code, f.Code(), f.Name(),
				f.GeodeticCRS(), u, c.name, c.geodetic, c.unit, c.unitCode, c.toMetres)
		}
		if a := f.Area(); !(a.West < a.East) || !(a.South < a.North) || a.Name == "" {
			t.Errorf("Open(%q) area of use %+v", c.code, a)
		}
	}
	a, _ := Open("EPSG:32617")
	b, _ := Open("epsg:32617")
	if a != b {
		t.Error("Open returns a new Frame for a code already open")
	}
}

func TestOpenRefuses(t *testing.T) {
	cases := []struct {
		code string
		kind error
		says []string // the message names these
	}{
		{"EPSG:99999", ErrUnknownCode, []string{"EPSG:99999", "not a coordinate reference system"}},
		{"EPSG:1", ErrUnknownCode, []string{"EPSG:1"}},
		{"EPSG:9807", ErrUnknownCode, []string{"EPSG:9807"}}, // a method code, not a CRS
		{"EPSG:4326", ErrNotProjected, []string{"EPSG:4326", "WGS 84", "geographic", "degrees", "projected", "EPSG:32617"}},
		{"EPSG:4269", ErrNotProjected, []string{"NAD83", "geographic"}},
		{"EPSG:4979", ErrNotProjected, []string{"geographic 3D"}},
		{"EPSG:4978", ErrNotProjected, []string{"geocentric"}},
		{"EPSG:5703", ErrNotProjected, []string{"vertical"}},
		{"EPSG:7405", ErrNotProjected, []string{"compound", "EPSG:27700"}},
		{"EPSG:2053", ErrUnsupportedAxes, []string{"west", "south", "easting and a northing"}},
		{"EPSG:3031", ErrUnsupportedAxes, []string{"EPSG:3031", "Polar"}},
		{"UTM 17N", ErrMalformedCode, []string{"UTM 17N", "EPSG:32617"}},
		{"EPSG:4326.5", ErrMalformedCode, []string{"whole number"}},
	}
	for _, c := range cases {
		f, err := Open(c.code)
		var e *Error
		if f != nil || !errors.Is(err, c.kind) || !errors.As(err, &e) || e.Code != c.code {
			t.Errorf("Open(%q) = %v, %v; want a *Error of kind %v with Code %q", c.code, f, err, c.kind, c.code)
			continue
		}
		for _, s := range c.says {
			if !strings.Contains(err.Error(), s) {
				t.Errorf("Open(%q) message %q does not say %q", c.code, err, s)
			}
		}
	}
}

func TestPointErrors(t *testing.T) {
	f, err := Open("EPSG:32617")
	if err != nil {
		t.Fatal(err)
	}
	inf, nan := math.Inf(1), math.NaN()
	lonlat := []struct {
		lon, lat float64
		kind     error
		says     string
	}{
		{-181, 40, ErrOutOfRange, "longitude -181"},
		{180.5, 40, ErrOutOfRange, "longitude 180.5"},
		{-81, 90.01, ErrOutOfRange, "latitude 90.01"},
		{-81, -91, ErrOutOfRange, "latitude -91"},
		{nan, 40, ErrNotFinite, "not finite"},
		{-81, inf, ErrNotFinite, "not finite"},
	}
	for _, c := range lonlat {
		for name, fn := range map[string]func(float64, float64) (float64, float64, error){
			"FromLonLat": f.FromLonLat, "FromGeodetic": f.FromGeodetic} {
			x, y, err := fn(c.lon, c.lat)
			if !errors.Is(err, c.kind) || !strings.Contains(err.Error(), c.says) || x != 0 || y != 0 {
				t.Errorf("%s(%g, %g) = %g, %g, %v; want %v saying %q", name, c.lon, c.lat, x, y, err, c.kind, c.says)
			}
		}
	}
	site := []struct {
		x, y float64
		kind error
	}{
		{nan, 4e6, ErrNotFinite}, {5e5, -inf, ErrNotFinite},
		{1e9, 4e6, ErrOutsideProjection}, {5e5, 1e12, ErrOutsideProjection}, {-1e300, 1e300, ErrOutsideProjection},
	}
	for _, c := range site {
		lon, lat, err := f.ToLonLat(c.x, c.y)
		if !errors.Is(err, c.kind) || lon != 0 || lat != 0 {
			t.Errorf("ToLonLat(%g, %g) = %g, %g, %v; want %v", c.x, c.y, lon, lat, err, c.kind)
		}
		if _, err := f.ScaleAt(c.x, c.y); !errors.Is(err, c.kind) {
			t.Errorf("ScaleAt(%g, %g): %v; want %v", c.x, c.y, err, c.kind)
		}
		if _, err := f.Operation(c.x, c.y); !errors.Is(err, c.kind) {
			t.Errorf("Operation(%g, %g): %v; want %v", c.x, c.y, err, c.kind)
		}
	}
}

// The operation to WGS 84 and its accuracy are the EPSG dataset's, as
// PROJ's projinfo lists them (Debian proj-bin 9.1.1, network off,
// --spatial-test intersects, the criterion of proj_create_crs_to_crs and
// cs2cs): no datum shift for WGS 84 itself, "NAD83 to WGS 84 (1)" of 4 m
// for NAD83, the Helmert "OSGB36 to WGS 84 (6)" of 2 m for OSGB36 (the
// OSTN15 grid is not in Debian's proj-data). EPSG:32040 (NAD27) has a
// candidate of 7 m.
func TestOperation(t *testing.T) {
	cases := []struct {
		code     string
		x, y     float64
		name     string
		accuracy float64
		ballpark bool
	}{
		{"EPSG:32617", 512000, 4181000, "UTM zone 17N", 0, false},
		{"EPSG:2272", 2500000, 250000, "NAD83 to WGS 84 (1)", 4, false},
		{"EPSG:27700", 400000, 300000, "OSGB36 to WGS 84 (6)", 2, false},
		{"EPSG:32040", 2963503.91, 254759.80, "NAD27 to WGS 84", 7, false},
	}
	for _, c := range cases {
		f, err := Open(c.code)
		if err != nil {
			t.Fatal(err)
		}
		op, err := f.Operation(c.x, c.y)
		if err != nil || !strings.Contains(op.Name, c.name) || op.Accuracy != c.accuracy || op.Ballpark != c.ballpark {
			t.Errorf("%s Operation = %+v, %v; want %q, accuracy %g, ballpark %v", c.code, op, err, c.name, c.accuracy, c.ballpark)
		}
	}
}
