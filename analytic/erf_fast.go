package analytic

import "math"

// erfFast and erfcFast are erf and erfc for x >= 0 at the cost of at most
// one exponential: on [0.84375, 6] (erf) and [0.84375, 27] (erfc) they
// evaluate the Chebyshev interpolants of erf and erfcx of erf_table.go
// (generated with mpmath by testdata/reference/gen_erf_table.py), where
// math.Erf and math.Erfc spend two exponentials; below 0.84375 they are
// math.Erf and math.Erfc, whose polynomials there are cheap. They serve
// the transverse factors of the exact 3D integrand, which are evaluated
// dozens of times per value. Accuracy, checked against 60-digit mpmath
// values by TestErfFast: erfFast within 3e-16 absolute, erfcFast within
// 3e-15 relative (the rounding of exp(-x^2) is compensated).

const erfTableLo = 0.84375

// erfFast returns erf(x) for x >= 0.
func erfFast(x float64) float64 {
	switch {
	case !(x >= erfTableLo): // also NaN
		return math.Erf(x)
	case x >= 6:
		// erf(6) = 1 - 2.2e-17 rounds to 1.
		return 1
	}
	i, t := erfPiece(x)
	return poly10(&erfPieces[i], t)
}

// erfcFast returns erfc(x) for x >= 0.
func erfcFast(x float64) float64 {
	if !(x >= erfTableLo) { // also NaN
		return math.Erfc(x)
	}
	hi := x * x
	if hi > 750 {
		return 0 // exp(-x^2) is below the smallest subnormal
	}
	e := math.Exp(-hi) * (1 - math.FMA(x, x, -hi))
	return e * erfcxTable(x)
}

// erfcxFast returns erfcx(x) = exp(x^2) erfc(x) for x >= 0, without an
// exponential from 0.84375 up (the tables of erfcFast); below, one.
func erfcxFast(x float64) float64 {
	if !(x >= erfTableLo) { // also NaN
		return expSquare(x) * math.Erfc(x)
	}
	return erfcxTable(x)
}

// erfcxTable returns erfcx(x) for x >= 0.84375 from the interpolants.
func erfcxTable(x float64) float64 {
	if x < 6 {
		i, t := erfPiece(x)
		return poly10(&erfcxPieces[i], t)
	}
	if x >= 27 {
		return erfcxAsymptotic(x)
	}
	// x erfcx(x) in y = 6/x on [6/27, 1].
	const c, r = (1 + 6.0/27) / 2, (1 - 6.0/27) / 2
	return polyTail(6/x-c, r) / x
}

// erfPiece returns the piece of the tables holding x in [0.84375, 6) and
// the variable t in [-1, 1] of that piece.
func erfPiece(x float64) (int, float64) {
	s := (x - erfTableLo) * 4
	i := int(s)
	if i > len(erfPieces)-1 {
		i = len(erfPieces) - 1
	}
	return i, 2*(s-float64(i)) - 1
}

// poly10 evaluates c[0] + c[1] t + ... + c[10] t^10 by Estrin's scheme.
func poly10(c *[11]float64, t float64) float64 {
	t2 := t * t
	t4 := t2 * t2
	b0 := (c[0] + c[1]*t) + (c[2]+c[3]*t)*t2
	b1 := (c[4] + c[5]*t) + (c[6]+c[7]*t)*t2
	b2 := (c[8] + c[9]*t) + c[10]*t2
	return b0 + (b1+b2*t4)*t4
}

// polyTail evaluates erfcxTail at t = d/r.
func polyTail(d, r float64) float64 {
	t := d / r
	c := &erfcxTail
	t2 := t * t
	t4 := t2 * t2
	b0 := (c[0] + c[1]*t) + (c[2]+c[3]*t)*t2
	b1 := (c[4] + c[5]*t) + (c[6]+c[7]*t)*t2
	b2 := (c[8] + c[9]*t) + (c[10]+c[11]*t)*t2
	return b0 + (b1+(b2+c[12]*t4)*t4)*t4
}
