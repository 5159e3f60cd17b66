package plume

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"testing"
)

// chainRef is one case of testdata/reference/chain_reference.json (written
// by testdata/reference/gen_chain.py with mpmath: the coupled equations
// solved in the Laplace domain with matrix functions and inverted by
// Talbot's method at 34 digits, cross-checked by de Hoog's method). The
// chains there are test data.
type chainRef struct {
	Name      string    `json:"name"`
	V         float64   `json:"v"`
	D         float64   `json:"D"`
	X         float64   `json:"x"`
	Y         float64   `json:"y"`
	Top       float64   `json:"top"`
	Bottom    float64   `json:"bottom"`
	Width     float64   `json:"width"`
	Depth     float64   `json:"depth"`
	Dy        float64   `json:"Dy"`
	Dz        float64   `json:"Dz"`
	C0        []float64 `json:"c0"`
	Inlet     string    `json:"inlet"`
	Depletion float64   `json:"depletion"`
	Duration  float64   `json:"duration"`
	Chain     []struct {
		HalfLife   float64 `json:"half_life"`
		R          float64 `json:"R"`
		Convention string  `json:"convention"`
		Daughter   int     `json:"daughter"`
		Yield      float64 `json:"yield"`
	} `json:"chain"`
	Rows []struct {
		Time   any      `json:"time"`
		Values []string `json:"values"`
	} `json:"rows"`
}

// scenario is the case as a screening request (m, d, mg/L): seepage
// velocity v, dispersivities D/v (no diffusion), a 1D column or the 3D
// source, compounds named "K1".."K4" with their yields given, one receptor
// on the case's point, and the case's finite times.
func (rc *chainRef) scenario() (Scenario, []float64) {
	v := rc.V
	sc := Scenario{
		Aquifer: Aquifer{SeepageVelocity: f(v), Dispersivity: &Dispersivity{Longitudinal: f(rc.D / v)}},
		Source:  Source{X: f(0), Y: f(0), FlowAzimuthDeg: f(90)},
		Methods: []string{MethodExact},
	}
	if rc.Width > 0 {
		sc.Source.Width, sc.Source.Depth = f(rc.Width), f(rc.Depth)
		sc.Aquifer.Dispersivity.Transverse, sc.Aquifer.Dispersivity.Vertical = f(rc.Dy/v), f(rc.Dz/v)
	} else if rc.Inlet == "flux" {
		sc.Source.Inlet = InletFlux
	}
	if rc.Depletion > 0 {
		sc.Source.HalfLife = f(math.Ln2 / rc.Depletion)
	}
	if rc.Duration > 0 {
		sc.Source.Duration = f(rc.Duration)
	}
	for i, c := range rc.Chain {
		k := Constituent{Name: fmt.Sprintf("K%d", i+1), SourceConcentration: f(rc.C0[i]), Retardation: f(c.R),
			HalfLife: f(c.HalfLife), DecayAppliesTo: c.Convention}
		if c.Daughter >= 0 {
			k.DecaysTo, k.Yield = fmt.Sprintf("K%d", c.Daughter+1), f(c.Yield)
		}
		sc.Contaminants = append(sc.Contaminants, k)
	}
	// A point receptor (3D: at the case's depth, a point when top = bottom).
	r := Receptor{ID: "P", X: f(rc.X), Y: f(rc.Y), Z: f(rc.Top)}
	if rc.Bottom > rc.Top {
		r.Z, r.ScreenTop, r.ScreenBottom = nil, f(rc.Top), f(rc.Bottom)
	}
	sc.Receptors = []Receptor{r}
	var times []float64
	for _, row := range rc.Rows {
		if t, ok := row.Time.(float64); ok {
			times = append(times, t)
		}
	}
	sc.Times = times
	return sc, times
}

// Every compound's exact value through Screen agrees with the mpmath
// reference for the 1D column (equal and distinct retardation, both
// inlets, repeated rates, a daughter with two parents, source histories)
// and the exact 3D chains (issue 13, external checks).
func TestCompoundsAgainstLaplaceReference(t *testing.T) {
	b, err := os.ReadFile("../testdata/reference/chain_reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Column  []chainRef `json:"column"`
		Exact3D []chainRef `json:"exact3d"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	worst := map[string]float64{}
	for _, rc := range append(ref.Column, ref.Exact3D...) {
		sc, _ := rc.scenario()
		res := screenOK(t, sc)
		floor := res.Derived.ConcentrationFloor
		for i, cr := range res.Receptors[0].Compounds {
			j := 0
			for _, row := range rc.Rows {
				want, _ := strconv.ParseFloat(row.Values[i], 64)
				var got *float64
				if _, finite := row.Time.(float64); finite {
					got = cr.Series[j].Exact
					j++
				} else {
					got = cr.SteadyState.Exact
				}
				if got == nil {
					t.Errorf("%s x=%g %s t=%v: no exact value", rc.Name, rc.X, cr.Name, row.Time)
					continue
				}
				if want < floor {
					continue // reported as 0 below the floor
				}
				rel := math.Abs(*got-want) / want
				worst[rc.Name] = math.Max(worst[rc.Name], rel)
				if rel > 1e-8 {
					t.Errorf("%s x=%g inlet %s %s t=%v: %.15g, reference %.15g (rel %.2g)", rc.Name, rc.X, rc.Inlet, cr.Name, row.Time, *got, want, rel)
				}
			}
		}
	}
	t.Logf("worst relative error by case: %v", worst)
}
