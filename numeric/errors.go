package numeric

import (
	"errors"
	"fmt"
)

// ErrInvalid is wrapped by every error about input out of range.
var ErrInvalid = errors.New("numeric: invalid input")

// ErrBudget is wrapped by every budget error (see BudgetError): the grid
// needed for the requested accuracy exceeds the caller's cell budget (its
// text), or the time stepping exceeds the work budget (then ErrWorkBudget
// is wrapped too).
var ErrBudget = errors.New("numeric: cell budget exceeded")

// ErrNotConverged is wrapped when a steady state was asked for and its
// iterative solution did not reach SteadyTolerance within the iteration
// limit.
var ErrNotConverged = errors.New("numeric: steady state not reached")

func invalid(field, format string, args ...any) error {
	return fmt.Errorf("%w: %s: %s", ErrInvalid, field, fmt.Sprintf(format, args...))
}

// ErrWorkBudget is wrapped, together with ErrBudget, by the error returned
// when the time stepping to the requested output times would exceed the
// caller's work budget (cells times time steps, see GridReport.CellSteps).
var ErrWorkBudget = errors.New("numeric: work budget exceeded")

// BudgetKind says which budget a BudgetError is about.
type BudgetKind int

const (
	// BudgetCells: the grid would need more cells than CellBudget.
	BudgetCells BudgetKind = iota
	// BudgetWork: the time stepping would need more cell-steps than
	// WorkBudget.
	BudgetWork
)

// BudgetError is returned when a run is refused, before any work is done,
// because it would exceed a budget. Every count in it was computed in
// float64 from the inputs, so it is exact in magnitude even far beyond the
// range of int. errors.Is(err, ErrBudget) holds for both kinds;
// errors.Is(err, ErrWorkBudget) only for BudgetWork.
type BudgetError struct {
	Kind  BudgetKind
	Field string // the setting that holds the budget, e.g. "Problem3D.WorkBudget"
	// Need is what the run would need and Budget what it may use: cells
	// (BudgetCells) or cell-steps (BudgetWork).
	Need, Budget float64
	// For BudgetWork: Time is the first output time that the budget does
	// not reach and Reach the latest time it reaches (T); both 0 for
	// BudgetCells.
	Time, Reach float64
	// Detail is the explanation after the kind: the field, what is needed,
	// what the budget fits and what to reduce.
	Detail string
}

func (e *BudgetError) Error() string {
	if e.Kind == BudgetWork {
		return ErrWorkBudget.Error() + ": " + e.Detail
	}
	return ErrBudget.Error() + ": " + e.Detail
}

// Unwrap makes errors.Is(err, ErrBudget) hold for every budget error and
// errors.Is(err, ErrWorkBudget) for the work budget.
func (e *BudgetError) Unwrap() []error {
	if e.Kind == BudgetWork {
		return []error{ErrWorkBudget, ErrBudget}
	}
	return []error{ErrBudget}
}

// cellBudgetError is the BudgetError of a grid with need cells.
func cellBudgetError(field string, need float64, budget int, format string, args ...any) error {
	return &BudgetError{Kind: BudgetCells, Field: field, Need: need, Budget: float64(budget),
		Detail: field + ": " + fmt.Sprintf(format, args...)}
}
