package numeric

import (
	"context"
	"math"
	"testing"
)

func ob(x, t, v, d, r float64) float64 {
	a := 2 * math.Sqrt(d*r*t)
	return 0.5*math.Erfc((r*x-v*t)/a) + 0.5*math.Exp(v*x/d)*math.Erfc((r*x+v*t)/a)
}

func TestScratch1D(t *testing.T) {
	for _, ref := range []float64{1, 2, 4, 8} {
		p := Problem1D{V: 1, Dx: 1, R: 1, Receptors: []float64{5, 10, 15}, Times: []float64{10}, Refine: ref, PecletMax: 1}
		res, err := Screen1D(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		e := 0.0
		for i, x := range p.Receptors {
			e = math.Max(e, math.Abs(res.C[i][0]-ob(x, 10, 1, 1, 1)))
		}
		t.Logf("ref %g n=%d steps=%d err=%.3g closure=%.3g %+v", ref, res.Grid.NX, res.Grid.Steps, e, res.Budget.ClosureError, res.Budget)
	}
}
