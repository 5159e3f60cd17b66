package numeric

import (
	"math"
)

// History is the time history of the source concentration, relative to C0.
// Duration (T): the source is switched off after it; 0 or +Inf means
// continuous. Depletion (1/T): the source concentration decays as
// exp(-Depletion t); 0 means constant.
type History struct {
	Duration  float64
	Depletion float64
}

func (h History) validate(field string) error {
	if !(h.Duration >= 0) { // +Inf allowed
		return invalid(field+".Duration", "must be >= 0 (0 or +Inf: continuous), got %g", h.Duration)
	}
	return checkNonNegative(field+".Depletion", h.Depletion)
}

func (h History) switchOff() float64 {
	if h.Duration == 0 || math.IsInf(h.Duration, 1) {
		return math.Inf(1)
	}
	return h.Duration
}

// mean is the mean source concentration over the step [t0, t1] (the step
// never straddles the switch-off time).
func (h History) mean(t0, t1 float64) float64 {
	if t0 >= h.switchOff() {
		return 0
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
	return math.Exp(-h.Depletion * t)
}
