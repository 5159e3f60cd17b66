package numeric

import (
	"context"
	"math"
	"testing"

	"downgradient/analytic"
)

// TestHistories: source histories (a source switched off, a depleting
// source) and a well-screen average against the closed forms of the same
// problems (analytic.OgataBanksAt: Ogata & Banks 1961 by superposition;
// analytic.Exact3DAt: the Wexler 1992 time integral over the active ages).
func TestHistories(t *testing.T) {
	ap := analytic.Params{V: 1, Dx: 0.5, R: 1.5, Mu: 0.01}
	for _, tc := range []struct {
		name  string
		inlet Inlet
		h     History
	}{
		{"first-type, switched off", InletConcentration, History{Duration: 5}},
		{"first-type, depleting", InletConcentration, History{Depletion: 0.05}},
		{"third-type, switched off", InletFlux, History{Duration: 5}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			xs := []float64{2, 5, 8}
			times := []float64{4, 10, 16, math.Inf(1)}
			p := Problem1D{V: ap.V, Dx: ap.Dx, R: ap.R, Mu: ap.Mu, Inlet: tc.inlet, History: tc.h,
				Receptors: xs, Times: times, Refine: 4}
			res, err := Screen1D(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			ain := analytic.FirstType
			if tc.inlet == InletFlux {
				ain = analytic.ThirdType
			}
			ah := analytic.History{Duration: tc.h.Duration, Depletion: tc.h.Depletion}
			for i, x := range xs {
				for k, tt := range times {
					ex := analytic.OgataBanksAt(x, tt, ap, ain, ah)
					if d := math.Abs(res.C[i][k] - ex); d > 5e-3 {
						t.Errorf("x=%g t=%g: numeric %.5g exact %.5g", x, tt, res.C[i][k], ex)
					}
				}
			}
			checkBudget(t, res.Budget)
		})
	}
	t.Run("3D switched off, screen average", func(t *testing.T) {
		ap := analytic.Params{V: 0.5, Dx: 2, Dy: 0.4, Dz: 0.1, R: 1, Mu: 0.001}
		src := analytic.Source{Width: 10, Depth: 4}
		h := History{Duration: 60}
		rec := []Receptor{{X: 20, Y: 0, Top: 0, Bottom: 6}, {X: 30, Y: 4, Top: 1, Bottom: 3}, {X: 40}}
		p := Problem3D{V: ap.V, Dx: ap.Dx, Dy: ap.Dy, Dz: ap.Dz, R: ap.R, Mu: ap.Mu, Width: src.Width, Depth: src.Depth,
			History: h, Receptors: rec, Times: []float64{50, 100}}
		res, err := Screen3D(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range rec {
			for k, tt := range p.Times {
				ex := analytic.Exact3DAt(analytic.Point{X: r.X, Y: r.Y, Top: r.Top, Bottom: r.Bottom}, tt, ap, src, analytic.History{Duration: h.Duration})
				if ex > 1e-3 && math.Abs(res.C[i][k]-ex) > 0.05*ex {
					t.Errorf("%+v t=%g: numeric %.5g exact %.5g", r, tt, res.C[i][k], ex)
				}
			}
		}
		checkBudget(t, res.Budget)
	})
}
