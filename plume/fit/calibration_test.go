package fit

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"downgradient/internal/plumetest"
	"downgradient/plume"
)

// calibrationTruth is an invented 3D site (numbers made up) whose exact
// solution generates the synthetic observations.
func calibrationTruth() plume.Scenario {
	return plume.Scenario{
		Aquifer:     plume.Aquifer{SeepageVelocity: f(0.12), Dispersivity: &plume.Dispersivity{Longitudinal: f(10), Transverse: f(1), Vertical: f(0.1)}},
		Contaminant: plume.Contaminant{Name: "benzene", Retardation: f(1.37), HalfLife: f(720), ScreeningLevel: f(0.005)},
		Source:      plume.Source{Concentration: f(12), Width: f(15), Depth: f(3)},
		Receptors:   []plume.Receptor{{ID: "W-4", X: f(210), Y: f(6), Z: f(2)}},
		Times:       []float64{3650},
		Methods:     []string{plume.MethodExact},
	}
}

// syntheticObservations: 10 wells x 3 rounds from the exact solution of sc,
// times exp(N(0, sigma^2)) in log10 (seeded, reproducible).
func syntheticObservations(t testing.TB, sc plume.Scenario, sigma float64) []Observation {
	t.Helper()
	rng := rand.New(rand.NewPCG(5, 9))
	s := sc
	s.Receptors = nil
	for i := range 10 {
		s.Receptors = append(s.Receptors, plume.Receptor{ID: fmt.Sprintf("MW-%d", i+1), X: f(20 + 30*float64(i)), Y: f(float64(i%3) - 1), Z: f(1)})
	}
	s.Times = []float64{1000, 2000, 3650}
	res, err := plume.Screen(context.Background(), s, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var obs []Observation
	for i, rr := range res.Receptors {
		for j, sp := range rr.Series {
			c := *sp.Exact * math.Pow(10, sigma*rng.NormFloat64())
			obs = append(obs, Observation{WellID: rr.ID, X: s.Receptors[i].X, Y: s.Receptors[i].Y, Z: f(1), Time: f(s.Times[j]), Concentration: f(c)})
		}
	}
	return obs
}

var calibFit = []string{"source.concentration", "contaminant.half_life", "aquifer.dispersivity.longitudinal"}

// Recovery of known parameters from synthetic observations with noise
// (0.05 log10, about 12 %): each true value lies within the reported 95 %
// interval, and the fit's rmse matches the noise (least-squares theory:
// E[SSE/(n-p)] = sigma^2).
func TestCalibrationRecoversParameters(t *testing.T) {
	truth := calibrationTruth()
	obs := syntheticObservations(t, truth, 0.05)
	start := truth
	start.Source.Concentration = f(5)
	start.Contaminant.HalfLife = f(300)
	start.Aquifer.Dispersivity = &plume.Dispersivity{Longitudinal: f(3), Transverse: f(1), Vertical: f(0.1)}
	res, err := Calibrate(context.Background(), CalibrationRequest{Scenario: start, Observations: obs, Fit: calibFit})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{"source.concentration": 12, "contaminant.half_life": 720, "aquifer.dispersivity.longitudinal": 10}
	for p, v := range want {
		fv := res.Fitted[p]
		if !(fv.CI[0] <= v && v <= fv.CI[1]) {
			t.Errorf("%s: true %g outside [%g, %g] (fitted %g)", p, v, fv.CI[0], fv.CI[1], fv.Value)
		}
		if math.Abs(math.Log(fv.Value/v)) > 0.5 {
			t.Errorf("%s: fitted %g far from %g", p, fv.Value, v)
		}
	}
	if res.RMSELog10 < 0.02 || res.RMSELog10 > 0.1 {
		t.Errorf("rmse_log10 %g, noise 0.05", res.RMSELog10)
	}
	if len(res.Residuals) != 30 || res.DegreesOfFreedom != 27 {
		t.Errorf("%d residuals, %d dof", len(res.Residuals), res.DegreesOfFreedom)
	}
	if *res.FittedScenario.Scenario.Source.Concentration != res.Fitted["source.concentration"].Value {
		t.Error("fitted scenario lacks the fitted value")
	}
	// Without noise the fit is exact to the optimizer's tolerance.
	exact, err := Calibrate(context.Background(), CalibrationRequest{Scenario: start, Observations: syntheticObservations(t, truth, 0), Fit: calibFit})
	if err != nil {
		t.Fatal(err)
	}
	for p, v := range want {
		if got := exact.Fitted[p].Value; math.Abs(got/v-1) > 1e-3 {
			t.Errorf("noise-free %s: %g, want %g", p, got, v)
		}
	}
}

// Censored data: non-detects cost nothing while the model is below their
// limit, and a non-detect whose limit is far below the model pulls the fit.
func TestCalibrationCensored(t *testing.T) {
	truth := calibrationTruth()
	obs := syntheticObservations(t, truth, 0)
	nd := false
	// Turn the three earliest-round far wells into non-detects with limits
	// above the true value (consistent censoring).
	n := 0
	for i := len(obs) - 1; i >= 0 && n < 3; i-- {
		if *obs[i].Time == 1000 {
			obs[i].Detected, obs[i].DetectionLimit = &nd, f(*obs[i].Concentration*10+1e-6)
			obs[i].Concentration = nil
			n++
		}
	}
	res, err := Calibrate(context.Background(), CalibrationRequest{Scenario: truth, Observations: obs, Fit: []string{"source.concentration", "contaminant.half_life"}})
	if err != nil {
		t.Fatal(err)
	}
	if res.NonDetects != 3 {
		t.Errorf("%d non-detects", res.NonDetects)
	}
	for _, r := range res.Residuals {
		if !r.Detected && r.ResidualLog10 != 0 {
			t.Errorf("non-detect %s below its limit costs %g", r.WellID, r.ResidualLog10)
		}
	}
	if v := res.Fitted["contaminant.half_life"].Value; math.Abs(v/720-1) > 1e-3 {
		t.Errorf("half-life %g, want 720", v)
	}
}

// Under-determined fits are refused, saying what data would fix them.
func TestCalibrationUnderdetermined(t *testing.T) {
	truth := calibrationTruth()
	obs := syntheticObservations(t, truth, 0)
	cases := []struct {
		name  string
		req   CalibrationRequest
		field string
	}{
		{"two detects, two parameters", CalibrationRequest{Scenario: truth, Observations: obs[:2], Fit: calibFit[:2]}, "observations"},
		{"unknown parameter", CalibrationRequest{Scenario: truth, Observations: obs, Fit: []string{"aquifer.bulk_density"}}, "fit[0]"},
		{"listed twice", CalibrationRequest{Scenario: truth, Observations: obs, Fit: []string{"source.concentration", "source.concentration"}}, "fit[1]"},
		{"nothing to fit", CalibrationRequest{Scenario: truth, Observations: obs}, "fit"},
		// A constant continuous source: its depletion half-life has nothing
		// to act on only if... here one round at one well cannot separate
		// source strength from decay.
		{"one well one time", CalibrationRequest{Scenario: truth, Observations: []Observation{obs[0], obs[0], obs[0]}, Fit: []string{"source.concentration", "contaminant.half_life"}}, "fit"},
		{"bad bounds", CalibrationRequest{Scenario: truth, Observations: obs, Fit: calibFit[:1], Bounds: map[string][2]float64{"source.concentration": {5, 1}}}, "bounds.source.concentration"},
		{"missing time", CalibrationRequest{Scenario: truth, Observations: []Observation{{X: f(1), Y: f(0), Concentration: f(1)}}, Fit: calibFit[:1]}, "observations[0].time"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Calibrate(context.Background(), tc.req)
			fe := plume.FieldsOf(err)
			if len(fe) == 0 {
				t.Fatalf("err %v, want FieldErrors", err)
			}
			found := false
			for _, e := range fe {
				found = found || e.Field == tc.field
			}
			if !found {
				t.Errorf("errors %v lack %s", fe, tc.field)
			}
		})
	}
}

// BenchmarkCalibration: 3 parameters fitted to 30 observations (10 wells x
// 3 rounds, 3D exact solution). Target (issue 5): under 2 s.
func BenchmarkCalibration(b *testing.B) {
	truth := calibrationTruth()
	obs := syntheticObservations(b, truth, 0.05)
	start := truth
	start.Source.Concentration = f(5)
	start.Contaminant.HalfLife = f(300)
	start.Aquifer.Dispersivity = &plume.Dispersivity{Longitudinal: f(3), Transverse: f(1), Vertical: f(0.1)}
	for b.Loop() {
		if _, err := Calibrate(context.Background(), CalibrationRequest{Scenario: start, Observations: obs, Fit: calibFit}); err != nil {
			b.Fatal(err)
		}
	}
}

// f is a test shorthand for a *float64.
var f = plumetest.F

// A chain (invented, equal retardation so the closed forms apply): the
// daughter TCE is observed, and the half-lives of parent and daughter are
// recovered by their contaminants[] paths (issue 13).
func TestCalibrationCompoundOfChain(t *testing.T) {
	truth := calibrationTruth()
	truth.Contaminant = plume.Contaminant{}
	truth.Source.Concentration = nil
	truth.Contaminants = []plume.Constituent{
		{Name: "PCE", SourceConcentration: f(12), Retardation: f(1.37), HalfLife: f(500), DecaysTo: "TCE"},
		{Name: "TCE", SourceConcentration: f(0), Retardation: f(1.37), HalfLife: f(900), ScreeningLevel: f(0.005)},
	}
	// Observations of TCE: the exact values of the focused model.
	rng := rand.New(rand.NewPCG(5, 9))
	var obs []Observation
	md, err := plume.Prepare(truth)
	if err == nil {
		md, err = md.Focus("TCE")
	}
	if err != nil {
		t.Fatal(err)
	}
	for i := range 10 {
		x, y := 20+30*float64(i), float64(i%3)-1
		for _, tm := range []float64{1000, 2000, 3650} {
			p := md.LocateSite(fmt.Sprintf("MW-%d", i+1), x, y, 1)
			c := md.Value(plume.MethodExact, p, md.Elapsed(tm)) * math.Pow(10, 0.03*rng.NormFloat64())
			obs = append(obs, Observation{WellID: p.ID, X: f(x), Y: f(y), Z: f(1), Time: f(tm), Concentration: f(c)})
		}
	}
	start := truth
	start.Contaminants = append([]plume.Constituent(nil), truth.Contaminants...)
	start.Contaminants[0].HalfLife, start.Contaminants[1].HalfLife = f(200), f(3000)
	fitPaths := []string{"contaminants[0].half_life", "contaminants[1].half_life"}
	res, err := Calibrate(context.Background(), CalibrationRequest{Scenario: start, Observations: obs, Fit: fitPaths, Compound: "TCE"})
	if err != nil {
		t.Fatal(err)
	}
	for p, v := range map[string]float64{fitPaths[0]: 500, fitPaths[1]: 900} {
		if fv := res.Fitted[p]; math.Abs(math.Log(fv.Value/v)) > 0.2 {
			t.Errorf("%s: fitted %g (CI %v), true %g", p, fv.Value, fv.CI, v)
		}
	}
	// The compound must be named, and exist.
	for _, name := range []string{"", "vinyl chloride"} {
		_, err := Calibrate(context.Background(), CalibrationRequest{Scenario: start, Observations: obs, Fit: fitPaths, Compound: name})
		if fe := plume.FieldsOf(err); len(fe) == 0 || fe[0].Field != "compound" {
			t.Errorf("compound %q: err %v, want one naming compound", name, err)
		}
	}
}
