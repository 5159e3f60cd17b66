package analytic

import (
	"math"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Exact3DRate against 40-digit mpmath values of the integrand
// (testdata/reference/gen_rate.py: points on and beside the plume, a well
// screen below the source, the 1D column, early times in the tail).
func TestExact3DRateReference(t *testing.T) {
	var f struct {
		Cases []struct {
			X, Y, Top, Bottom, T, V, Dx, Dy, Dz, R, Mu float64
			Width, Depth                               *float64
			Rate                                       string
		}
	}
	refLoad(t, "exact3d_rate.json", &f)
	if len(f.Cases) < 10 {
		t.Fatalf("%d cases", len(f.Cases))
	}
	for _, c := range f.Cases {
		want, _ := strconv.ParseFloat(c.Rate, 64)
		s := Source{Width: math.Inf(1), Depth: math.Inf(1)}
		if c.Width != nil {
			s = Source{Width: *c.Width, Depth: *c.Depth}
		}
		got := Exact3DRate(Point{X: c.X, Y: c.Y, Top: c.Top, Bottom: c.Bottom}, c.T, Params{V: c.V, Dx: c.Dx, Dy: c.Dy, Dz: c.Dz, R: c.R, Mu: c.Mu}, s)
		if rel := math.Abs(got-want) / want; rel > 1e-12 {
			t.Errorf("x %g y %g t %g: %.15g, mpmath %.15g (rel %.2g)", c.X, c.Y, c.T, got, want, rel)
		}
	}
}

// The rate integrates to the value: the integral of Exact3DRate over
// [0, t] (gonum's fixed 20-point Gauss-Legendre rule on 400 panels) equals
// Exact3DAt, itself checked against the 40-digit references, to 1e-7.
func TestExact3DRateIntegratesToValue(t *testing.T) {
	p := Params{V: 0.2, Dx: 2, Dy: 0.2, Dz: 0.02, R: 1.8, Mu: 0.001}
	s := Source{Width: 20, Depth: 4}
	for _, pt := range []Point{{X: 40, Y: 3, Top: 1, Bottom: 1}, {X: 150, Y: 0, Top: 2, Bottom: 8}} {
		for _, tt := range []float64{200, 800, 3000} {
			f := func(tau float64) float64 { return Exact3DRate(pt, tau, p, s) }
			got := 0.0
			const panels = 400
			for i := range panels {
				a, b := tt*float64(i)/panels, tt*float64(i+1)/panels
				got += quad.Fixed(f, a, b, 20, quad.Legendre{}, 0)
			}
			want := Exact3DAt(pt, tt, p, s, History{})
			if rel := math.Abs(got-want) / want; rel > 1e-7 {
				t.Errorf("%+v t %g: integral %.12g, Exact3DAt %.12g (rel %.2g)", pt, tt, got, want, rel)
			}
		}
	}
}
