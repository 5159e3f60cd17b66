package numeric

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// Inlet is the boundary condition at the inlet face x = 0 of the 1D column.
type Inlet int

const (
	// InletConcentration holds the concentration at x = 0 at the source
	// value (first-type, Dirichlet).
	InletConcentration Inlet = iota
	// InletFlux fixes the total flux V C - D dC/dx at x = 0 to V times the
	// source value (third-type, Cauchy); no dispersive flux crosses the inlet.
	InletFlux
)

// DefaultCellBudget1D is the cell budget of Screen1D when none is given.
const DefaultCellBudget1D = 1_000_000

// Problem1D is a column or streamtube along x >= 0 with cross-section A(x).
// The volumetric flow Q = V A(0) is the same through every section, so the
// seepage velocity is v(x) = V A(0)/A(x) and the dispersion coefficient is
// D(x) = Dm + (Dx - Dm) A(0)/A(x) (mechanical dispersion alpha v plus
// molecular diffusion Dm). Units: L for length, T for time; concentrations
// relative to the source.
type Problem1D struct {
	V  float64 // seepage velocity at the inlet x = 0, L/T, > 0
	Dx float64 // dispersion coefficient at the inlet (unretarded), L^2/T, > 0
	Dm float64 // molecular-diffusion part of Dx, L^2/T, 0 <= Dm <= Dx (matters only when Area varies)
	R  float64 // retardation factor, >= 1
	Mu float64 // decay rate of the dissolved concentration in the retarded equation, 1/T, >= 0

	Inlet   Inlet   // first-type (default) or third-type inlet
	History History // source history (default: continuous, constant)
	// Area is the cross-sectional area at x (any consistent unit), finite and
	// > 0 on the domain; nil means a uniform column. Examples: a widening
	// streamtube A = A0 (1 + x/a), radial flow A = 2 pi (r0 + x) b.
	Area func(x float64) float64

	Receptors []float64 // positions x of the receptors, L, >= 0
	Times     []float64 // output times, T, ascending, >= 0; +Inf (last) asks for the steady state

	// Grid, when it has faces, is used as given (Faces[0] = 0); otherwise
	// the grid is designed automatically (uniform, spacing from PecletMax,
	// the first output time and Refine; length from the receptors, the
	// travel distance and the outflow boundary layer).
	Grid       Axis
	CellBudget int // largest number of cells allowed; 0: DefaultCellBudget1D
	// WorkBudget is the largest work allowed, cells times time steps
	// (GridReport.CellSteps), in (0, 1e15]; 0: DefaultWorkBudget1D.
	WorkBudget float64
	Courant    float64 // largest V dt/(R dx), in (0, 1]; 0: 1
	PecletMax  float64 // largest grid Peclet number V dx/Dx of the automatic grid, in (0, 100]; 0: 2
	Refine     float64 // divides the automatic spacing (convergence studies), in (0, 1000]; 0: 1
}

// Result1D holds the concentrations at the receptors, the grid and the mass
// budget. Budget covers the time stepping to the last finite output time
// (all zero when only the steady state was asked for).
type Result1D struct {
	C      [][]float64 // C/C0 at receptor r and output time k: C[r][k]
	Grid   GridReport
	Budget MassBudget
	// SteadyBudget is the budget (in rates) of the steady state when one
	// was asked for (Times ending with +Inf) and the source is constant;
	// nil otherwise.
	SteadyBudget *SteadyBudget
	// Centers and Final are the cell centres (L) and the concentrations
	// (C/C0) in them at the end of the run (the steady state when one was
	// asked for).
	Centers []float64
	Final   []float64
}

func (p *Problem1D) validate() error {
	const pre = "Problem1D."
	if err := checkPositive(pre+"V", p.V); err != nil {
		return err
	}
	if err := checkPositive(pre+"Dx", p.Dx); err != nil {
		return err
	}
	if !(p.Dm >= 0 && p.Dm <= p.Dx) {
		return invalid(pre+"Dm", "must be in [0, Dx = %g], got %g", p.Dx, p.Dm)
	}
	if err := checkRetardation(pre+"R", p.R); err != nil {
		return err
	}
	if err := checkNonNegative(pre+"Mu", p.Mu); err != nil {
		return err
	}
	if p.Inlet != InletConcentration && p.Inlet != InletFlux {
		return invalid(pre+"Inlet", "must be InletConcentration (0) or InletFlux (1), got %d", p.Inlet)
	}
	if err := p.History.validate(pre + "History"); err != nil {
		return err
	}
	if len(p.Receptors) == 0 {
		return invalid(pre+"Receptors", "need at least one receptor")
	}
	for i, x := range p.Receptors {
		if !(x >= 0) || math.IsInf(x, 0) {
			return invalid(fmt.Sprintf("%sReceptors[%d]", pre, i), "must be finite and >= 0 (x < 0 is upgradient of the inlet), got %g", x)
		}
	}
	if err := validateTimes(pre+"Times", p.Times); err != nil {
		return err
	}
	if p.CellBudget < 0 {
		return invalid(pre+"CellBudget", "must be 0 (default %d) or > 0, got %d", DefaultCellBudget1D, p.CellBudget)
	}
	if err := checkOptional(pre+"WorkBudget", p.WorkBudget, 0, maxWorkBudget); err != nil {
		return err
	}
	if err := checkOptional(pre+"Courant", p.Courant, 0, 1); err != nil {
		return err
	}
	if err := checkOptional(pre+"PecletMax", p.PecletMax, 0, 100); err != nil {
		return err
	}
	if err := checkOptional(pre+"Refine", p.Refine, 0, 1000); err != nil {
		return err
	}
	if len(p.Grid.Faces) > 0 {
		if err := p.Grid.validate(pre + "Grid"); err != nil {
			return err
		}
		for i, x := range p.Receptors {
			if x > p.Grid.Length() {
				return invalid(fmt.Sprintf("%sReceptors[%d]", pre, i), "x = %g lies beyond the end of the given grid (%g)", x, p.Grid.Length())
			}
		}
	}
	return nil
}

// Early-time resolution of the automatic grid. The value at output time
// t_k carries the errors of the steps before it, and near the inlet the
// split steps make an error of order dt (see column), so every requested
// time is resolved: at least stepsPerOutput steps up to each output time
// (dt <= t_k/stepsPerOutput on the stretch ending at t_k, on top of the
// Courant limit) and resolvedPerSpread cells per spreading length
// sqrt(2 Dx t1/R) at the first output time. Measured on 14 early-time
// cases against Ogata-Banks (TestEarlyTimes1D): worst 3.3 % where
// C/C0 > 1e-3 (27 % before at v 0.3 m/d, Dx 3 m^2/d, x 20 m, t 10 d,
// with 4 cells per spreading length and steps of the Courant limit only).
// When that grid exceeds the cell or work budget, the coarser design of
// basePerSpread cells and steps of the Courant limit is used instead.
const (
	stepsPerOutput    = 32
	resolvedPerSpread = 10
	basePerSpread     = 4
)

// Screen1D solves the column problem and returns the concentrations at the
// receptors at the output times, the grid report and the mass budget. The
// work is counted before the first step and checked against WorkBudget;
// output times at which the field has reached its long-time limit are
// answered with it directly (see settle.go; only for a uniform column,
// Area nil). The context is checked during time stepping; when it ends the
// error wraps ctx.Err().
func Screen1D(ctx context.Context, p Problem1D) (*Result1D, error) {
	if err := p.validate(); err != nil {
		return nil, err
	}
	if len(p.Grid.Faces) > 0 {
		return p.solve(ctx, p.Grid, 0)
	}
	if axis, err := autoAxis1D(&p, resolvedPerSpread); err == nil {
		res, err := p.solve(ctx, axis, stepsPerOutput)
		if !errors.Is(err, ErrBudget) {
			return res, err
		}
	}
	axis, err := autoAxis1D(&p, basePerSpread)
	if err != nil {
		return nil, err
	}
	return p.solve(ctx, axis, 0)
}

// solve runs the problem on axis, with at least minSteps steps up to each
// output time (0: the Courant limit only).
func (p *Problem1D) solve(ctx context.Context, axis Axis, minSteps float64) (*Result1D, error) {
	m, plan, pe, err := p.setup(axis, minSteps)
	if err != nil {
		return nil, err
	}
	var marchedMass float64
	vals, st, err := march(ctx, m, len(p.Receptors), plan, &marchedMass)
	if err != nil {
		return nil, err
	}
	n := axis.N()
	dxMin, dxMax := axis.minMax()
	res := &Result1D{
		C: vals,
		Grid: GridReport{NX: n, NY: 1, NZ: 1, Cells: n, XLength: axis.Length(), DXMin: dxMin, DXMax: dxMax,
			PecletX: pe, TimeStep: st.dtLimit, Courant: m.q * st.dtLimit / minSlice(m.stor),
			Steps: st.steps, CellSteps: float64(n) * float64(st.steps), SteadyFrom: st.settled},
		Budget:  m.acc.result(marchedMass, 1),
		Centers: m.centers,
		Final:   append([]float64(nil), m.c...),
	}
	if st.steady != nil {
		b := st.steady.budget
		res.SteadyBudget = &b
		res.Grid.SteadyIterations, res.Grid.SteadyResidual = st.steady.iterations, st.steady.residual
	}
	return res, nil
}

// setup checks axis against the cell budget and returns the discretized
// column, the plan of its time stepping and the largest grid Peclet number.
func (p *Problem1D) setup(axis Axis, minSteps float64) (*column, marchPlan, float64, error) {
	n := axis.N()
	budget := p.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget1D
	}
	if n > budget {
		return nil, marchPlan{}, 0, cellBudgetError("Problem1D.CellBudget", float64(n), budget, "the given grid has %d cells but the budget is %d", n, budget)
	}
	m, pe, err := newColumn(p, axis)
	if err != nil {
		return nil, marchPlan{}, 0, err
	}
	// Courant limit on the smallest storage per unit flow.
	courant := orDefault(p.Courant, 1)
	dtMax := math.Inf(1)
	for _, s := range m.stor {
		dtMax = math.Min(dtMax, courant*s/m.q)
	}
	plan := marchPlan{
		times: p.Times, switchOff: p.History.switchOff(), dtMax: dtMax,
		steadyZero: p.History.fades(),
		settled:    math.Inf(1), minSteps: minSteps,
		cells: float64(n), workBudget: orDefault(p.WorkBudget, DefaultWorkBudget1D), field: "Problem1D",
	}
	if p.Area == nil {
		_, hMax := axis.minMax()
		dEff := p.Dx + 0.5*p.V*hMax
		L := axis.Length()
		plan.settled = settledFrom(p.History, func(k float64) float64 { return settleTime(p.V, dEff, p.R, p.Mu, L, nil, k) })
	}
	return m, plan, pe, nil
}
