package numeric

import "math"

// Input checks shared by Problem1D and Problem3D. Every failed check
// returns an error wrapping ErrInvalid that names the field.

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

// orDefault is v, or d when v is 0 (the "0 means the default" settings
// checked by checkOptional).
func orDefault(v, d float64) float64 {
	if v == 0 {
		return d
	}
	return v
}
