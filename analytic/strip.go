package analytic

import "math"

// strip returns 1/2 [erf((d+h)c) - erf((d-h)c)]: the fraction of a unit
// Gaussian spread of standard deviation 1/(c sqrt 2) centred at distance d
// (>= 0) from the middle of a strip of half-width h that falls inside the
// strip. It is the transverse factor of the finite-source solutions (d = |y|,
// h = W/2) and, with the water-table image, the vertical one (d = z, h = Z).
// c = +Inf gives the indicator of the strip (1/2 on its edge); h = +Inf
// gives 1.
func strip(d, h, c float64) float64 {
	if math.IsInf(h, 1) {
		return 1
	}
	if math.IsInf(c, 1) {
		switch {
		case d < h:
			return 1
		case d == h:
			return 0.5
		}
		return 0
	}
	if d == 0 {
		// On the axis: erf(hc), one call.
		return math.Erf(h * c)
	}
	a := (d + h) * c
	b := (d - h) * c
	if b >= 0 {
		// Outside the strip: both erf values are near 1 far away, so
		// subtract the complements instead.
		return 0.5 * (math.Erfc(b) - math.Erfc(a))
	}
	return 0.5 * (math.Erf(a) + math.Erf(-b))
}

// stripBound is an upper bound of strip(d, h, c') for every c' >= c.
func stripBound(d, h, c float64) float64 {
	if d > h && !math.IsInf(h, 1) {
		return 0.5 * math.Erfc((d-h)*c)
	}
	return 1
}

// screenBound is an upper bound of stripAverage(top, bot, h, c) for every c
// in [cLow, cHigh].
func screenBound(top, bot, h, cLow, cHigh float64) float64 {
	switch {
	case math.IsInf(h, 1):
		return 1
	case top > h:
		// Every depth of the screen lies below the source: the nearest one
		// bounds the rest, and the bound falls with c.
		return 0.5 * math.Erfc((top-h)*cLow)
	case bot < h:
		// Every depth lies inside: strip rises with c and falls with depth.
		return strip(top, h, cHigh)
	}
	return 1
}

// stripBoundAbove is an upper bound of strip(d, h, c') for every c' <= c.
func stripBoundAbove(d, h, c float64) float64 {
	if d > h || math.IsInf(h, 1) {
		return 1
	}
	return strip(d, h, c)
}

// ierfc returns the first repeated integral of erfc,
// integral_s^inf erfc(u) du = exp(-s^2)/sqrt(pi) - s erfc(s), for s >= 0,
// without the cancellation of that formula at large s.
func ierfc(s float64) float64 {
	if s < erfTableLo {
		return math.Exp(-s*s)*invSqrtPi - s*math.Erfc(s)
	}
	if s < 8 {
		return math.Exp(-s*s) * (invSqrtPi - s*erfcxFast(s))
	}
	// 1/sqrt(pi) - s erfcx(s) = 1/sqrt(pi) sum_{k>=1} (-1)^(k+1) (2k-1)!!/(2s^2)^k.
	r := 1 / (2 * s * s)
	term, sum := r, r
	for k := 2; k < 40; k++ {
		term *= -float64(2*k-1) * r
		sum += term
		if math.Abs(term) < 1e-17*sum {
			break
		}
	}
	return math.Exp(-s*s) * invSqrtPi * sum
}

// stripAverage returns the mean of strip(z, h, c) over z in [z1, z2]
// (0 <= z1 <= z2): the depth average of the vertical factor over a well
// screen. With G(s) = |s| + ierfc(|s|), an antiderivative of erf(s),
//
//	mean = [G(c(z2+h)) - G(c(z1+h)) - G(c(z2-h)) + G(c(z1-h))] / (2 c (z2-z1)).
//
// Where the screen is short against the spread (c (z2-z1) < 0.05) the
// differences would cancel, and a 4-point Gauss-Legendre rule in z (error
// below 1e-13 there) is used instead.
func stripAverage(z1, z2, h, c float64) float64 {
	if z2 <= z1 {
		return strip(z1, h, c)
	}
	if math.IsInf(h, 1) {
		return 1
	}
	if math.IsInf(c, 1) || c*(z2-z1) < 0.05 {
		if math.IsInf(c, 1) {
			// Sharp limit: the fraction of the screen inside the source.
			in := math.Min(z2, h) - math.Min(z1, h)
			return in / (z2 - z1)
		}
		m, r := (z1+z2)/2, (z2-z1)/2
		var s float64
		for i, xi := range gl4Nodes {
			s += gl4Weights[i] * strip(m+r*xi, h, c)
		}
		return s / 2
	}
	// Linear parts of G: |c(z+h)| - |c(z-h)| evaluated exactly, then the
	// small ierfc corrections. The linear part is written for each position
	// of the screen against the source bottom h so that it is exactly 0 for
	// a screen wholly below the source: the difference (z2-z1) -
	// ((z2-h) - (z1-h)) would leave a rounding error of order 1e-16 that
	// swamps the true value there, which falls like exp(-c^2 (z1-h)^2).
	var lin float64
	switch {
	case z1 >= h:
		lin = 0
	case z2 <= h:
		lin = 2 * (z2 - z1)
	default:
		lin = 2 * (h - z1)
	}
	corr := ierfc(c*(z2+h)) - ierfc(c*(z1+h)) - ierfc(c*math.Abs(z2-h)) + ierfc(c*math.Abs(z1-h))
	v := (c*lin + corr) / (2 * c * (z2 - z1))
	if v < 0 {
		return 0
	}
	return math.Min(v, 1)
}

// 4-point Gauss-Legendre rule on [-1, 1] (Abramowitz & Stegun 1964, table 25.4).
var (
	gl4Nodes   = [4]float64{-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526}
	gl4Weights = [4]float64{0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538}
)

// stripFactor is strip (or, over a well screen, stripAverage) of one
// receptor against one source dimension as a function of sigma, where the
// spread parameter is c = k sigma: the products of the edges with k and
// the case (on the axis, inside, on the edge, outside, a screen) are fixed
// once so that each evaluation costs only its error functions.
type stripFactor struct {
	kind   int
	a, b   float64 // coefficients of sigma in the error-function arguments
	c      float64 // a^2 - b^2 (kind factorOutsideScaled)
	z1, z2 float64 // screen ends (kind factorScreen)
	h, k   float64 // strip half-width and ratio (kind factorScreen)
}

const (
	factorOne     = iota // the factor is 1 (infinite source, or k = 0)
	factorAxis           // d = 0: erf(a sigma)
	factorInside         // d < h: [erf(a sigma) + erf(b sigma)]/2
	factorOutside        // d > h: [erfc(b sigma) - erfc(a sigma)]/2
	factorEdge           // d = h: erf(a sigma)/2
	factorScreen         // stripAverage(z1, z2, h, k sigma)
	// factorOutsideScaled: d > h, the factor times exp((b sigma)^2),
	// [erfcx(b sigma) - erfcx(a sigma) exp(-c sigma^2)]/2 with c = a^2 - b^2
	// (a tilted kernel, see kernel3D.tilted).
	factorOutsideScaled
)

// newStripFactor returns the factor strip(d, h, k sigma) averaged over
// [d, d2] (d2 <= d: the point d), for d >= 0, h > 0 and k >= 0; k = 0 or an
// infinite h gives the factor 1.
func newStripFactor(d, d2, h, k float64) stripFactor {
	switch {
	case k == 0 || math.IsInf(h, 1):
		return stripFactor{kind: factorOne}
	case d2 > d:
		return stripFactor{kind: factorScreen, z1: d, z2: d2, h: h, k: k}
	case d == 0:
		return stripFactor{kind: factorAxis, a: h * k}
	case d < h:
		return stripFactor{kind: factorInside, a: (d + h) * k, b: (h - d) * k}
	case d > h:
		return stripFactor{kind: factorOutside, a: (d + h) * k, b: (d - h) * k}
	}
	return stripFactor{kind: factorEdge, a: 2 * h * k}
}

// outsideRate returns b^2 for a factor outside the strip (it falls like
// exp(-b^2 sigma^2) with sigma), and 0 for the others.
func (f *stripFactor) outsideRate() float64 {
	if f.kind == factorOutside {
		return f.b * f.b
	}
	return 0
}

// scaledBy returns the factor as a function of sigma' = t sigma: its
// coefficients divided by t, and a factor outside the strip as
// factorOutsideScaled.
func (f stripFactor) scaledBy(t float64) stripFactor {
	f.a /= t
	f.b /= t
	f.k /= t
	if f.kind == factorOutside {
		f.kind = factorOutsideScaled
		f.c = (f.a - f.b) * (f.a + f.b)
	}
	return f
}

// scaledBound is an upper bound of a factorOutsideScaled factor at every
// sigma >= sig: erfcx(b sigma)/2, which falls with sigma (the term
// subtracted from it is positive).
func (f *stripFactor) scaledBound(sig float64) float64 {
	return 0.5 * erfcxFast(f.b*sig) * (1 + 1e-14)
}

// at returns the factor at sigma > 0 (with erfFast and erfcFast: within a
// few units of 1e-16 of strip).
func (f *stripFactor) at(sig float64) float64 {
	switch f.kind {
	case factorAxis:
		return erfFast(f.a * sig)
	case factorInside:
		return 0.5 * (erfFast(f.a*sig) + erfFast(f.b*sig))
	case factorOutside:
		return 0.5 * (erfcFast(f.b*sig) - erfcFast(f.a*sig))
	case factorEdge:
		return 0.5 * erfFast(f.a*sig)
	case factorScreen:
		return stripAverage(f.z1, f.z2, f.h, f.k*sig)
	case factorOutsideScaled:
		return 0.5 * (erfcxFast(f.b*sig) - erfcxFast(f.a*sig)*math.Exp(-f.c*sig*sig))
	}
	return 1
}
