package numeric

import (
	"errors"
	"fmt"
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
