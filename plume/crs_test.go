package plume

import (
	"math"
	"testing"
)

// A site frame in UTM 17N (EPSG:32617): receptors given by WGS 84
// longitude/latitude are projected into it (PROJ through internal/crs,
// itself checked against cs2cs to 1 mm), and screen as the same receptors
// given by their projected x, y; bad CRS input names the field.
func TestCRSReceptorsByLonLat(t *testing.T) {
	sc := demoScenario()
	sc.CRS = "EPSG:32617"
	sc.Source.X, sc.Source.Y = f(512000), f(4181000)
	sc.Receptors = []Receptor{{ID: "W", X: f(512210), Y: f(4181006), Z: f(2)}}
	byXY := screenOK(t, sc)
	fr, err := siteCRS(sc)
	if err != nil {
		t.Fatal(err)
	}
	lon, lat, err := fr.ToLonLat(512210, 4181006)
	if err != nil {
		t.Fatal(err)
	}
	sc.Receptors = []Receptor{{ID: "W", Lon: f(lon), Lat: f(lat), Z: f(2)}}
	byLL := screenOK(t, sc)
	a, b := byXY.Receptors[0], byLL.Receptors[0]
	if math.Abs(a.X-b.X) > 1e-3 || math.Abs(a.Y-b.Y) > 1e-3 || math.Abs(*a.SteadyState.Exact-*b.SteadyState.Exact) > 1e-9**a.SteadyState.Exact {
		t.Errorf("lon/lat receptor at (%g, %g) value %g; by x, y (%g, %g) value %g", b.X, b.Y, *b.SteadyState.Exact, a.X, a.Y, *a.SteadyState.Exact)
	}
	if byLL.CRS != "EPSG:32617" || byLL.Engine.InputSHA256 == byXY.Engine.InputSHA256 {
		t.Errorf("crs %q; input hashes must differ (the request differs)", byLL.CRS)
	}
	for _, tc := range []struct {
		name  string
		edit  func(*Scenario)
		field string
	}{
		{"unknown code", func(s *Scenario) { s.CRS = "EPSG:999999" }, "crs"},
		{"geographic", func(s *Scenario) { s.CRS = "EPSG:4326" }, "crs"},
		{"malformed", func(s *Scenario) { s.CRS = "UTM 17" }, "crs"},
		{"feet for a metre grid", func(s *Scenario) { s.Units.Length = "ft" }, "units.length"},
		{"latitude out of range", func(s *Scenario) { s.Receptors[0].Lat = f(95) }, "receptors[0].lat"},
		{"lon/lat without crs", func(s *Scenario) { s.CRS = "" }, "receptors[0].lon"},
		{"both x and lon", func(s *Scenario) { s.Receptors[0].X = f(1) }, "receptors[0].x"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := sc
			s.Receptors = append([]Receptor(nil), sc.Receptors...)
			tc.edit(&s)
			found := false
			for _, e := range FieldsOf(Validate(s)) {
				found = found || e.Field == tc.field
			}
			if !found {
				t.Errorf("%v does not name %s", Validate(s), tc.field)
			}
		})
	}
}

// A CRS whose scale distorts distance by more than 0.1 % at the source is
// noted: UTM 17N at the edge of its zone (easting 780 km, about 1.0006) does
// not, Web Mercator at 45 degrees north (about 1.41) does.
func TestCRSScaleCaveat(t *testing.T) {
	sc := demoScenario()
	sc.Receptors = []Receptor{{ID: "W", X: f(210), Y: f(6), Z: f(2)}}
	for _, tc := range []struct {
		code   string
		x, y   float64
		caveat bool
	}{
		{"EPSG:32617", 500000, 4181000, false},
		{"EPSG:3857", -8000000, 5621521, true},
	} {
		s := sc
		s.CRS = tc.code
		s.Source.X, s.Source.Y = f(tc.x), f(tc.y)
		s.Receptors = []Receptor{{ID: "W", X: f(tc.x + 210), Y: f(tc.y + 6), Z: f(2)}}
		got := false
		for _, c := range screenOK(t, s).Caveats {
			got = got || c.Code == CaveatCRSScale
		}
		if got != tc.caveat {
			t.Errorf("%s: scale caveat %v, want %v", tc.code, got, tc.caveat)
		}
	}
}
