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

func TestScreenNumericNotRun(t *testing.T) {
	tests := []struct {
		name string
		edit func(*Scenario)
	}{
		{"spill", func(s *Scenario) { s.Source.Concentration, s.Source.Mass = nil, f(1) }},
		{"only upgradient receptors", func(s *Scenario) { s.Receptors = []Receptor{{ID: "UP", X: f(-10), Y: f(50)}} }},
		{"no times", func(s *Scenario) { s.Times = nil }},
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
