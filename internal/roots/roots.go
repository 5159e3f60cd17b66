// Package roots holds the two scalar searches the screening needs and that
// gonum does not offer: a bracketed root (Brent 1973) and a bracketed
// maximum (golden-section search). gonum's optimize package minimises
// multivariate functions (its Nelder-Mead is used by the calibration) but
// has no bracketed scalar root finder and no bounded one-dimensional
// maximiser.
package roots

import "math"

// Brent returns x in [a, b] with g(x) = 0, given fa = g(a) and
// fb = g(b) of opposite signs (or one of them zero), to within tol in x
// (plus a few ulps of x). Brent's method (Brent 1973, Algorithms for
// Minimization without Derivatives, ch. 4): inverse quadratic
// interpolation and secant steps safeguarded by bisection.
func Brent(g func(float64) float64, a, b, fa, fb, tol float64, maxIter int) float64 {
	if fa == 0 {
		return a
	}
	if fb == 0 {
		return b
	}
	const eps = 2.220446049250313e-16
	c, fc := a, fa
	d := b - a
	e := d
	for range maxIter {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := 2*eps*math.Abs(b) + 0.5*tol
		xm := 0.5 * (c - b)
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * xm * s
				q = 1 - s
			} else {
				q = fa / fc
				r := fb / fc
				p = s * (2*xm*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol1*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = g(b)
	}
	return b
}

// GoldenMax returns the x in [a, b] maximising a unimodal f, to within
// relative tolerance rel of x, and f there (golden-section search).
func GoldenMax(f func(float64) float64, a, b, rel float64) (x, fx float64) {
	const invPhi = 0.6180339887498949 // (sqrt 5 - 1)/2
	c := b - invPhi*(b-a)
	d := a + invPhi*(b-a)
	fc, fd := f(c), f(d)
	for i := 0; i < 200 && b-a > rel*math.Abs(0.5*(a+b)); i++ {
		if fc >= fd {
			b, d, fd = d, c, fc
			c = b - invPhi*(b-a)
			fc = f(c)
		} else {
			a, c, fc = c, d, fd
			d = a + invPhi*(b-a)
			fd = f(d)
		}
	}
	if fc >= fd {
		return c, fc
	}
	return d, fd
}
