package analytic

import "math"

const invSqrtPi = 0.5641895835477562869480794515607725858441 // 1/sqrt(pi)

// Erfcx returns the scaled complementary error function exp(x*x)*erfc(x).
//
// It is finite for every x above about -26.6 (below that exp(x*x)*2
// overflows and +Inf is returned) and keeps full relative accuracy for large
// positive x, where erfc(x) itself underflows: Erfcx(1e6) = 5.64e-7.
//
// Method: for |x| < 26 the product exp(x*x)*erfc(x) is formed with x*x split
// exactly into a rounded part and its rounding error (by a fused multiply-add),
// so the exponential carries no error from squaring; for x >= 26 the
// asymptotic series sum_k (-1)^k (2k-1)!! / (2x^2)^k / (x sqrt(pi)), whose
// terms fall by a factor of at least 1.3e-3 each, is summed to round-off.
func Erfcx(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return x
	case x >= 26:
		return erfcxAsymptotic(x)
	case x < -26.7:
		return math.Inf(1)
	}
	return expSquare(x) * math.Erfc(x)
}

// expSquare returns exp(x*x) with the rounding error of the square removed.
func expSquare(x float64) float64 {
	hi := x * x
	lo := math.FMA(x, x, -hi)
	return math.Exp(hi) * (1 + lo)
}

// erfcxAsymptotic sums the asymptotic expansion of erfcx for x >= 26.
func erfcxAsymptotic(x float64) float64 {
	if x > 1e8 {
		// The first correction, 1/(2x^2), is below round-off.
		return invSqrtPi / x
	}
	r := 1 / (2 * x * x)
	sum, term := 1.0, 1.0
	for k := 1; k < 30; k++ {
		term *= -float64(2*k-1) * r
		sum += term
		if math.Abs(term) < 1e-17*sum {
			break
		}
	}
	return invSqrtPi / x * sum
}

// ExpErfc returns exp(a)*erfc(b) without overflow or spurious underflow in
// the factors: exp(a) may be far above the float64 range while erfc(b) is far
// below it, as in the second term of the Ogata-Banks solution at high Peclet
// numbers. The result is +Inf only when the product itself overflows.
//
// For b > 0 it forms exp(a - b*b)*Erfcx(b); the caller who can write a - b*b
// in closed form without cancellation should do so and use Erfcx directly,
// because a - b*b computed here loses absolute accuracy of order
// max(|a|, b*b)*2^-53.
func ExpErfc(a, b float64) float64 {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.NaN()
	}
	if b <= 0 {
		// erfc(b) lies in [1, 2]: no scaling is needed.
		return math.Exp(a) * math.Erfc(b)
	}
	if b < 26 && a < 700 && a > -700 {
		return math.Exp(a) * math.Erfc(b)
	}
	hi := b * b
	lo := math.FMA(b, b, -hi)
	return math.Exp(a-hi-lo) * Erfcx(b)
}
