package numeric

import (
	"fmt"
	"math"
)

// Output times: T, ascending, >= 0; +Inf (last) asks for the steady state.

// validateTimes checks that ts is a non-empty, strictly ascending list of
// times >= 0 (+Inf allowed).
func validateTimes(field string, ts []float64) error {
	if len(ts) == 0 {
		return invalid(field, "need at least one output time")
	}
	for i, t := range ts {
		if !(t >= 0) {
			return invalid(fmt.Sprintf("%s[%d]", field, i), "must be >= 0 (+Inf: steady state), got %g", t)
		}
		if i > 0 && !(t > ts[i-1]) {
			return invalid(fmt.Sprintf("%s[%d]", field, i), "times must be strictly ascending: %g follows %g", t, ts[i-1])
		}
	}
	return nil
}

// lastFinite is the last finite output time (0 if none) and whether a
// steady state is asked for.
func lastFinite(ts []float64) (float64, bool) {
	tl := 0.0
	steady := false
	for _, t := range ts {
		if math.IsInf(t, 1) {
			steady = true
		} else {
			tl = t
		}
	}
	return tl, steady
}

// firstPositive is the first output time > 0 (0 if none).
func firstPositive(ts []float64) float64 {
	for _, t := range ts {
		if t > 0 {
			return t
		}
	}
	return 0
}
