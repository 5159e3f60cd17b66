package numeric

// Work budgets. The work of a run is its cells times its time steps
// (GridReport.CellSteps); it is counted in float64 from the inputs before
// the first step, and a run that would exceed its budget is refused with a
// BudgetError (ErrWorkBudget) that says which output time the budget
// reaches. Measured throughput on a 2-core test machine: about 3e7
// cell-steps/s in 1D and 6e7 in 3D (BenchmarkSolve1D, BenchmarkSolve3D),
// so the defaults are a little over a minute of stepping there; a caller
// with a deadline should pass a budget derived from it.
const (
	DefaultWorkBudget1D = 2e9
	DefaultWorkBudget3D = 4e9
	// maxWorkBudget is the largest budget accepted: every step count below
	// it is exact in float64 and fits an int.
	maxWorkBudget = 1e15
)
