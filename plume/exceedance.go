package plume

import (
	"math"

	"downgradient/internal/roots"
)

// monotoneExceedance is firstExceedance for sources that are all constant
// and continuous, where f rises monotonically in t: the crossing of level
// is bracketed from the known samples (the requested times) when they
// straddle it, otherwise by doubling up from the characteristic time and
// halving down, and found to rel in time. With the exact method, whose
// rate is known in closed form, by Newton's method on ln f (see
// logCrossing); otherwise by Brent's method on f.
func (m *model) monotoneExceedance(f func(float64) float64, exact bool, p Point, known timeline, level, rel float64) (float64, bool) {
	lo, clo, hi, chi := 0.0, 0.0, math.Inf(1), math.NaN()
	for i, t := range known.tau {
		if t > 0 && !math.IsInf(t, 1) && known.c[i] >= level && t < hi {
			hi, chi = t, known.c[i]
		}
	}
	for i, t := range known.tau {
		if t > lo && t < hi && known.c[i] < level {
			lo, clo = t, known.c[i]
		}
	}
	if math.IsInf(hi, 1) {
		hi = math.Max(m.charTime(p), lo)
		chi = f(hi)
		for i := 0; chi < level && i < 80; i++ {
			lo, clo = hi, chi
			hi *= 2
			chi = f(hi)
		}
		if chi < level {
			return 0, false // reached only in the limit
		}
	}
	if lo == 0 {
		// Halve down for a lower bracket with a positive time.
		lo = hi / 2
		clo = f(lo)
		for i := 0; clo >= level && i < 200; i++ {
			hi, chi = lo, clo
			lo /= 2
			clo = f(lo)
		}
		if clo >= level {
			return lo, true
		}
	}
	if rate, ok := m.exactRate(p); ok && exact {
		return logCrossing(f, rate, lo, hi, clo, chi, level, rel*hi), true
	}
	g := func(t float64) float64 { return f(t) - level }
	return roots.Brent(g, lo, hi, clo-level, chi-level, rel*hi, 200), true
}

// logCrossing returns the time in [lo, hi] at which the rising f (f(lo) =
// clo < level <= chi = f(hi)) reaches level, to tol: Newton's method on
// ln f - ln level with the derivative rate/f, safeguarded by the bracket
// (roots.NewtonBracketed). On the leading edge of a breakthrough, where
// the crossing of a screening level usually lies, f is convex and Newton
// on f itself creeps up from below and overshoots from above; ln f is
// close to a parabola there (the exponent of the Gaussian front), so the
// steps land close to the root. Values that underflow to 0 count as the
// smallest positive float64.
func logCrossing(f, rate func(float64) float64, lo, hi, clo, chi, level, tol float64) float64 {
	lnLevel := math.Log(level)
	lg := func(c float64) float64 {
		return math.Log(math.Max(c, math.SmallestNonzeroFloat64)) - lnLevel
	}
	// The value at the last point evaluated, and at the bracket ends, so
	// that the derivative rate/f costs no second evaluation of f.
	lastT, lastC := math.NaN(), math.NaN()
	g := func(t float64) float64 {
		lastT, lastC = t, f(t)
		return lg(lastC)
	}
	dg := func(t float64) float64 {
		var c float64
		switch t {
		case lastT:
			c = lastC
		case lo:
			c = clo
		case hi:
			c = chi
		default:
			c = f(t)
		}
		if !(c > 0) {
			return 0 // no Newton step: the bracket's secant instead
		}
		return rate(t) / c
	}
	return roots.NewtonBracketed(g, dg, lo, hi, lg(clo), lg(chi), tol, 200)
}
