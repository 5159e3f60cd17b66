package numeric

import "math"

// SteadyBudget is the mass budget of a steady state, in rates: mass per unit
// time (porosity-scaled and per area scale as MassBudget), for the
// concentrations relative to the source. At steady state what comes in
// leaves through the outflow face or decays: In = Outflow + Decayed.
type SteadyBudget struct {
	InletAdvective  float64 // carried in through the inlet by advection
	InletDispersive float64 // carried in through the inlet by dispersion
	In              float64 // InletAdvective + InletDispersive
	Outflow         float64 // carried out through the outflow face
	Decayed         float64 // removed by first-order decay
	Stored          float64 // mass in the domain at steady state (not a rate)
	// ClosureError is |In - Outflow - Decayed| / In; the steady solver
	// iterates until it is at most SteadyTolerance.
	ClosureError float64
}

// SteadyTolerance is the convergence criterion of the steady solvers: the
// sum over the cells of the absolute mass-balance residual (net inflow minus
// decay, a rate) relative to the mass inflow rate. It bounds the closure
// error of the steady budget.
const SteadyTolerance = 1e-12

// steadyMaxIter bounds the iterations of the steady solvers.
const steadyMaxIter = 2000

// steadyStats describes the iterative solution of a steady state.
type steadyStats struct {
	iterations int
	residual   float64 // final relative residual
	budget     SteadyBudget
}

func (b *SteadyBudget) close(scale float64) {
	b.InletAdvective *= scale
	b.InletDispersive *= scale
	b.Outflow *= scale
	b.Decayed *= scale
	b.Stored *= scale
	b.In = b.InletAdvective + b.InletDispersive
	if b.In > 0 {
		b.ClosureError = math.Abs(b.In-b.Outflow-b.Decayed) / b.In
	}
}
