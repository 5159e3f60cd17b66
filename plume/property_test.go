package plume

import (
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"
)

// randomScenario draws a valid scenario spanning the hard cases: Peclet
// numbers up to ~1e6, early and late times, far and upgradient receptors,
// every source kind and unit system.
func randomScenario(r *rand.Rand) Scenario {
	logU := func(lo, hi float64) float64 { return math.Exp(math.Log(lo) + r.Float64()*(math.Log(hi)-math.Log(lo))) }
	maybe := func(p float64) bool { return r.Float64() < p }
	sc := Scenario{
		Aquifer:     Aquifer{EffectivePorosity: f(0.05 + 0.4*r.Float64())},
		Contaminant: Contaminant{ScreeningLevel: f(logU(1e-6, 1))},
		Source: Source{
			X: f(r.NormFloat64() * 100), Y: f(r.NormFloat64() * 100), FlowAzimuthDeg: f(r.Float64() * 360),
		},
		Methods: []string{MethodExact, MethodDomenico},
	}
	if maybe(0.3) {
		sc.Units = Units{Length: "ft", Time: "yr", Concentration: "ug/L"}
	}
	if maybe(0.5) {
		sc.Aquifer.SeepageVelocity = f(logU(1e-5, 50))
	} else {
		sc.Aquifer.HydraulicConductivity = f(logU(1e-3, 500))
		sc.Aquifer.HydraulicGradient = f(logU(1e-5, 0.05))
	}
	if maybe(0.5) {
		sc.Contaminant.Retardation = f(1 + logU(1e-3, 100))
	} else {
		sc.Contaminant.Koc = f(logU(1, 1e4))
		sc.Aquifer.OrganicCarbonFraction = f(logU(1e-5, 0.05))
		sc.Aquifer.BulkDensity = f(1.4 + 0.5*r.Float64())
	}
	if maybe(0.7) {
		sc.Contaminant.HalfLife = f(logU(1, 1e5))
		if maybe(0.5) {
			sc.Contaminant.DecayAppliesTo = DecayDissolved
		}
	}
	if maybe(0.6) {
		aL := logU(1e-3, 100)
		sc.Aquifer.Dispersivity = &Dispersivity{Longitudinal: f(aL), Transverse: f(aL * logU(1e-3, 1)), Vertical: f(aL * logU(1e-4, 0.1))}
	}
	if maybe(0.2) {
		sc.Aquifer.EffectiveDiffusion = f(logU(1e-6, 1e-3))
	}
	switch r.IntN(4) {
	case 0:
		sc.Source.Mass = f(logU(1e-3, 1e4))
		if maybe(0.5) {
			sc.Source.ReleaseDepth = f(10 * r.Float64())
		}
	case 1:
		sc.Source.Concentration = f(logU(1e-3, 1e3))
		if maybe(0.5) {
			sc.Source.Inlet = InletFlux
		}
	default:
		sc.Source.Concentration = f(logU(1e-3, 1e3))
		sc.Source.Width, sc.Source.Depth = f(logU(0.1, 300)), f(logU(0.1, 30))
	}
	if sc.Source.Mass == nil {
		if maybe(0.3) {
			sc.Source.Duration = f(logU(1, 1e4))
		}
		if maybe(0.3) {
			sc.Source.HalfLife = f(logU(1, 1e4))
		}
	}
	if maybe(0.3) {
		sc.Source.Start = f(logU(1, 1000))
	}
	for i := range 1 + r.IntN(4) {
		rc := Receptor{X: f(*sc.Source.X + r.NormFloat64()*logU(1, 1e4)), Y: f(*sc.Source.Y + r.NormFloat64()*logU(0.1, 300))}
		switch r.IntN(3) {
		case 0:
			rc.Z = f(logU(1e-3, 50))
		case 1:
			top := logU(1e-3, 20)
			rc.ScreenTop, rc.ScreenBottom = f(top), f(top+logU(1e-3, 30))
		}
		_ = i
		sc.Receptors = append(sc.Receptors, rc)
	}
	for range r.IntN(5) {
		sc.Times = append(sc.Times, logU(1e-4, 1e6))
	}
	if maybe(0.2) {
		sc.Times = append(sc.Times, 0)
	}
	return sc
}

// Random valid scenarios never yield NaN or Inf (encoding/json refuses both),
// negative concentrations, or, for a constant source without decay, a value
// above the source concentration.
func TestScreenPropertyFinite(t *testing.T) {
	n := 200
	if testing.Short() {
		n = 40
	}
	r := rand.New(rand.NewPCG(20240611, 7))
	for i := range n {
		sc := randomScenario(r)
		if err := Validate(sc); err != nil {
			t.Fatalf("case %d: generator made an invalid scenario: %v", i, err)
		}
		res, err := Screen(context.Background(), sc, Options{})
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		if _, err := json.Marshal(res); err != nil {
			t.Fatalf("case %d: %v\n%s", i, err, mustJSON(sc))
		}
		bound := math.Inf(1)
		if sc.Source.Concentration != nil && sc.Contaminant.HalfLife == nil {
			bound = *sc.Source.Concentration * (1 + 1e-9)
		}
		check := func(what string, p *float64) {
			if p != nil && (*p < 0 || *p > bound) {
				t.Errorf("case %d: %s = %g (bound %g)\n%s", i, what, *p, bound, mustJSON(sc))
			}
		}
		for _, rr := range res.Receptors {
			for _, sp := range rr.Series {
				check("exact", sp.Exact)
				check("domenico", sp.Domenico)
			}
			check("steady exact", rr.SteadyState.Exact)
			check("steady domenico", rr.SteadyState.Domenico)
			check("peak", &rr.Peak.Concentration)
		}
	}
}
