package analytic

import (
	"math"
	"testing"
)

func TestOgataBanksQuick(t *testing.T) {
	p := Params{V: 1, Dx: 1e-6, R: 1}
	for _, tt := range []float64{0.5, 0.9, 0.99, 0.999, 1, 1.001, 2} {
		t.Logf("t=%v C=%v", tt, OgataBanks(1, tt, p))
	}
	p = Params{V: 0.1, Dx: 1, R: 2, Mu: 0.01}
	t.Logf("%v %v", OgataBanks(10, 100, p), OgataBanks(10, math.Inf(1), p))
}

func TestFluxQuick(t *testing.T) {
	for _, p := range []Params{{V: 1, Dx: 1, R: 1}, {V: 1, Dx: 1, R: 1, Mu: 1e-9}, {V: 1, Dx: 0.01, R: 1.5, Mu: 0.1}} {
		for _, tt := range []float64{0.01, 0.1, 0.5, 1, 2, 10, math.Inf(1)} {
			c := OgataBanksFlux(1, tt, p)
			s := 2 * math.Sqrt(p.Dx*p.R*tt)
			w := math.Sqrt(p.V*p.V + 4*p.Dx*p.R*p.Mu)
			alt, ok := fluxClosedForm(1, tt, p.Dx, p.R, p.V, p.Mu, w, -2*p.R*p.Mu/(p.V+w))
			t.Logf("p=%v t=%v C=%.15g integral=%.15g closed=%.15g ok=%v  s=%v", p, tt, c, fluxByIntegral(1, tt, p), alt, ok, s)
		}
	}
}

func TestExactQuick(t *testing.T) {
	inf := math.Inf(1)
	for _, p := range []Params{{V: 1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1}, {V: 0.1, Dx: 1, Dy: .1, Dz: .01, R: 2, Mu: 0.001}, {V: 1, Dx: 1e-3, Dy: 1e-4, Dz: 1e-5, R: 1.5, Mu: 0.01}} {
		for _, tt := range []float64{0.01, 0.1, 0.5, 1, 2, 10, 100, 1000, 10000, inf} {
			for _, x := range []float64{0.1, 1, 10} {
				c := Exact3D(x, 0, 0, tt, p, Source{inf, inf})
				o := OgataBanks(x, tt, p)
				if math.Abs(c-o) > 1e-6*o {
					t.Errorf("p=%v t=%v x=%v exact=%.15g ob=%.15g rel=%.3g", p, tt, x, c, o, (c-o)/o)
				}
			}
		}
	}
}
