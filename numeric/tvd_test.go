package numeric

import (
	"context"
	"math"
	"testing"
)

// TestSharpFrontNoOscillation: a sharp front at grid Peclet number 50 and
// Courant numbers up to 1, the standard test of TVD advection schemes
// (LeVeque 2002, Finite Volume Methods for Hyperbolic Problems, ch. 6;
// Zheng & Bennett 2002, Applied Contaminant Transport Modeling, ch. 7): the
// solution must have no negative values and no overshoot above the source
// (C/C0 <= 1), for a step (continuous source) and a square pulse (source
// switched off), with and without decay, in 1D and 3D. The property holds in
// exact arithmetic; the field may differ from it by round-off (1e-12 allowed)
// and the values reported at receptors are exactly within [0, 1].
func TestSharpFrontNoOscillation(t *testing.T) {
	const dx = 0.1
	for _, tc := range []struct {
		name    string
		courant float64
		hist    History
		mu      float64
	}{
		{"step, Courant 1", 1, History{}, 0},
		{"step, Courant 0.9", 0.9, History{}, 0},
		{"step, Courant 0.37", 0.37, History{}, 0},
		{"pulse, Courant 1", 1, History{Duration: 2}, 0},
		{"pulse, Courant 0.6, decay", 0.6, History{Duration: 2}, 0.05},
	} {
		t.Run("1D "+tc.name, func(t *testing.T) {
			p := Problem1D{V: 1, Dx: 1 * dx / 50, R: 1, Mu: tc.mu, History: tc.hist, Courant: tc.courant,
				Receptors: []float64{5}, Times: []float64{1, 3, 6}, Grid: UniformAxis(10, 100)}
			res, err := Screen1D(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			lo, hi := minMax(res.Final)
			for _, c := range res.C[0] {
				if c < 0 || c > 1 {
					t.Errorf("receptor value %g out of [0, 1]", c)
				}
			}
			if lo < -1e-12 || hi > 1+1e-12 {
				t.Errorf("values out of [0, 1]: min %g, max %g", lo, hi)
			}
			if res.Grid.PecletX < 49.9 {
				t.Errorf("grid Peclet %g, want 50", res.Grid.PecletX)
			}
			if res.Budget.ClosureError > 1e-10 {
				t.Errorf("closure %.3g", res.Budget.ClosureError)
			}
		})
		t.Run("3D "+tc.name, func(t *testing.T) {
			p := Problem3D{V: 1, Dx: dx / 50, Dy: 0.001, Dz: 0.001, R: 1, Mu: tc.mu, Width: 2, Depth: 1,
				History: tc.hist, Courant: tc.courant, Receptors: []Receptor{{X: 5}}, Times: []float64{1, 3, 6},
				Grid: &Grid3D{X: UniformAxis(10, 100), Y: UniformAxis(3, 15), Z: UniformAxis(2, 10)}}
			_, g, err := run3D(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			lo, hi := minMax(g.c)
			if lo < -1e-12 || hi > 1+1e-12 {
				t.Errorf("values out of [0, 1]: min %g, max %g", lo, hi)
			}
		})
	}
}

func minMax(v []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

// TestVanLeerBound: the limited difference never exceeds 2 min(|a|, |b|)
// and vanishes at extrema, the TVD conditions of Sweby (1984).
func TestVanLeerBound(t *testing.T) {
	vals := []float64{-3, -1, -1e-9, 0, 1e-300, 1e-9, 0.5, 1, 2, 7}
	for _, a := range vals {
		for _, b := range vals {
			l := vanLeer(a, b)
			if a*b <= 0 && l != 0 {
				t.Errorf("vanLeer(%g, %g) = %g at an extremum", a, b, l)
			}
			if math.Abs(l) > 2*math.Min(math.Abs(a), math.Abs(b))*(1+1e-15) {
				t.Errorf("vanLeer(%g, %g) = %g exceeds 2 min", a, b, l)
			}
		}
	}
}
