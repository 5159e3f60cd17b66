package roots

import (
	"math"
	"testing"
)

// Brent against roots computed with mpmath.findroot at 30 digits
// (mpmath 1.3, Debian python3-mpmath): the fixed point of cos (the Dottie
// number) and Wallis's cubic x^3 - 2x - 5 = 0, the classic test of root
// finders; and a root at an end of the bracket.
func TestBrent(t *testing.T) {
	cases := []struct {
		name string
		g    func(float64) float64
		a, b float64
		want float64
	}{
		{"cos x = x", func(x float64) float64 { return math.Cos(x) - x }, 0, 1, 0.739085133215160641655312087674},
		{"Wallis cubic", func(x float64) float64 { return x*x*x - 2*x - 5 }, 2, 3, 2.09455148154232659148238654058},
		{"root at a", func(x float64) float64 { return x - 1 }, 1, 4, 1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got := Brent(tc.g, tc.a, tc.b, tc.g(tc.a), tc.g(tc.b), 1e-14, 200)
			if math.Abs(got-tc.want) > 1e-13 {
				t.Errorf("got %.17g, want %.17g", got, tc.want)
			}
		})
	}
}

// GoldenMax finds the maximum of sin on [0, 3] at pi/2 and of a parabola
// off-centre; golden-section search converges to about sqrt(eps) in x for a
// smooth maximum (the function is flat to second order there), so the test
// asks 1e-7 in x and 1e-14 in the value.
func TestGoldenMax(t *testing.T) {
	x, fx := GoldenMax(math.Sin, 0, 3, 1e-9)
	if math.Abs(x-math.Pi/2) > 1e-7 || math.Abs(fx-1) > 1e-14 {
		t.Errorf("sin: max at %.17g (%.17g), want pi/2 (1)", x, fx)
	}
	x, fx = GoldenMax(func(x float64) float64 { return 5 - (x-0.3)*(x-0.3) }, -2, 7, 1e-9)
	if math.Abs(x-0.3) > 1e-7 || math.Abs(fx-5) > 1e-13 {
		t.Errorf("parabola: max at %.17g (%.17g), want 0.3 (5)", x, fx)
	}
}

// NewtonBracketed on the same increasing functions as Brent's test (roots
// from mpmath.findroot at 30 digits), with the exact derivative, a wrong
// (zero) derivative that forces the secant safeguard, and a count of
// evaluations showing the quadratic convergence.
func TestNewtonBracketed(t *testing.T) {
	cases := []struct {
		name  string
		g, dg func(float64) float64
		a, b  float64
		want  float64
	}{
		{"x - cos x", func(x float64) float64 { return x - math.Cos(x) }, func(x float64) float64 { return 1 + math.Sin(x) }, 0, 1, 0.739085133215160641655312087674},
		{"Wallis cubic", func(x float64) float64 { return x*x*x - 2*x - 5 }, func(x float64) float64 { return 3*x*x - 2 }, 2, 3, 2.09455148154232659148238654058},
		{"no derivative", func(x float64) float64 { return x*x*x - 2*x - 5 }, func(float64) float64 { return 0 }, 2, 3, 2.09455148154232659148238654058},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			n := 0
			g := func(x float64) float64 { n++; return tc.g(x) }
			got := NewtonBracketed(g, tc.dg, tc.a, tc.b, tc.g(tc.a), tc.g(tc.b), 1e-13, 100)
			if math.Abs(got-tc.want) > 1e-12 {
				t.Errorf("got %.17g, want %.17g", got, tc.want)
			}
			if tc.name != "no derivative" && n > 6 {
				t.Errorf("%d evaluations; Newton from a secant start should need at most 6", n)
			}
		})
	}
}
