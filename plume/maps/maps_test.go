package maps

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"

	"github.com/paulmach/orb"

	"downgradient/analytic"
	"downgradient/internal/plumetest"
	"downgradient/plume"
)

// demoSiteScenario is the invented demo scenario of testdata/demo.
func demoSiteScenario(t testing.TB) plume.Scenario {
	t.Helper()
	b, err := os.ReadFile("../../testdata/demo/scenario.json")
	if err != nil {
		t.Fatal(err)
	}
	var body struct {
		plume.Scenario
		Description string `json:"description"`
	}
	if err := json.Unmarshal(b, &body); err != nil {
		t.Fatal(err)
	}
	return body.Scenario
}

type plumeLengthCase struct {
	Name            string     `json:"name"`
	SeepageVelocity float64    `json:"seepage_velocity"`
	Retardation     float64    `json:"retardation"`
	Dispersivity    [3]float64 `json:"dispersivity"`
	HalfLife        *float64   `json:"half_life"`
	Width           float64    `json:"width"`
	Depth           float64    `json:"depth"`
	Z               float64    `json:"z"`
	Concentration   float64    `json:"concentration"`
	ScreeningLevel  float64    `json:"screening_level"`
	PlumeLength     float64    `json:"plume_length"`
	SteadyAtHalf    float64    `json:"steady_at_half_length"`
}

func (c plumeLengthCase) scenario() plume.Scenario {
	f := func(v float64) *float64 { return &v }
	return plume.Scenario{
		Aquifer: plume.Aquifer{SeepageVelocity: f(c.SeepageVelocity),
			Dispersivity: &plume.Dispersivity{Longitudinal: f(c.Dispersivity[0]), Transverse: f(c.Dispersivity[1]), Vertical: f(c.Dispersivity[2])}},
		Contaminant: plume.Contaminant{Retardation: f(c.Retardation), HalfLife: c.HalfLife, ScreeningLevel: f(c.ScreeningLevel)},
		Source:      plume.Source{Concentration: f(c.Concentration), Width: f(c.Width), Depth: f(c.Depth)},
		Receptors:   []plume.Receptor{{X: f(100), Y: f(0)}},
		Methods:     []string{plume.MethodExact},
	}
}

// The steady-state plume length to the screening level along the centreline
// against a root found directly: scipy.integrate.quad of the steady-state
// time integral (Wexler 1992, USGS TWRI 3-B7) and scipy.optimize.brentq
// (testdata/reference/gen_plume_length.py -> plume_length.json), and
// against bisection here on analytic.Exact3D values.
func TestSteadyPlumeLength(t *testing.T) {
	b, err := os.ReadFile("../../testdata/reference/plume_length.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []plumeLengthCase `json:"cases"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) < 4 {
		t.Fatalf("%d reference cases", len(ref.Cases))
	}
	for _, c := range ref.Cases {
		t.Run(c.Name, func(t *testing.T) {
			cells := 400
			mp, err := PlumeMap(context.Background(), c.scenario(), MapOptions{Depth: &c.Z, Cells: &cells}, plume.Options{})
			if err != nil {
				t.Fatal(err)
			}
			pl := mp.SteadyPlumeLength
			if pl == nil || pl.Length == nil {
				t.Fatalf("no plume length: %+v", pl)
			}
			// scipy root (reference file).
			if rel := math.Abs(*pl.Length-c.PlumeLength) / c.PlumeLength; rel > 1e-5 {
				t.Errorf("length %.9g, scipy root %.9g (relative %.2g)", *pl.Length, c.PlumeLength, rel)
			}
			// The concentration half-way, scipy quad (checks the integral itself).
			p := analytic.Params{V: c.SeepageVelocity, R: c.Retardation,
				Dx: c.Dispersivity[0] * c.SeepageVelocity, Dy: c.Dispersivity[1] * c.SeepageVelocity, Dz: c.Dispersivity[2] * c.SeepageVelocity}
			if c.HalfLife != nil {
				p.Mu = math.Ln2 / *c.HalfLife
			}
			src := analytic.Source{Width: c.Width, Depth: c.Depth}
			half := c.Concentration * analytic.Exact3D(c.PlumeLength/2, 0, c.Z, math.Inf(1), p, src)
			if rel := math.Abs(half-c.SteadyAtHalf) / c.SteadyAtHalf; rel > 1e-5 {
				t.Errorf("steady value at half length %.9g, scipy %.9g", half, c.SteadyAtHalf)
			}
			// A root found here by plain bisection on analytic.Exact3D.
			g := func(x float64) float64 {
				return c.Concentration*analytic.Exact3D(x, 0, c.Z, math.Inf(1), p, src) - c.ScreeningLevel
			}
			lo, hi := 1.0, 2*c.PlumeLength
			for range 80 {
				mid := (lo + hi) / 2
				if g(mid) > 0 {
					lo = mid
				} else {
					hi = mid
				}
			}
			if rel := math.Abs(*pl.Length-lo) / lo; rel > 1e-7 {
				t.Errorf("length %.9g, bisection %.9g", *pl.Length, lo)
			}
		})
	}
}

// The demo map: a plan view in the site frame whose screening-level
// outline reaches as far as the steady plume length along the centreline
// (within two node spacings), whose outlines nest (a higher level inside a
// lower one), and whose outer rings are counter-clockwise.
func TestPlumeMapDemo(t *testing.T) {
	sc := demoSiteScenario(t)
	mp, err := PlumeMap(context.Background(), sc, MapOptions{}, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	g := mp.Grid
	if g.NX*g.NY > DefaultMapCells || g.NX < 50 || g.NY < 20 {
		t.Errorf("grid %d x %d for a budget of %d", g.NX, g.NY, DefaultMapCells)
	}
	if len(mp.Outlines) != 3 || mp.Levels[0] != 0.005 || mp.Levels[2] != 0.5 {
		t.Fatalf("levels %v", mp.Levels)
	}
	L := *mp.SteadyPlumeLength.Length
	o := mp.Outlines[0]
	if math.Abs(o.Reach-L) > 2*g.DX {
		t.Errorf("outline reach %.4g, plume length %.4g (spacing %.3g)", o.Reach, L, g.DX)
	}
	if !(o.Area > mp.Outlines[1].Area && mp.Outlines[1].Area > mp.Outlines[2].Area && mp.Outlines[2].Area > 0) {
		t.Errorf("areas do not nest: %g %g %g", o.Area, mp.Outlines[1].Area, mp.Outlines[2].Area)
	}
	for _, ol := range mp.Outlines {
		for _, poly := range ol.Geometry {
			if poly[0].Orientation() != orb.CCW {
				t.Errorf("level %g: outer ring not counter-clockwise", ol.Level)
			}
		}
	}
	// The centreline 100 m downgradient, in site coordinates, is inside the
	// screening-level outline; a point 100 m upgradient is not.
	x, y := mp.Frame.ToSite(100, 0)
	if !containsPoint(o.Geometry, orb.Point{x, y}) {
		t.Errorf("centreline point (%g, %g) outside the outline", x, y)
	}
	x, y = mp.Frame.ToSite(-100, 0)
	if containsPoint(o.Geometry, orb.Point{x, y}) {
		t.Errorf("upgradient point inside the outline")
	}
	// Width of the screening-level outline is within the transverse
	// spread of the plume: wider than the source, narrower than its length.
	if !(o.Width > 15 && o.Width < o.Length) {
		t.Errorf("width %g, length %g", o.Width, o.Length)
	}
	// A section along the centreline: depth grows downwards from 0.
	sec, err := PlumeMap(context.Background(), sc, MapOptions{View: ViewSection}, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if sec.Grid.Y0 != 0 || sec.Grid.NX*sec.Grid.NY > DefaultMapCells || len(sec.Outlines[0].Geometry) == 0 {
		t.Errorf("section grid %+v", sec.Grid.NX)
	}
}

func containsPoint(mp orb.MultiPolygon, p orb.Point) bool {
	for _, poly := range mp {
		in := pointInRing(poly[0], p)
		for _, h := range poly[1:] {
			if pointInRing(h, p) {
				in = false
			}
		}
		if in {
			return true
		}
	}
	return false
}

// pointInRing is the even-odd rule.
func pointInRing(r orb.Ring, p orb.Point) bool {
	in := false
	for i, j := 0, len(r)-1; i < len(r); j, i = i, i+1 {
		a, b := r[i], r[j]
		if (a[1] > p[1]) != (b[1] > p[1]) && p[0] < (b[0]-a[0])*(p[1]-a[1])/(b[1]-a[1])+a[0] {
			in = !in
		}
	}
	return in
}

// Bad map options name the field: level not positive, negative time
// (422-class FieldErrors), a grid over the limit (413-class).
func TestPlumeMapBadInput(t *testing.T) {
	sc := demoSiteScenario(t)
	neg := -1.0
	huge := MaxMapCells + 1
	tiny := 0.01
	cases := []struct {
		name  string
		mo    MapOptions
		field string
		over  bool
	}{
		{"zero level", MapOptions{Levels: []float64{0.005, 0}}, "levels[1]", false},
		{"negative level", MapOptions{Levels: []float64{-1}}, "levels[0]", false},
		{"negative time", MapOptions{Time: &MapTime{Value: -5}}, "time", false},
		{"negative depth", MapOptions{Depth: &neg}, "depth", false},
		{"unknown view", MapOptions{View: "oblique"}, "view", false},
		{"too many cells", MapOptions{Cells: &huge}, "cells", true},
		{"spacing too fine", MapOptions{Spacing: &tiny}, "spacing", true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := PlumeMap(context.Background(), sc, tc.mo, plume.Options{})
			if err == nil {
				t.Fatal("no error")
			}
			e, _ := plume.AsError(err)
			var fields plume.FieldErrors
			if e != nil && (e.Kind == plume.KindOverLimit) == tc.over {
				fields = e.Fields
			}
			found := false
			for _, f := range fields {
				found = found || f.Field == tc.field
			}
			if !found {
				t.Errorf("error %v does not name %s", err, tc.field)
			}
		})
	}
	// A scenario error is named by its path in the request body.
	bad := sc
	bad.Receptors = nil
	_, err := PlumeMap(context.Background(), bad, MapOptions{}, plume.Options{})
	if fe := plume.FieldsOf(err); len(fe) == 0 || fe[0].Field != "scenario.receptors" {
		t.Errorf("scenario error %v", err)
	}
}

// BenchmarkPlumeMapDemo: a 200 x 100 plan-view grid of the exact solution
// for the demo scenario, with the three default outlines (issue 6 target:
// under 1 s on the 2-core machine).
func BenchmarkPlumeMapDemo(b *testing.B) {
	sc := demoSiteScenario(b)
	sp := 3.0
	mo := MapOptions{Spacing: &sp, Extent: &Extent{XMin: 1200, XMax: 1797, YMin: 600, YMax: 897}}
	mp, err := PlumeMap(context.Background(), sc, mo, plume.Options{})
	if err != nil {
		b.Fatal(err)
	}
	if mp.Grid.NX != 200 || mp.Grid.NY != 100 {
		b.Fatalf("grid %d x %d", mp.Grid.NX, mp.Grid.NY)
	}
	b.ResetTimer()
	for b.Loop() {
		if _, err := PlumeMap(context.Background(), sc, mo, plume.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// A map of one compound of a chain (issue 13): the invented demo with an
// equal-retardation chain; the daughter's outline at its own level, the
// default levels from that level, and the compound required.
func TestPlumeMapOfACompound(t *testing.T) {
	sc := demoSiteScenario(t)
	sc.Contaminant = plume.Contaminant{}
	sc.Source.Concentration = nil
	sc.Contaminants = []plume.Constituent{
		{Name: "TCE", SourceConcentration: plumetest.F(12), Retardation: plumetest.F(2), HalfLife: plumetest.F(700), DecaysTo: "vinyl chloride"},
		{Name: "vinyl chloride", SourceConcentration: plumetest.F(0), Retardation: plumetest.F(2), HalfLife: plumetest.F(1500), ScreeningLevel: plumetest.F(0.002)},
	}
	mp, err := PlumeMap(context.Background(), sc, MapOptions{Compound: "vinyl chloride"}, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if mp.Levels[0] != 0.002 || len(mp.Outlines[0].Geometry) == 0 {
		t.Errorf("levels %v, first outline %d polygons", mp.Levels, len(mp.Outlines[0].Geometry))
	}
	// No vinyl chloride at the source face: the daughter forms downgradient.
	x, y := mp.Frame.ToSite(0.5, 0)
	if containsPoint(mp.Outlines[2].Geometry, orb.Point{x, y}) {
		t.Errorf("the 100x level outline of a daughter reaches the source face")
	}
	// Its steady plume length (bisection on the closed form beyond where it
	// forms) is where its outline at the level ends (marching squares on
	// the grid): within two grid spacings.
	pl := mp.SteadyPlumeLength
	if pl == nil || pl.Length == nil || math.Abs(*pl.Length-mp.Outlines[0].Reach) > 2*math.Max(mp.Grid.DX, mp.Grid.DY) {
		t.Errorf("steady plume length %+v, outline reach %g (spacing %g)", pl, mp.Outlines[0].Reach, mp.Grid.DX)
	}
	_, err = PlumeMap(context.Background(), sc, MapOptions{}, plume.Options{})
	if fe := plume.FieldsOf(err); len(fe) == 0 || fe[0].Field != "compound" {
		t.Errorf("no compound: err %v, want one naming compound", err)
	}
}
