package plume

import (
	"slices"
	"testing"
)

// The numeric cross-check runs through Screen and agrees with the exact
// solution on the demo (the finite-volume solver's own accuracy is tested in
// package numeric).
func TestScreenNumeric(t *testing.T) {
	sc := demoScenario()
	sc.Methods = []string{MethodExact, MethodNumeric}
	r := screenOK(t, sc)
	if r.Numeric == nil || r.Numeric.TotalCells == 0 || r.Numeric.TotalCells > DefaultCellBudget {
		t.Fatalf("numeric report %+v", r.Numeric)
	}
	if r.Numeric.MassBalanceError > 1e-10 {
		t.Errorf("mass balance error %g", r.Numeric.MassBalanceError)
	}
	for _, rr := range r.Receptors {
		for _, sp := range rr.Series {
			if sp.Numeric == nil || sp.Domenico != nil {
				t.Fatalf("%s: series %+v", rr.ID, sp)
			}
		}
		a := rr.NumericAgreement
		if a == nil || !a.WithinTolerance || a.MaxRelativeDifference > DefaultNumericTolerance {
			t.Errorf("%s: agreement %+v", rr.ID, a)
		}
	}
}

// With no times, a constant continuous source still gets the numeric
// steady state (solved directly), and it agrees with the exact one.
func TestScreenNumericSteadyOnly(t *testing.T) {
	sc := demoScenario()
	sc.Methods = []string{MethodNumeric, MethodExact}
	sc.Times = nil
	r := screenOK(t, sc)
	if r.Numeric == nil {
		t.Fatalf("numeric not run: %+v", r.Caveats)
	}
	for _, rr := range r.Receptors {
		if rr.PlumeX <= 0 {
			continue
		}
		if rr.SteadyState.Numeric == nil || rr.NumericAgreement == nil {
			t.Fatalf("%s: steady %+v agreement %+v", rr.ID, rr.SteadyState, rr.NumericAgreement)
		}
		if !rr.NumericAgreement.WithinTolerance || rr.NumericAgreement.SteadyStateRelativeDifference == nil {
			t.Errorf("%s: agreement %+v", rr.ID, *rr.NumericAgreement)
		}
	}
}

func TestScreenNumericNotRun(t *testing.T) {
	tests := []struct {
		name string
		edit func(*Scenario)
	}{
		{"spill", func(s *Scenario) { s.Source.Concentration, s.Source.Mass = nil, f(1) }},
		{"only upgradient receptors", func(s *Scenario) { s.Receptors = []Receptor{{ID: "UP", X: f(-10), Y: f(50)}} }},
		{"no times, finite source", func(s *Scenario) { s.Times, s.Source.Duration = nil, f(1000) }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sc := demoScenario()
			sc.Methods = []string{MethodNumeric}
			tc.edit(&sc)
			r := screenOK(t, sc)
			if r.Numeric != nil || !slices.ContainsFunc(r.Caveats, func(c Caveat) bool { return c.Code == CaveatNumericNotRun }) {
				t.Errorf("numeric %+v caveats %+v", r.Numeric, r.Caveats)
			}
		})
	}
}
