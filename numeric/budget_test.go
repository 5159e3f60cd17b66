package numeric

import (
	"context"
	"math"
	"testing"
)

// TestMassBudgetClosure: every run closes its mass budget (stored = in - out
// - decayed) to 1e-10 of the mass in, and every steady state its budget in
// rates (in = out + decayed); mass conservation is an identity of
// the conservative finite-volume form (DESIGN.md section 6: limits and
// identities of the mathematics).
func TestMassBudgetClosure(t *testing.T) {
	inf := math.Inf(1)
	radial := func(x float64) float64 { return 2 * math.Pi * (0.5 + x) * 3 } // 3 m thick, r0 = 0.5 m
	for _, p := range []struct {
		name string
		p    Problem1D
	}{
		{"1D first-type", Problem1D{V: 1, Dx: 0.3, R: 1, Receptors: []float64{3}, Times: []float64{2, 8}}},
		{"1D flux inlet, retardation, decay", Problem1D{V: 0.2, Dx: 0.5, R: 3, Mu: 0.01, Inlet: InletFlux, Receptors: []float64{10}, Times: []float64{100, 400}}},
		{"1D pulse", Problem1D{V: 1, Dx: 0.1, R: 1, Mu: 0.02, History: History{Duration: 3}, Receptors: []float64{5}, Times: []float64{10, 20}}},
		{"1D depleting source", Problem1D{V: 1, Dx: 0.1, R: 1.2, History: History{Depletion: 0.1}, Receptors: []float64{5}, Times: []float64{10}}},
		{"1D radial area, decay", Problem1D{V: 1, Dx: 0.2, Dm: 0.01, R: 2, Mu: 0.05, Area: radial, Receptors: []float64{4}, Times: []float64{5, 30}}},
		{"1D steady with decay", Problem1D{V: 1, Dx: 0.5, R: 1, Mu: 0.1, Receptors: []float64{4}, Times: []float64{inf}}},
		{"1D steady, flux inlet, radial area, Peclet 50", Problem1D{V: 1, Dx: 0.002, R: 2, Mu: 0.05, Inlet: InletFlux, Area: radial, PecletMax: 50, Receptors: []float64{4}, Times: []float64{inf}}},
	} {
		t.Run(p.name, func(t *testing.T) {
			res, err := Screen1D(context.Background(), p.p)
			if err != nil {
				t.Fatal(err)
			}
			if res.SteadyBudget != nil {
				checkSteadyBudget(t, *res.SteadyBudget)
				return
			}
			checkBudget(t, res.Budget)
		})
	}
	for _, p := range []struct {
		name string
		p    Problem3D
	}{
		{"3D decay", Problem3D{V: 0.3, Dx: 3, Dy: 0.3, Dz: 0.03, R: 2, Mu: 0.001, Width: 10, Depth: 3,
			Receptors: []Receptor{{X: 50}}, Times: []float64{200, 600}}},
		{"3D pulse", Problem3D{V: 0.3, Dx: 3, Dy: 0.3, Dz: 0.03, R: 1, Width: 10, Depth: 3, History: History{Duration: 100},
			Receptors: []Receptor{{X: 50, Top: 0, Bottom: 5}}, Times: []float64{200}}},
		{"3D depleting", Problem3D{V: 0.3, Dx: 3, Dy: 0.3, Dz: 0.03, R: 1, Mu: 0.0005, Width: 10, Depth: 3, History: History{Depletion: 0.002},
			Receptors: []Receptor{{X: 50}}, Times: []float64{300}}},
		{"3D steady", Problem3D{V: 1, Dx: 5, Dy: 0.5, Dz: 0.1, R: 1, Mu: 0.01, Width: 6, Depth: 2,
			Receptors: []Receptor{{X: 30}}, Times: []float64{inf}}},
	} {
		t.Run(p.name, func(t *testing.T) {
			res, err := Screen3D(context.Background(), p.p)
			if err != nil {
				t.Fatal(err)
			}
			if res.SteadyBudget != nil {
				checkSteadyBudget(t, *res.SteadyBudget)
				return
			}
			checkBudget(t, res.Budget)
		})
	}
}

func checkBudget(t *testing.T, b MassBudget) {
	t.Helper()
	if !(b.In > 0) {
		t.Fatalf("no mass came in: %+v", b)
	}
	if b.ClosureError > 1e-10 {
		t.Errorf("closure error %.3g > 1e-10: %+v", b.ClosureError, b)
	}
	for _, v := range []float64{b.InletAdvective, b.InletDispersive, b.Outflow, b.Decayed, b.Stored, b.ClosureError} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("non-finite budget entry: %+v", b)
		}
	}
	t.Logf("closure %.2g (in %.4g, out %.4g, decayed %.4g, stored %.4g)", b.ClosureError, b.In, b.Outflow, b.Decayed, b.Stored)
}
