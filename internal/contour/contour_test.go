package contour

import (
	"math"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// fieldGrid samples f on a regular grid.
func fieldGrid(x0, y0, x1, y1 float64, nx, ny int, f func(x, y float64) float64) *Grid {
	g := &Grid{X0: x0, Y0: y0, NX: nx, NY: ny, DX: (x1 - x0) / float64(nx-1), DY: (y1 - y0) / float64(ny-1)}
	g.Values = make([]float64, nx*ny)
	for j := range ny {
		for i := range nx {
			g.Values[j*nx+i] = f(g.X(i), g.Y(j))
		}
	}
	return g
}

// checkRings checks that every ring is closed, outer rings counter-clockwise
// and holes clockwise (RFC 7946 section 3.1.6).
func checkRings(t *testing.T, mp orb.MultiPolygon) {
	t.Helper()
	for pi, poly := range mp {
		for ri, r := range poly {
			if len(r) < 4 || r[0] != r[len(r)-1] {
				t.Errorf("polygon %d ring %d not closed (%d points)", pi, ri, len(r))
			}
			want := orb.CCW
			if ri > 0 {
				want = orb.CW
			}
			if got := r.Orientation(); got != want {
				t.Errorf("polygon %d ring %d orientation %v, want %v", pi, ri, got, want)
			}
		}
	}
}

// The level set {exp(-r^2/(2 s^2)) = L} is the circle r0 = s sqrt(2 ln(1/L))
// (mathematics identity), of area pi r0^2. The outline's vertices lie on
// it and its area matches within an error that shrinks with the spacing.
func TestContourRadialGaussianCircle(t *testing.T) {
	const s, level = 10.0, 0.05
	r0 := s * math.Sqrt(2*math.Log(1/level))
	gauss := func(x, y float64) float64 { return math.Exp(-(x*x + y*y) / (2 * s * s)) }
	cases := []struct {
		n               int
		maxRadial, area float64 // tolerances: metres, relative
	}{
		{21, 0.4, 0.015},
		{41, 0.12, 0.004},
		{81, 0.04, 0.0012},
		{161, 0.01, 0.0003},
	}
	prevErr := math.Inf(1)
	for _, tc := range cases {
		g := fieldGrid(-40, -40, 40, 40, tc.n, tc.n, gauss)
		mp := Contour(g, level)
		if len(mp) != 1 || len(mp[0]) != 1 {
			t.Fatalf("n=%d: %d polygons, want one without holes", tc.n, len(mp))
		}
		checkRings(t, mp)
		maxErr := 0.0
		for _, p := range mp[0][0] {
			maxErr = math.Max(maxErr, math.Abs(math.Hypot(p[0], p[1])-r0))
		}
		relArea := math.Abs(planar.Area(mp)-math.Pi*r0*r0) / (math.Pi * r0 * r0)
		t.Logf("n=%d spacing %.3g m: radial error %.3g m, relative area error %.3g", tc.n, g.DX, maxErr, relArea)
		if maxErr > tc.maxRadial || relArea > tc.area {
			t.Errorf("n=%d (spacing %.3g): radial error %.3g m (tol %g), area error %.3g (tol %g)", tc.n, g.DX, maxErr, tc.maxRadial, relArea, tc.area)
		}
		if maxErr >= prevErr {
			t.Errorf("n=%d: radial error %.3g did not shrink from %.3g", tc.n, maxErr, prevErr)
		}
		prevErr = maxErr
		// Length: the circumference 2 pi r0 (orb/planar.Length of the ring).
		if l := planar.Length(mp[0][0]); math.Abs(l-2*math.Pi*r0)/(2*math.Pi*r0) > 4*tc.area {
			t.Errorf("n=%d: perimeter %.4g, want %.4g", tc.n, l, 2*math.Pi*r0)
		}
	}
}

// A Gaussian centred on the grid's corner: the region reaches two edges and
// is closed along them; it is the quarter disc of area pi r0^2 / 4.
func TestContourTouchingEdge(t *testing.T) {
	const s, level = 10.0, 0.05
	r0 := s * math.Sqrt(2*math.Log(1/level))
	g := fieldGrid(0, 0, 40, 40, 161, 161, func(x, y float64) float64 { return math.Exp(-(x*x + y*y) / (2 * s * s)) })
	mp := Contour(g, level)
	if len(mp) != 1 || len(mp[0]) != 1 {
		t.Fatalf("%d polygons, want one", len(mp))
	}
	checkRings(t, mp)
	want := math.Pi * r0 * r0 / 4
	if a := planar.Area(mp); math.Abs(a-want)/want > 5e-4 {
		t.Errorf("area %.6g, want %.6g", a, want)
	}
	// The corner (0, 0) is a vertex and the run along each edge is one segment.
	ring := mp[0][0]
	corner := false
	for _, p := range ring {
		if p == (orb.Point{0, 0}) {
			corner = true
		}
	}
	if !corner || len(ring) > 200 {
		t.Errorf("corner vertex %v, %d points", corner, len(ring))
	}
	// A field above the level everywhere gives the grid rectangle itself.
	all := Contour(fieldGrid(0, 0, 10, 5, 11, 6, func(x, y float64) float64 { return 1 }), 0.5)
	if len(all) != 1 || len(all[0][0]) != 5 || planar.Area(all) != 50 {
		t.Errorf("whole grid: %v", all)
	}
	checkRings(t, all)
	// Below everywhere: nothing.
	if none := Contour(fieldGrid(0, 0, 10, 5, 11, 6, func(x, y float64) float64 { return 0 }), 0.5); len(none) != 0 {
		t.Errorf("empty field gave %v", none)
	}
}

// An annulus field exp(-(r-ra)^2/(2 w^2)) is above L between
// ra -/+ w sqrt(2 ln(1/L)): one polygon with one clockwise hole, area
// pi((ra+d)^2 - (ra-d)^2) (mathematics identity).
func TestContourHole(t *testing.T) {
	const ra, w, level = 20.0, 3.0, 0.1
	d := w * math.Sqrt(2*math.Log(1/level))
	g := fieldGrid(-40, -40, 40, 40, 241, 241, func(x, y float64) float64 {
		r := math.Hypot(x, y) - ra
		return math.Exp(-r * r / (2 * w * w))
	})
	mp := Contour(g, level)
	if len(mp) != 1 || len(mp[0]) != 2 {
		t.Fatalf("got %d polygons (first with %d rings), want one with a hole", len(mp), len(mp[0]))
	}
	checkRings(t, mp)
	want := math.Pi * (math.Pow(ra+d, 2) - math.Pow(ra-d, 2))
	if a := planar.Area(mp); math.Abs(a-want)/want > 2e-3 {
		t.Errorf("annulus area %.6g, want %.6g", a, want)
	}
	for _, p := range mp[0][1] {
		if e := math.Abs(math.Hypot(p[0], p[1]) - (ra - d)); e > 0.05 {
			t.Fatalf("hole vertex off the inner circle by %.3g", e)
		}
	}
	// Two separate bumps give two polygons; an island inside a hole is a
	// polygon of its own.
	bumps := Contour(fieldGrid(-40, -40, 40, 40, 81, 81, func(x, y float64) float64 {
		return math.Exp(-((x-20)*(x-20)+y*y)/20) + math.Exp(-((x+20)*(x+20)+y*y)/20)
	}), 0.5)
	if len(bumps) != 2 {
		t.Errorf("two bumps gave %d polygons", len(bumps))
	}
	checkRings(t, bumps)
	island := Contour(fieldGrid(-40, -40, 40, 40, 161, 161, func(x, y float64) float64 {
		r := math.Hypot(x, y)
		return math.Exp(-math.Pow(r-20, 2)/18) + math.Exp(-r*r/8)
	}), 0.1)
	if len(island) != 2 || len(island[0]) != 2 || len(island[1]) != 1 {
		t.Errorf("ring with an island: %d polygons", len(island))
	}
	checkRings(t, island)
}

// Saddle disambiguation on one cell [[1, 0], [0, 1]] (corners on the
// diagonal high): the centre value 0.5 joins the high corners for a level
// at or below it and separates them above it.
func TestContourSaddle(t *testing.T) {
	g := &Grid{DX: 1, DY: 1, NX: 2, NY: 2, Values: []float64{1, 0, 0, 1}}
	cases := []struct {
		level float64
		polys int
	}{
		{0.4, 1}, {0.5, 1}, {0.6, 2},
	}
	for _, tc := range cases {
		mp := Contour(g, tc.level)
		if len(mp) != tc.polys {
			t.Errorf("level %g: %d polygons, want %d", tc.level, len(mp), tc.polys)
		}
		checkRings(t, mp)
		// Area: the region of the piecewise-linear edges; each high corner
		// keeps a triangle of legs (1-level) (exact for the separated case).
		if tc.polys == 2 {
			want := 2 * 0.5 * (1 - tc.level) * (1 - tc.level)
			if a := planar.Area(mp); math.Abs(a-want) > 1e-12 {
				t.Errorf("level %g: area %g, want %g", tc.level, a, want)
			}
		}
	}
}
