package analytic

import "math"

// OgataBanksFlux returns C/C0 at x >= 0, t >= 0 in a semi-infinite column
// whose inlet receives a constant solute flux (third-type boundary
// V C - Dx dC/dx = V C0 at x = 0) from t = 0, with retardation and
// first-order decay. The closed form is that of van Genuchten & Alves (1982,
// USDA Tech. Bull. 1661), with w = sqrt(V^2 + 4 D R Mu):
//
//	C/C0 = V/(V+w) exp((V-w)x/(2D)) erfc((Rx-wt)/(2 sqrt(DRt)))
//	     + V/(V-w) exp((V+w)x/(2D)) erfc((Rx+wt)/(2 sqrt(DRt)))
//	     + V^2/(2 R Mu D) exp(Vx/D - Mu t) erfc((Rx+Vt)/(2 sqrt(DRt)))
//
// and, without decay,
//
//	C/C0 = 1/2 erfc((Rx-Vt)/(2 sqrt(DRt))) + sqrt(V^2 t/(pi D R)) exp(-(Rx-Vt)^2/(4DRt))
//	     - 1/2 (1 + Vx/D + V^2 t/(DR)) exp(Vx/D) erfc((Rx+Vt)/(2 sqrt(DRt))).
//
// Both forms subtract terms of nearly equal size where decay is weak or in
// the early-time tail. Where the closed form would lose more than two
// digits this way, the value is computed instead from the exact identity
//
//	C_flux(x, t) = integral_0^inf exp(-s) C_conc(x + s D/V, t) ds
//
// (in the Laplace domain the flux solution is the concentration solution
// times 2V/(V + sqrt(V^2 + 4DR(s+Mu))); C_conc is OgataBanks), by adaptive
// Gauss-Legendre quadrature to a relative accuracy of 1e-12.
// t = math.Inf(1) gives the steady state 2V/(V+w) exp((V-w)x/(2D)).
func OgataBanksFlux(x, t float64, p Params) float64 {
	c, ok := ogataBanksFlux(x, t, p.Dx, p.R, p.V, p.Mu, 0)
	if !ok {
		c = fluxByIntegral(x, t, p)
	}
	return clamp01(c)
}

// ogataBanksFlux is the third-type closed form times exp(shift), unclamped,
// for mu > -V^2/(4DR) (see ogataBanks). It reports false where the closed
// form would lose more than four digits to cancellation.
func ogataBanksFlux(x, t, d, r, v, mu, shift float64) (float64, bool) {
	if x < 0 || t <= 0 || math.IsNaN(x) || math.IsNaN(t) {
		return 0, true
	}
	w := math.Sqrt(v*v + 4*d*r*mu)
	a1 := -2*r*mu*x/(v+w) + shift
	if math.IsInf(t, 1) {
		return 2 * v / (v + w) * math.Exp(a1), true
	}
	s := 2 * math.Sqrt(d*r*t)
	b1 := (r*x - w*t) / s
	b3 := (r*x + v*t) / s
	q := (r*x - v*t) / s
	ee := math.Exp(-q*q - mu*t + shift)
	var t1 float64
	if b1 >= 0 {
		t1 = ee * Erfcx(b1)
	} else {
		t1 = math.Exp(a1) * math.Erfc(b1)
	}
	var terms [3]float64
	if mu == 0 {
		// P = V sqrt(t/(DR)); V x/D + V^2 t/(DR) = 2 b3 P.
		pp := v * math.Sqrt(t/(d*r))
		terms[0] = 0.5 * t1
		terms[1] = ee * pp * invSqrtPi
		terms[2] = -0.5 * (1 + 2*b3*pp) * ee * Erfcx(b3)
	} else {
		b2 := (r*x + w*t) / s
		terms[0] = v / (v + w) * t1
		// V/(V-w) = -V (V+w) / (4 D R Mu).
		terms[1] = -v * (v + w) / (4 * d * r * mu) * ee * Erfcx(b2)
		terms[2] = v * v / (2 * r * mu * d) * ee * Erfcx(b3)
	}
	sum := terms[0] + terms[1] + terms[2]
	mag := math.Abs(terms[0]) + math.Abs(terms[1]) + math.Abs(terms[2])
	if math.IsNaN(sum) || math.IsInf(mag, 0) || math.Abs(sum) < 1e-2*mag {
		return 0, false
	}
	return sum, true
}

// fluxByIntegral evaluates integral_0^inf exp(-s) OgataBanks(x + s D/V, t) ds.
func fluxByIntegral(x, t float64, p Params) float64 {
	c1 := func(xx float64) float64 { return OgataBanks(xx, t, p) }
	return fluxIntegral(x, t, p, c1, true, 1e-12)
}

// fluxIntegral evaluates integral_0^inf exp(-s) c1(x + s D/V) ds, c1 a
// first-type solution at time t. The integrand falls at least as fast as
// exp(-(1+k) s), k the logarithmic slope of the concentration profile in
// units of D/V, so panels are laid out on the scale 1/(1+k). When c1 falls
// with distance (monotone: true, as for a constant source) the panel bounds
// use that; otherwise they use c1 <= 1. rel is the relative accuracy asked,
// which must not be finer than c1's own.
func fluxIntegral(x, t float64, p Params, c1 func(float64) float64, monotone bool, rel float64) float64 {
	d, r, v := p.Dx, p.R, p.V
	ell := d / v
	f := func(s float64) float64 { return math.Exp(-s) * c1(x+s*ell) }
	k := 0.0
	if r*x > v*t {
		// Early-time tail: the Gaussian front decays with slope
		// R(Rx-Vt)/(2DRt) per unit length.
		k = ell * (r*x - v*t) / (2 * d * t)
	}
	scale := 1 / (1 + k)
	var panels [16]panel
	n := 0
	a := 0.0
	c0 := 1.0
	if monotone {
		c0 = c1(x)
	}
	for _, m := range []float64{0.25, 0.5, 1, 2, 4, 8, 16, 32, 64, 128, 256} {
		b := m * scale
		if a >= 745 {
			break
		}
		// The integrand is at most exp(-a) c1(x + a D/V) on [a, b] when c1
		// falls with x, and at most exp(-a) otherwise.
		bound := math.Exp(-a) * (b - a)
		if monotone {
			if a == 0 {
				bound *= c0
			} else {
				bound *= c1(x + a*ell)
			}
		}
		panels[n] = panel{a: a, b: b, bound: bound}
		n++
		a = b
	}
	if a < 745 {
		panels[n] = panel{a: a, b: 745, bound: math.Exp(-a) * c0 * (745 - a)}
		n++
	}
	return integratePanels(f, panels[:n], rel)
}
