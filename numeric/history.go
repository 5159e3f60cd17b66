package numeric

import (
	"math"
)

// History is the time history of the source concentration, relative to C0.
// Duration (T): the source is switched off after it; 0 or +Inf means
// continuous. Depletion (1/T): the source concentration decays as
// exp(-Depletion t); 0 means constant.
//
// Rate and Exponent deplete the source by its mass instead (power-law
// source function, see powerlaw.go): Rate is k = Q C0/M0 (1/T; Q the water
// flux through the source face, volume per time, M0 the dissolvable mass),
// 0 means not depleting by mass; Exponent is Gamma in Cs/C0 = (M/M0)^Gamma,
// in [0, MaxExponent], used only when Rate > 0. Note that its zero value is
// Gamma = 0 (a constant source for 1/Rate), not the exponential Gamma = 1:
// give Exponent: 1 for that. Rate > 0 excludes Depletion > 0; Duration may
// switch the source off earlier than its mass runs out. The long-time limit
// of a depleting source is 0; a source with Exponent > 1 declines only as a
// power of time, so output times far beyond 1/Rate are time stepped (and
// may exceed the work budget) rather than answered with that limit.
type History struct {
	Duration  float64
	Depletion float64
	Rate      float64
	Exponent  float64
}

func (h History) validate(field string) error {
	if !(h.Duration >= 0) { // +Inf allowed
		return invalid(field+".Duration", "must be >= 0 (0 or +Inf: continuous), got %g", h.Duration)
	}
	if err := checkNonNegative(field+".Depletion", h.Depletion); err != nil {
		return err
	}
	return h.validatePower(field)
}

// switchOff is when the source stops: the end of Duration, or the time the
// mass of a power-law source with Exponent < 1 is gone, whichever comes
// first (+Inf: never). It is a break of the time stepping.
func (h History) switchOff() float64 {
	off := math.Inf(1)
	if !(h.Duration == 0 || math.IsInf(h.Duration, 1)) {
		off = h.Duration
	}
	return math.Min(off, h.exhausted())
}

// fades reports whether the long-time limit of the source is 0 (it stops or
// depletes), so that there is no non-zero steady state.
func (h History) fades() bool {
	return h.switchOff() < math.Inf(1) || h.Depletion > 0 || h.Rate > 0
}

// mean is the mean source concentration over the step [t0, t1] (the step
// never straddles the switch-off time).
func (h History) mean(t0, t1 float64) float64 {
	if t0 >= h.switchOff() {
		return 0
	}
	if h.Rate > 0 {
		return h.powerMean(t0, t1)
	}
	k := h.Depletion
	if k == 0 {
		return 1
	}
	dt := t1 - t0
	if k*dt < 1e-8 {
		return math.Exp(-k * 0.5 * (t0 + t1))
	}
	return math.Exp(-k*t0) * -math.Expm1(-k*dt) / (k * dt)
}

// value is the source concentration at time t (for sampling at x = 0).
func (h History) value(t float64) float64 {
	if t > h.switchOff() {
		return 0
	}
	if h.Rate > 0 {
		return h.powerValue(t)
	}
	return math.Exp(-h.Depletion * t)
}
