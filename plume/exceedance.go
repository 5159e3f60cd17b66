package plume

import (
	"math"

	"downgradient/analytic"
	"downgradient/internal/roots"
)

// monotoneExceedance is firstExceedance for sources that are all constant
// and continuous, where f rises monotonically in t: the crossing of level
// is bracketed from the known samples (the requested times) when they
// straddle it, otherwise by doubling up from the characteristic time and
// halving down, and found to rel in time. With the exact method, whose
// rate is known in closed form, by Newton's method (see crossing);
// otherwise by Brent's method on f. steady is f at t = +Inf.
func (m *model) monotoneExceedance(f func(float64) float64, exact bool, p Point, known timeline, level, steady, rel float64) (float64, bool) {
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
		return crossing(f, rate, lo, hi, clo, chi, level, steady, rel*hi), true
	}
	g := func(t float64) float64 { return f(t) - level }
	return roots.Brent(g, lo, hi, clo-level, chi-level, rel*hi, 200), true
}

// logCrossing returns the time in [lo, hi] at which the rising f (f(lo) =
// clo < level <= chi = f(hi)) reaches level, to tol: Newton's method on
// ln f - ln level with the derivative rate/f (see newtonOnTransform). On
// the leading edge of a breakthrough, where the crossing of a screening
// level usually lies, f is convex and Newton on f itself creeps up from
// below and overshoots from above; ln f is close to a parabola there (the
// exponent of the Gaussian front), so the steps land close to the root.
// Values below the smallest normal float64 count as it (math.Log is wrong
// on subnormals on amd64: about -709 for every one of them).
func logCrossing(f, rate func(float64) float64, lo, hi, clo, chi, level, tol float64) float64 {
	ln := func(c float64) float64 { return math.Log(math.Max(c, smallestNormal)) }
	perC := func(c float64) float64 { return 1 / c }
	return newtonOnTransform(f, rate, ln, perC, lo, hi, clo, chi, level, tol)
}

// crossing returns the time in [lo, hi] at which the rising f (f(lo) =
// clo < level <= chi = f(hi)) reaches level, to tol, by Newton's method on
// the probit of the breakthrough, w = erfcinv(2 f/steady), with its
// derivative from the rate: on the rising limb of a breakthrough f/steady
// is close to erfc(z)/2 with z close to linear in time, so w is close to
// linear and Newton's method needs two or three steps from anywhere in the
// bracket (the demo's two searches: 9 evaluations, against 13 on ln f and
// 17 on f itself). Where the steady state is not above the level, or not
// finite, logCrossing instead. w is kept finite: 2 f/steady is clamped to
// at most 2 - 2^-51 here and at least the smallest normal float64 in
// probit.
func crossing(f, rate func(float64) float64, lo, hi, clo, chi, level, steady, tol float64) float64 {
	if !(steady > level) || math.IsInf(steady, 1) {
		return logCrossing(f, rate, lo, hi, clo, chi, level, tol)
	}
	w := func(c float64) float64 { return probit(math.Min(2*c/steady, 2-0x1p-51)) }
	minusW := func(c float64) float64 { return -w(c) } // rising with c
	// d/dc -erfcinv(2c/steady) = (sqrt(pi)/2) exp(w^2) (2/steady); an
	// overflow to +Inf gives a zero Newton step, which the bracket refuses.
	slope := func(c float64) float64 {
		wc := w(c)
		return math.Sqrt(math.Pi) * math.Exp(wc*wc) / steady
	}
	return newtonOnTransform(f, rate, minusW, slope, lo, hi, clo, chi, level, tol)
}

// newtonOnTransform returns the time in [lo, hi] at which the rising f
// (f(lo) = clo < level <= chi = f(hi)) reaches level, to tol: Newton's
// method on h(f(t)) - h(level), h rising, with the derivative
// dh(f(t)) rate(t), safeguarded by the bracket (roots.NewtonBracketed).
// The value of f at the last point evaluated and at the bracket ends is
// kept, so that the derivative costs no second evaluation of f.
func newtonOnTransform(f, rate, h, dh func(float64) float64, lo, hi, clo, chi, level, tol float64) float64 {
	hLevel := h(level)
	lastT, lastC := math.NaN(), math.NaN()
	g := func(t float64) float64 {
		lastT, lastC = t, f(t)
		return h(lastC) - hLevel
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
		return dh(c) * rate(t)
	}
	return roots.NewtonBracketed(g, dg, lo, hi, h(clo)-hLevel, h(chi)-hLevel, tol, 200)
}

// probit returns erfcinv(y) for y in (0, 2), smooth and strictly monotone
// to a few units of rounding over the whole range: math.Erfcinv computes
// erfinv(1 - y), which drops y's digits below about 1e-3 (and is +Inf
// below 1.1e-16); there w is refined by Newton's method on
// ln erfc(w) = ln y, with ln erfc(w) = ln erfcx(w) - w^2, from the
// asymptotic w^2 = L - ln(pi L)/2, L = -ln y. y below the smallest
// normal float64 (and 0) counts as it: erfcinv(2.2e-308) = 26.54.
func probit(y float64) float64 {
	if y > 1 {
		return -probit(2 - y)
	}
	y = math.Max(y, smallestNormal)
	if y >= 1e-3 {
		return math.Erfcinv(y)
	}
	l := -math.Log(y)
	w := math.Sqrt(l - 0.5*math.Log(math.Pi*l))
	for range 8 {
		e := analytic.Erfcx(w)
		step := (math.Log(e) - w*w + l) * math.Sqrt(math.Pi) * e / 2
		w += step
		if math.Abs(step) <= 1e-15*w {
			break
		}
	}
	return w
}

// smallestNormal is the smallest normal float64, 2^-1022.
const smallestNormal = 0x1p-1022
