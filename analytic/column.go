package analytic

import "math"

// OgataBanks returns C/C0 at distance x >= 0 and time t >= 0 in a
// semi-infinite column with a constant concentration C0 held at the inlet
// (first-type boundary) from t = 0, retardation p.R and first-order decay
// p.Mu (Ogata & Banks 1961, USGS Prof. Paper 411-A; with decay as in
// van Genuchten & Alves 1982, USDA Tech. Bull. 1661):
//
//	C/C0 = 1/2 exp((V-w)x/(2D)) erfc((Rx-wt)/(2 sqrt(DRt)))
//	     + 1/2 exp((V+w)x/(2D)) erfc((Rx+wt)/(2 sqrt(DRt))),  w = sqrt(V^2 + 4 D R Mu)
//
// with D = p.Dx. Each product is formed as exp(e)*Erfcx(b) with the combined
// exponent e = -(Rx-Vt)^2/(4DRt) - Mu t written in closed form, so no factor
// overflows at any Peclet number and values down to the float64 range are
// returned with a relative error of order (1+|e|)*2^-53 (the condition
// number of the function itself). t = math.Inf(1) gives the steady state
// exp((V-w)x/(2D)). x < 0 lies outside the column and gives 0; so does t <= 0
// with x > 0.
func OgataBanks(x, t float64, p Params) float64 {
	return clamp01(ogataBanks(x, t, p.Dx, p.R, p.V, p.Mu, 0))
}

// ogataBanks is the first-type solution times exp(shift), unclamped. It
// accepts a negative mu (the effective rate of a depleting source, Mu - g)
// as long as V^2 + 4 D R mu > 0; shift (<= 0) is added to every exponent so
// that exp(-g t) times a growing solution never overflows.
func ogataBanks(x, t, d, r, v, mu, shift float64) float64 {
	switch {
	case x < 0 || t <= 0 || math.IsNaN(x) || math.IsNaN(t):
		return 0
	case x == 0:
		return math.Exp(shift)
	}
	w := math.Sqrt(v*v + 4*d*r*mu)
	// (V-w)x/(2D) without cancellation when mu is small.
	a1 := -2*r*mu*x/(v+w) + shift
	if math.IsInf(t, 1) {
		return math.Exp(a1)
	}
	s := 2 * math.Sqrt(d*r*t)
	b1 := (r*x - w*t) / s
	b2 := (r*x + w*t) / s
	a2 := (v+w)*x/(2*d) + shift
	if a2 < 700 && a1 < 700 && b2 < 26 {
		// Fast path: every factor is representable.
		return 0.5 * (math.Exp(a1)*math.Erfc(b1) + math.Exp(a2)*math.Erfc(b2))
	}
	q := (r*x - v*t) / s
	e := -q*q - mu*t + shift
	var t1 float64
	if b1 >= 0 {
		t1 = math.Exp(e) * Erfcx(b1)
	} else {
		t1 = math.Exp(a1) * math.Erfc(b1)
	}
	t2 := math.Exp(e) * Erfcx(b2)
	return 0.5 * (t1 + t2)
}

// clamp01 guards the documented range [0, 1] of a relative concentration
// against round-off.
func clamp01(c float64) float64 {
	if !(c > 0) {
		return 0
	}
	if c > 1 {
		return 1
	}
	return c
}
