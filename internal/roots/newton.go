package roots

import "math"

// NewtonBracketed returns x in [a, b] with g(x) = 0 for an increasing g,
// given fa = g(a) < 0 < fb = g(b) and its derivative dg, to within tol in
// x. Newton steps from a secant start, each kept inside the bracket, which
// shrinks with every evaluation; a step that would leave the bracket, or
// that a non-positive derivative makes undefined, is replaced by the
// secant (regula falsi with the Illinois modification, Dowell & Jarratt
// 1971) so that the bracket always closes. Where dg is cheap next to g (a
// time integral and its integrand) the quadratic convergence of Newton's
// method saves evaluations of g over Brent.
func NewtonBracketed(g, dg func(float64) float64, a, b, fa, fb, tol float64, maxIter int) float64 {
	if fa == 0 {
		return a
	}
	if fb == 0 {
		return b
	}
	x := newtonStart(dg, a, b, fa, fb)
	side := 0
	for range maxIter {
		fx := g(x)
		switch {
		case fx == 0:
			return x
		case fx < 0:
			a, fa = x, fx
			if side == -1 {
				fb /= 2 // Illinois: the same end twice
			}
			side = -1
		default:
			b, fb = x, fx
			if side == 1 {
				fa /= 2
			}
			side = 1
		}
		next := math.NaN()
		if d := dg(x); d > 0 {
			next = x - fx/d
		}
		if !(next > a && next < b) {
			next = a - fa*(b-a)/(fb-fa)
		}
		if math.Abs(next-x) <= tol || b-a <= tol {
			return next
		}
		x = next
	}
	return x
}

// newtonStart is the first point: a Newton step from the end of the
// bracket nearer the root by value (where the tangent is the better
// model), when it lands inside the bracket; else the secant.
func newtonStart(dg func(float64) float64, a, b, fa, fb float64) float64 {
	x, fx := a, fa
	if math.Abs(fb) < math.Abs(fa) {
		x, fx = b, fb
	}
	if d := dg(x); d > 0 {
		if next := x - fx/d; next > a && next < b {
			return next
		}
	}
	return a - fa*(b-a)/(fb-fa)
}
