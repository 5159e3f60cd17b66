package numeric

import (
	"errors"
	"fmt"
	"math"
)

// ErrInvalid is wrapped by every error about input out of range.
var ErrInvalid = errors.New("numeric: invalid input")

// ErrBudget is wrapped by the error returned when the grid needed for the
// requested accuracy exceeds the caller's cell budget.
var ErrBudget = errors.New("numeric: cell budget exceeded")

// ErrNotConverged is wrapped when a steady state was asked for and its
// iterative solution did not reach SteadyTolerance within the iteration
// limit.
var ErrNotConverged = errors.New("numeric: steady state not reached")

func invalid(field, format string, args ...any) error {
	return fmt.Errorf("%w: %s: %s", ErrInvalid, field, fmt.Sprintf(format, args...))
}

func checkPositive(field string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return invalid(field, "must be finite and > 0, got %g", v)
	}
	return nil
}

func checkNonNegative(field string, v float64) error {
	if !(v >= 0) || math.IsInf(v, 0) {
		return invalid(field, "must be finite and >= 0, got %g", v)
	}
	return nil
}

func checkRetardation(field string, v float64) error {
	if !(v >= 1) || math.IsInf(v, 0) {
		return invalid(field, "must be finite and >= 1, got %g", v)
	}
	return nil
}

// checkOptional checks a setting where 0 means "use the default" and any other
// value must lie in (lo, hi].
func checkOptional(field string, v, lo, hi float64) error {
	if v == 0 {
		return nil
	}
	if !(v > lo && v <= hi) {
		return invalid(field, "must be 0 (default) or in (%g, %g], got %g", lo, hi, v)
	}
	return nil
}
