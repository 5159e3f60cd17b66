package analytic

import "math"

// Power-law depletion of a source by its mass (Falta, Rao & Basu 2005,
// J. Contam. Hydrol. 78:259-280).
//
// The source holds a dissolvable mass M (initially M0); the water flowing
// through its face, Q (volume per time), carries away Q Cs, and the source
// concentration follows the mass as Cs/C0 = (M/M0)^Gamma. With m = M/M0
// and the depletion rate k = Q C0/M0 (1/T, History.Rate) the mass balance
// dM/dt = -Q Cs is dm/dt = -k m^Gamma, m(0) = 1, whose solution is
//
//	Gamma = 1:  m = exp(-k s),                         Cs/C0 = exp(-k s)
//	Gamma != 1: m = u^(1/(1-Gamma)), u = 1 - (1-Gamma) k s,
//	            Cs/C0 = u^(Gamma/(1-Gamma))            while u > 0,
//
// s the time since the source started. For Gamma < 1 the mass is gone at
// s = 1/((1-Gamma) k) and Cs = 0 after it (Gamma = 0: a constant source of
// duration 1/k); for Gamma > 1 the source declines like
// s^(-Gamma/(Gamma-1)) and is never exhausted.
//
// The evaluators reduce a power-law history to the forms they already
// know where it is one (normalized): Gamma = 1 is the exponential
// Depletion = Rate, and a source with Gamma < 1 stops at its exhaustion
// time (a Duration). Otherwise the source concentration at the time of
// emission weights the pulse response in the time integrals (Exact3DAt,
// OgataBanksAt) and multiplies the continuing source's value in DomenicoAt.

// MaxExponent is the largest power-law exponent (History.Exponent) the
// evaluators take; larger values are treated as MaxExponent. The mass
// balance holds for any Gamma >= 0; the bound keeps the powers far from
// overflow.
const MaxExponent = 10

// normalized returns h in the form the evaluators use: Rate > 0 only for a
// power law that is neither exponential nor constant (Gamma not 0 or 1),
// with Exponent in (0, MaxExponent]; Gamma = 1 as Depletion = Rate;
// Gamma < 1 with Duration cut to the exhaustion time (Gamma = 0: that
// Duration alone). Rate > 0 replaces Depletion.
func (h History) normalized() History {
	if !(h.Rate > 0) {
		h.Rate, h.Exponent = 0, 0
		return h
	}
	h.Rate = math.Min(h.Rate, math.MaxFloat64)
	g := h.exponent()
	h.Exponent, h.Depletion = g, 0
	if g == 1 {
		h.Depletion, h.Rate, h.Exponent = h.Rate, 0, 0
		return h
	}
	if g < 1 {
		ex := 1 / ((1 - g) * h.Rate)
		if !(ex > 0) {
			ex = math.SmallestNonzeroFloat64
		}
		if !h.finite() || ex < h.Duration {
			h.Duration = ex
		}
		if g == 0 {
			h.Rate, h.Exponent = 0, 0
		}
	}
	return h
}

// exponent is Gamma clamped to [0, MaxExponent] (NaN: 1).
func (h History) exponent() float64 {
	g := h.Exponent
	switch {
	case math.IsNaN(g):
		return 1
	case g < 0:
		return 0
	case g > MaxExponent:
		return MaxExponent
	}
	return g
}

// power reports a normalized power-law history (Rate > 0).
func (h History) power() bool { return h.Rate > 0 }

// fades reports whether the source of a normalized history stops or
// declines, so that its steady state is 0.
func (h History) fades() bool { return h.Depletion > 0 || h.finite() || h.power() }

// powerFraction is Cs/C0 at time s >= 0 since the start of a normalized
// power-law history (Rate > 0, Gamma in (0, 1) or (1, MaxExponent]),
// ignoring Duration: u^(Gamma/(1-Gamma)) with u = 1 - (1-Gamma) k s,
// formed as exp(Gamma/(1-Gamma) log1p(-(1-Gamma) k s)); 0 once u <= 0.
func (h History) powerFraction(s float64) float64 {
	g := h.Exponent
	a := -(1 - g) * h.Rate * s
	if !(a > -1) {
		return 0
	}
	return math.Exp(g / (1 - g) * math.Log1p(a))
}

// Fraction is the source concentration relative to C0, Cs/C0, at time s
// since the source started: 0 before the start and after the source
// stopped (Duration) or its mass ran out, else exp(-Depletion s) or the
// power law. s = +Inf gives the long-time value (0 for a source that
// fades, else 1).
func (h History) Fraction(s float64) float64 {
	h = h.normalized()
	switch {
	case !(s >= 0):
		return 0
	case h.finite() && s > h.Duration:
		return 0
	case math.IsInf(s, 1):
		if h.fades() {
			return 0
		}
		return 1
	case h.power():
		return h.powerFraction(s)
	case h.Depletion > 0:
		return math.Exp(-h.Depletion * s)
	}
	return 1
}

// MassFraction is the source's remaining dissolvable mass relative to its
// initial mass, M/M0, at time s >= 0 since the start of a power-law
// history (Rate > 0): exp(-k s) for Gamma = 1, u^(1/(1-Gamma)) otherwise
// (0 once exhausted). Duration does not enter (a source switched off
// keeps its mass). 1 without a Rate.
func (h History) MassFraction(s float64) float64 {
	if !(h.Rate > 0) || !(s > 0) {
		return 1
	}
	g, k := h.exponent(), math.Min(h.Rate, math.MaxFloat64)
	if g == 1 {
		return math.Exp(-k * s)
	}
	a := -(1 - g) * k * s
	if !(a > -1) {
		return 0
	}
	return math.Exp(math.Log1p(a) / (1 - g))
}

// Exhausted is the time since the start at which a power-law source's
// mass is gone, 1/((1-Gamma) k) for Gamma < 1; +Inf when it never is
// (Gamma >= 1, or no Rate). Duration does not enter.
func (h History) Exhausted() float64 {
	g := h.exponent()
	if !(h.Rate > 0) || g >= 1 {
		return math.Inf(1)
	}
	return 1 / ((1 - g) * math.Min(h.Rate, math.MaxFloat64))
}

// TimeBelow is the time since the start from which the source
// concentration stays below the fraction f of C0 (the source declines
// monotonically, so this is when Cs/C0 reaches f): 0 for f > 1 (the source
// starts below it); the time the source stops or its mass runs out if
// that comes first; +Inf when the source never falls below f (a constant
// source, or f <= 0). The power law inverts in closed form:
// s = (1 - f^((1-Gamma)/Gamma)) / ((1-Gamma) k), formed with expm1.
func (h History) TimeBelow(f float64) float64 {
	h = h.normalized()
	switch {
	case !(f > 0):
		return math.Inf(1)
	case f > 1:
		return 0
	}
	s := math.Inf(1)
	switch {
	case h.power():
		g := h.Exponent
		s = -math.Expm1((1-g)/g*logSub(f)) / ((1 - g) * h.Rate)
	case h.Depletion > 0:
		s = -logSub(f) / h.Depletion
	}
	if h.finite() {
		s = math.Min(s, h.Duration)
	}
	return s
}
