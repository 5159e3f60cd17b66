//go:build cgo

package crs

import (
	"math"
	"testing"
)

// Scale checks from the definitions of the projections (EPSG Guidance
// Note 7-2, IOGP 373-7-2) rather than from a second program.
func TestScaleDefinitions(t *testing.T) {
	// Transverse Mercator: the scale on the central meridian is k0, 0.9996
	// for every UTM zone (EPSG dataset, UTM zone 17N, "Scale factor at
	// natural origin").
	utm := mustOpen(t, "EPSG:32617")
	for _, y := range []float64{100000, 2e6, 4181000, 8e6} {
		expectConformal(t, utm, 500000, y, 0.9996, 1e-9)
	}
	// Lambert Conic Conformal (2SP): the scale is 1 on both standard
	// parallels. EPSG:2272: 39 56' N and 40 58' N; EPSG:32040 (the EPSG 7-2
	// example CRS): 28 23' N and 30 17' N.
	parallels := []struct {
		code string
		lon  float64
		lats []float64
	}{
		{"EPSG:2272", -77.0, []float64{39 + 56.0/60, 40 + 58.0/60}},
		{"EPSG:32040", -97.5, []float64{28 + 23.0/60, 30 + 17.0/60}},
	}
	for _, p := range parallels {
		f := mustOpen(t, p.code)
		for _, lat := range p.lats {
			x, y, err := f.FromGeodetic(p.lon, lat)
			if err != nil {
				t.Fatal(err)
			}
			expectConformal(t, f, x, y, 1, 1e-9)
		}
	}
}

// expectConformal checks that all four scales at (x, y) equal want.
func expectConformal(t *testing.T, f *Frame, x, y, want, tol float64) {
	t.Helper()
	s, err := f.ScaleAt(x, y)
	if err != nil {
		t.Fatalf("%s ScaleAt(%g, %g): %v", f.Code(), x, y, err)
	}
	for _, v := range []float64{s.Meridional, s.Parallel, s.Max, s.Min} {
		if math.Abs(v-want) > tol {
			t.Errorf("%s ScaleAt(%g, %g) = %+v; want all scales %.10g", f.Code(), x, y, s, want)
			return
		}
	}
}

// Popular Visualisation Pseudo Mercator (EPSG:3857; EPSG 7-2 method 1024)
// is not conformal on the ellipsoid: E = FE + a(lon - lon0) and N = FN +
// a ln tan(pi/4 + lat/2), so the parallel scale is a/(nu cos lat) and the
// meridional scale a/(rho cos lat), with nu and rho the ellipsoid's radii of
// curvature in the prime vertical and the meridian (EPSG 7-2 notation). It
// distorts distance far beyond the caveat threshold.
func TestScaleNonConformal(t *testing.T) {
	f := mustOpen(t, "EPSG:3857")
	const a, invF = 6378137.0, 298.257223563 // WGS 84 (EPSG:7030)
	e2 := (2 - 1/invF) / invF
	for _, lat := range []float64{0.5, 40, 60, 80} {
		x, y, err := f.FromGeodetic(-81, lat)
		if err != nil {
			t.Fatal(err)
		}
		s, err := f.ScaleAt(x, y)
		if err != nil {
			t.Fatal(err)
		}
		phi := lat * math.Pi / 180
		w := 1 - e2*math.Sin(phi)*math.Sin(phi)
		nu, rho := a/math.Sqrt(w), a*(1-e2)/math.Pow(w, 1.5)
		k, h := a/(nu*math.Cos(phi)), a/(rho*math.Cos(phi))
		if math.Abs(s.Parallel/k-1) > 1e-9 || math.Abs(s.Meridional/h-1) > 1e-9 ||
			math.Abs(s.Max/h-1) > 1e-9 || math.Abs(s.Min/k-1) > 1e-9 || math.Abs(s.Convergence) > 1e-7 {
			t.Errorf("EPSG:3857 at %g N: %+v; want h %.10f, k %.10f, convergence 0", lat, s, h, k)
		}
		if lat >= 40 && s.Distortion() < 0.3 {
			t.Errorf("EPSG:3857 at %g N: distortion %g, want > 0.3", lat, s.Distortion())
		}
	}
}

// The caveat threshold: UTM distorts distance by less than 0.1 % near its
// central meridian (0.04 % there, k0 = 0.9996) and by more far outside its
// 6-degree zone; the convergence is positive east of the central meridian
// in the northern hemisphere and negative in the southern (grid north
// turns towards the pole's meridian).
func TestDistortionCaveat(t *testing.T) {
	north, south := mustOpen(t, "EPSG:32617"), mustOpen(t, "EPSG:32717")
	cases := []struct {
		f         *Frame
		x, y      float64
		over      bool
		convergeS float64 // sign of the convergence
	}{
		{north, 500000, 4181000, false, 0},
		{north, 700000, 4181000, false, 1},
		{north, 300000, 4181000, false, -1},
		{north, 900000, 4181000, true, 1},
		{north, 100000, 4181000, true, -1},
		{south, 700000, 6000000, false, -1},
		{south, 950000, 6000000, true, -1},
	}
	for _, c := range cases {
		s, err := c.f.ScaleAt(c.x, c.y)
		if err != nil {
			t.Fatal(err)
		}
		if over := s.Distortion() > DistortionCaveat; over != c.over {
			t.Errorf("%s ScaleAt(%g, %g): distortion %.5f%%, over the caveat %v; want %v", c.f.Code(), c.x, c.y,
				100*s.Distortion(), over, c.over)
		}
		if c.convergeS*s.Convergence < 0 || (c.convergeS == 0) != (math.Abs(s.Convergence) < 1e-9) {
			t.Errorf("%s ScaleAt(%g, %g): convergence %g, want sign %g", c.f.Code(), c.x, c.y, s.Convergence, c.convergeS)
		}
	}
}

// Site coordinates taken to longitude/latitude and back, and the reverse,
// come back to within 1 mm, through the projection alone (the geodetic
// CRS) and through the datum shift to WGS 84. One exception: the reverse
// of a Helmert transformation (OSGB36 to WGS 84 (6), EPSG:27700) is by
// EPSG's definition the forward one with its parameters negated, which is
// not an exact inverse, so that round trip may miss by a few mm (cs2cs
// agrees with each direction, TestCs2csReference).
func TestRoundTrip(t *testing.T) {
	cases := []struct {
		code     string
		wgs84Tol float64 // metres
	}{
		{"EPSG:32617", 0.001}, {"EPSG:2272", 0.001}, {"EPSG:2222", 0.001}, {"EPSG:2193", 0.001},
		{"EPSG:32040", 0.001}, {"EPSG:27700", 0.005},
	}
	for _, c := range cases {
		f := mustOpen(t, c.code)
		geodetic := roundTripWorst(t, f, f.FromGeodetic, f.ToGeodetic)
		wgs84 := roundTripWorst(t, f, f.FromLonLat, f.ToLonLat)
		if geodetic > 0.001 || wgs84 > c.wgs84Tol {
			t.Errorf("%s: round trips miss by %.3g m (projection), %.3g m (to WGS 84)", c.code, geodetic, wgs84)
		}
		t.Logf("%s: round trips within %.2g m (projection), %.2g m (to WGS 84)", c.code, geodetic, wgs84)
	}
}

type convert func(a, b float64) (float64, float64, error)

// roundTripWorst returns the largest miss, in metres, of (lon, lat) ->
// site -> (lon, lat) and of site -> (lon, lat) -> site over a 5 x 5 grid
// of the CRS's area of use.
func roundTripWorst(t *testing.T, f *Frame, from, to convert) float64 {
	t.Helper()
	a := f.Area()
	worst := 0.0
	for i := range 5 {
		for j := range 5 {
			lon := a.West + (a.East-a.West)*(0.1+0.2*float64(i))
			lat := a.South + (a.North-a.South)*(0.1+0.2*float64(j))
			x, y, err1 := from(lon, lat)
			lon2, lat2, err2 := to(x, y)
			x2, y2, err3 := from(lon2, lat2)
			if err1 != nil || err2 != nil || err3 != nil {
				t.Fatalf("%s round trip at (%g, %g): %v %v %v", f.Code(), lon, lat, err1, err2, err3)
			}
			d := math.Max(lonLatMetres(lon, lat, lon2, lat2), math.Hypot(x2-x, y2-y)*f.Unit().ToMetres)
			worst = math.Max(worst, d)
		}
	}
	return worst
}

func mustOpen(t testing.TB, code string) *Frame {
	t.Helper()
	f, err := Open(code)
	if err != nil {
		t.Fatalf("Open(%s): %v", code, err)
	}
	return f
}
