package numeric

import (
	"context"
	"fmt"
	"math"
)

// DefaultCellBudget3D is the cell budget of Screen3D when none is given
// (about 16 MB per field array).
const DefaultCellBudget3D = 2_000_000

// Problem3D is the screening problem of a continuous vertical rectangular
// source: on the inflow face x = 0 the patch |y| <= Width/2, 0 <= z <= Depth
// is held at the source concentration (times the History factor) and the
// rest of the face at 0; the water table z = 0 is a no-flux boundary; the
// aquifer is uniform with flow V along +x. Units: L for length, T for time;
// concentrations relative to the source. The same equation and parameter
// meaning as the closed forms (see the package documentation).
type Problem3D struct {
	V  float64 // seepage velocity, L/T, > 0
	Dx float64 // longitudinal dispersion coefficient (unretarded), L^2/T, > 0
	Dy float64 // transverse horizontal dispersion coefficient, L^2/T, > 0
	Dz float64 // transverse vertical dispersion coefficient, L^2/T, > 0
	R  float64 // retardation factor, >= 1
	Mu float64 // decay rate of the dissolved concentration in the retarded equation, 1/T, >= 0

	Width   float64 // source width across flow, centred on y = 0, L, > 0
	Depth   float64 // source depth below the water table, L, > 0
	History History // source history (default: continuous, constant)

	// Receptors in the plume frame. X < 0 (upgradient of the source face)
	// is an error naming the receptor; the automatic grid always extends
	// far enough to hold every receptor.
	Receptors []Receptor
	// Times are the output times, T, ascending, >= 0; +Inf (last) asks for
	// the steady state, solved directly (see solveSteady) to a residual
	// below SteadyTolerance.
	Times []float64

	CellBudget int // largest number of cells allowed; 0: DefaultCellBudget3D
	// WorkBudget is the largest work allowed, cells times time steps
	// (GridReport.CellSteps), in (0, 1e15]; 0: DefaultWorkBudget3D.
	WorkBudget float64
	Courant    float64 // largest V dt/(R dx), in (0, 1]; 0: 1
	PecletMax  float64 // largest grid Peclet number V dx/Dx along flow, in (0, 100]; 0: 2
	Refine     float64 // divides every automatic spacing (convergence studies), in (0, 1000]; 0: 1

	// Grid, when X has faces, is used as given instead of the automatic
	// design (all three axes start at 0; Y covers the half domain y >= 0;
	// with Sources see sources3d.go).
	Grid *Grid3D

	// Sources, when not empty, gives several source faces on one grid
	// instead of the one source of Width, Depth and History (which must
	// then be zero): each with its own position in the plume frame, size,
	// strength and history, all in the aquifer above; the values are then
	// C/C_ref, the sum of every source's Strength times its own C/Cs. See
	// sources3d.go.
	Sources []SourceFace

	// Transects, when given, ask for the advective mass discharge through
	// rectangles of planes x = const at every output time (see
	// discharge.go); the automatic grid reaches every transect.
	Transects []Transect
}

// Grid3D is an explicit structured grid.
type Grid3D struct {
	X, Y, Z Axis
}

// Result3D holds the concentrations at the receptors, the grid and the mass
// budget.
type Result3D struct {
	C    [][]float64 // C/C0 at receptor r and output time k: C[r][k]
	Grid GridReport
	// Budget covers the time stepping to the last finite output time (all
	// zero when only the steady state was asked for).
	Budget MassBudget
	// SteadyBudget is the budget (in rates) of the steady state when one
	// was asked for and the source is constant; nil otherwise.
	SteadyBudget *SteadyBudget
	// Discharge is V times the integral of C/C0 (C/C_ref with Sources)
	// over transect q at output time k, Discharge[q][k], L^3/T: times the
	// effective porosity and the source concentration, the advective mass
	// discharge (see discharge.go). Nil without Transects.
	Discharge [][]float64
}

func (p *Problem3D) validate() error {
	const pre = "Problem3D."
	if len(p.Sources) > 0 {
		return p.validateSources()
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"V", p.V}, {"Dx", p.Dx}, {"Dy", p.Dy}, {"Dz", p.Dz}, {"Width", p.Width}, {"Depth", p.Depth}} {
		if err := checkPositive(pre+f.name, f.v); err != nil {
			return err
		}
	}
	if err := checkRetardation(pre+"R", p.R); err != nil {
		return err
	}
	if err := checkNonNegative(pre+"Mu", p.Mu); err != nil {
		return err
	}
	if err := p.History.validate(pre + "History"); err != nil {
		return err
	}
	if err := validateReceptors(pre+"Receptors", p.Receptors); err != nil {
		return err
	}
	xEnd := math.Inf(1)
	if p.Grid != nil && len(p.Grid.X.Faces) > 0 {
		xEnd = p.Grid.X.Faces[len(p.Grid.X.Faces)-1]
	}
	if err := validateTransects(pre+"Transects", p.Transects, 0, xEnd); err != nil {
		return err
	}
	if err := p.validateSettings(); err != nil {
		return err
	}
	if p.Grid != nil {
		for _, a := range []struct {
			n   string
			ax  Axis
			max float64
		}{{"X", p.Grid.X, maxOf(p.Receptors, func(r Receptor) float64 { return r.X })},
			{"Y", p.Grid.Y, maxOf(p.Receptors, func(r Receptor) float64 { return math.Abs(r.Y) })},
			{"Z", p.Grid.Z, maxOf(p.Receptors, func(r Receptor) float64 { return r.Bottom })}} {
			if err := a.ax.validate(pre + "Grid." + a.n); err != nil {
				return err
			}
			if a.max > a.ax.Length() {
				return invalid(pre+"Grid."+a.n, "extent %g does not reach the farthest receptor (%g)", a.ax.Length(), a.max)
			}
		}
	}
	return nil
}

// validateSettings checks the output times and the optional settings
// (budgets, Courant, PecletMax, Refine).
func (p *Problem3D) validateSettings() error {
	const pre = "Problem3D."
	if err := validateTimes(pre+"Times", p.Times); err != nil {
		return err
	}
	if p.CellBudget < 0 {
		return invalid(pre+"CellBudget", "must be 0 (default %d) or > 0, got %d", DefaultCellBudget3D, p.CellBudget)
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
	return checkOptional(pre+"Refine", p.Refine, 0, 1000)
}

// validateReceptors checks that there is at least one receptor, that every
// coordinate is finite, that no receptor lies upgradient of the source face
// (all of them are named) and that every screen has 0 <= Top <= Bottom.
func validateReceptors(field string, rs []Receptor) error {
	return validateReceptorsFrom(field, rs, 0, "the source face")
}

// validateReceptorsFrom is validateReceptors with the face at x = x0 (what
// names it) as the upgradient limit.
func validateReceptorsFrom(field string, rs []Receptor, x0 float64, face string) error {
	if len(rs) == 0 {
		return invalid(field, "need at least one receptor")
	}
	var up []string
	for i, r := range rs {
		f := fmt.Sprintf("%s[%d]", field, i)
		for _, c := range []struct {
			n string
			v float64
		}{{"X", r.X}, {"Y", r.Y}, {"Top", r.Top}, {"Bottom", r.Bottom}} {
			if math.IsNaN(c.v) || math.IsInf(c.v, 0) {
				return invalid(f+"."+c.n, "must be finite, got %g", c.v)
			}
		}
		if r.X < x0 {
			up = append(up, fmt.Sprintf("%s.X = %g", f, r.X))
		}
		if !(r.Top >= 0) {
			return invalid(f+".Top", "must be >= 0 (depth below the water table), got %g", r.Top)
		}
		if !(r.Bottom >= r.Top) {
			return invalid(f+".Bottom", "must be >= Top = %g, got %g", r.Top, r.Bottom)
		}
	}
	if len(up) > 0 {
		return invalid(field, "upgradient of %s (x < %g), outside the modelled aquifer: %v", face, x0, up)
	}
	return nil
}

func maxOf(rs []Receptor, f func(Receptor) float64) float64 {
	m := 0.0
	for _, r := range rs {
		m = math.Max(m, f(r))
	}
	return m
}

// Screen3D solves the 3D problem and returns the concentrations at the
// receptors at the output times, the grid report and the mass budget (for
// the whole plume, both halves). The grid is designed automatically (see
// designGrid3) unless p.Grid is given; when it needs more cells than
// p.CellBudget, the error (a BudgetError wrapping ErrBudget) says what the
// budget would fit. The work of the time stepping is counted before the
// first step and checked against WorkBudget; output times at which the
// field has reached its long-time limit are answered with it directly (see
// settle.go). The context is checked during the time stepping (at least
// every step on grids of 32768 cells or more) and every steady-state
// iteration; when it ends the error wraps ctx.Err().
func Screen3D(ctx context.Context, p Problem3D) (*Result3D, error) {
	if len(p.Sources) > 0 {
		return runSources(ctx, p)
	}
	res, _, err := run3D(ctx, p)
	return res, err
}

// run3D is Screen3D that also returns the final discretized state (tests).
func run3D(ctx context.Context, p Problem3D) (*Result3D, *grid3, error) {
	g, plan, err := setup3D(&p)
	if err != nil {
		return nil, nil, err
	}
	var marchedMass float64
	vals, st, err := march(ctx, g, len(p.Receptors)+len(p.Transects), plan, &marchedMass)
	if err != nil {
		return nil, nil, err
	}
	vals, disch := splitDischarge(vals, len(p.Receptors))
	rep := report3(g, p.V, p.Dx)
	rep.Steps = st.steps
	rep.CellSteps = float64(rep.Cells) * float64(st.steps)
	rep.SteadyFrom = st.settled
	if st.steps > 0 {
		rep.TimeStep = plan.dtMax
		rep.Courant = p.V * plan.dtMax / (p.R * rep.DXMin)
	}
	out := &Result3D{C: vals, Grid: rep, Budget: g.acc.result(marchedMass, 2), Discharge: disch}
	if st.steady != nil {
		b := st.steady.budget
		out.SteadyBudget = &b
		out.Grid.SteadyIterations, out.Grid.SteadyResidual = st.steady.iterations, st.steady.residual
	}
	return out, g, nil
}

// setup3D validates p, designs the grid (or checks the given one) against
// the cell budget, and returns the discretized problem and the plan of its
// time stepping.
func setup3D(p *Problem3D) (*grid3, marchPlan, error) {
	if err := p.validate(); err != nil {
		return nil, marchPlan{}, err
	}
	budget := p.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget3D
	}
	var gx, gy, gz Axis
	if p.Grid != nil {
		gx, gy, gz = p.Grid.X, p.Grid.Y, p.Grid.Z
		if n := float64(gx.N()) * float64(gy.N()) * float64(gz.N()); n > float64(budget) {
			return nil, marchPlan{}, cellBudgetError("Problem3D.CellBudget", n, budget, "the given grid has %.4g cells but the budget is %d", n, budget)
		}
	} else {
		var err error
		gx, gy, gz, err = designFor(p, budget)
		if err != nil {
			return nil, marchPlan{}, err
		}
	}
	g := newGrid3(gx, gy, gz, p.V, p.Dx, p.Dy, p.Dz, p.R, p.Mu, 0.5*p.Width, p.Depth, p.History)
	g.rec, g.tr = p.Receptors, p.Transects
	courant := orDefault(p.Courant, 1)
	dtMax := g.maxStep(courant)
	if p.Grid == nil {
		// At most a halving, so that a receptor very close to the source
		// cannot multiply the work.
		dtMax = math.Max(math.Min(dtMax, nearStep(p)), 0.5*dtMax)
	}
	plan := marchPlan{
		times: p.Times, switchOff: p.History.switchOff(), dtMax: dtMax,
		steadyZero: p.History.fades(),
		cells:      float64(g.nx) * float64(g.np), workBudget: orDefault(p.WorkBudget, DefaultWorkBudget3D), field: "Problem3D",
	}
	_, hMax := gx.minMax()
	dEff := p.Dx + 0.5*p.V*hMax
	acr := []across{{gy.Length(), p.Dy}, {gz.Length(), p.Dz}}
	plan.settled = settledFrom(p.History, func(k float64) float64 { return settleTime(p.V, dEff, p.R, p.Mu, gx.Length(), acr, k) })
	return g, plan, nil
}

func report3(g *grid3, v, dx float64) GridReport {
	r := GridReport{NX: g.nx, NY: g.ny, NZ: g.nz, Cells: g.nx * g.ny * g.nz,
		XLength: g.x.Length(), YLength: g.y.Length(), ZLength: g.z.Length()}
	r.DXMin, r.DXMax = g.x.minMax()
	r.DYMin, r.DYMax = g.y.minMax()
	r.DZMin, r.DZMax = g.z.minMax()
	r.PecletX = v * r.DXMax / dx
	return r
}

// stepsPerTravel is the least number of time steps over the travel time
// R x / V from the source face to the nearest receptor on the automatic
// grid. The splitting error at a receptor, relative to its value, grows like
// the time step over that travel time (transverse dispersion changes the
// young plume fastest); measured on the benchmark's typical case with a
// receptor 10 m from the source (travel time 100 d, steps of 10.5 d at
// Courant 1 on the smallest cell):
// worst error 6.6 % at Courant 1, 3.7 % with 16 steps per travel time,
// 3.0 % with 20. Receptors beyond about 25 m there are not affected (the
// Courant limit on the smallest cell is the smaller step); the step is
// never reduced below half the Courant limit (receptors closer than about
// 8 m there), which bounds the extra work at a factor 2.
const stepsPerTravel = 16

// nearStep is the largest time step allowed by stepsPerTravel (+Inf when no
// receptor lies downgradient of the source face).
func nearStep(p *Problem3D) float64 {
	x := math.Inf(1)
	for _, r := range p.Receptors {
		if r.X > 0 {
			x = math.Min(x, r.X)
		}
	}
	return p.R * x / (p.V * stepsPerTravel)
}
