package numeric

import (
	"context"
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
	CellBudget int     // largest number of cells allowed; 0: DefaultCellBudget1D
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

func orDefault(v, d float64) float64 {
	if v == 0 {
		return d
	}
	return v
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

func firstPositive(ts []float64) float64 {
	for _, t := range ts {
		if t > 0 {
			return t
		}
	}
	return 0
}

// Screen1D solves the column problem and returns the concentrations at the
// receptors at the output times, the grid report and the mass budget. The
// context is checked during time stepping; when it ends the error wraps
// ctx.Err().
func Screen1D(ctx context.Context, p Problem1D) (*Result1D, error) {
	if err := p.validate(); err != nil {
		return nil, err
	}
	area := p.Area
	if area == nil {
		area = func(float64) float64 { return 1 }
	}
	axis := p.Grid
	if len(axis.Faces) == 0 {
		var err error
		axis, err = autoAxis1D(&p)
		if err != nil {
			return nil, err
		}
	}
	n := axis.N()
	budget := p.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget1D
	}
	if n > budget {
		return nil, fmt.Errorf("%w: Problem1D.CellBudget: the given grid has %d cells but the budget is %d", ErrBudget, n, budget)
	}
	// Areas and geometry.
	a0 := area(0)
	if !(a0 > 0) || math.IsInf(a0, 0) {
		return nil, invalid("Problem1D.Area", "A(0) must be finite and > 0, got %g", a0)
	}
	q := p.V * a0
	dispAt := func(af float64) float64 { return p.Dm + (p.Dx-p.Dm)*a0/af }
	centers := axis.centers()
	stor := make([]float64, n)
	cond := make([]float64, max(n-1, 0))
	pe := 0.0
	for i := 0; i < n; i++ {
		xl, xr := axis.Faces[i], axis.Faces[i+1]
		al, ac, ar := area(xl), area(centers[i]), area(xr)
		for _, v := range [...]float64{al, ac, ar} {
			if !(v > 0) || math.IsInf(v, 0) {
				return nil, invalid("Problem1D.Area", "A(x) must be finite and > 0 on [0, %g], got %g near x = %g", axis.Length(), v, centers[i])
			}
		}
		// Simpson's rule for the cell volume.
		stor[i] = p.R * (xr - xl) * (al + 4*ac + ar) / 6
		if i < n-1 {
			h := centers[i+1] - centers[i]
			cond[i] = ar * dispAt(ar) / h
			pe = math.Max(pe, (q/ar)*h/dispAt(ar))
		}
	}
	pe = math.Max(pe, p.V*axis.Width(0)/p.Dx)
	gIn := a0 * p.Dx / (0.5 * axis.Width(0))
	gFirst := gIn
	if p.Inlet == InletFlux {
		gIn = gIn * q / (gIn + q)
		gFirst = 0
	}
	m := &column{
		n: n, centers: centers, stor: stor, half1mc: make([]float64, n), q: q,
		disp: newDispersionMatrix(stor, cond, gFirst), inv: invert(stor), gIn: gIn, mu: p.Mu,
		c: make([]float64, n), rhs: make([]float64, n), hist: p.History,
		inletFirst: p.Inlet == InletConcentration, rec: p.Receptors,
	}
	m.dispCN = newDispersionMatrix(stor, cond, gFirst)
	m.dispCN.fixedTheta = 0.5
	// Courant limit on the smallest storage per unit flow.
	courant := orDefault(p.Courant, 1)
	dtMax := math.Inf(1)
	for _, s := range stor {
		dtMax = math.Min(dtMax, courant*s/q)
	}
	L := axis.Length()
	var marchedMass float64
	plan := marchPlan{
		times: p.Times, switchOff: p.History.switchOff(), dtMax: dtMax,
		steadyZero: p.History.switchOff() < math.Inf(1) || p.History.Depletion > 0,
	}
	vals, st, err := march(ctx, m, len(p.Receptors), plan, &marchedMass)
	if err != nil {
		return nil, err
	}
	dxMin, dxMax := axis.minMax()
	res := &Result1D{
		C: vals,
		Grid: GridReport{NX: n, NY: 1, NZ: 1, Cells: n, XLength: L, DXMin: dxMin, DXMax: dxMax,
			PecletX: pe, TimeStep: dtMax, Courant: q * dtMax / minSlice(stor),
			Steps: st.steps, CellSteps: float64(n) * float64(st.steps)},
		Budget:  m.acc.result(marchedMass, 1),
		Centers: centers,
		Final:   append([]float64(nil), m.c...),
	}
	if st.steps == 0 {
		res.Grid.TimeStep, res.Grid.Courant = 0, 0
	}
	if st.steady != nil {
		b := st.steady.budget
		res.SteadyBudget = &b
		res.Grid.SteadyIterations, res.Grid.SteadyResidual = st.steady.iterations, st.steady.residual
	}
	return res, nil
}

func invert(s []float64) []float64 {
	v := make([]float64, len(s))
	for i, x := range s {
		v[i] = 1 / x
	}
	return v
}

func minSlice(s []float64) float64 {
	v := math.Inf(1)
	for _, x := range s {
		v = math.Min(v, x)
	}
	return v
}

// autoAxis1D designs a uniform grid: spacing the smallest of PecletMax Dx/V,
// a quarter of the spreading length sqrt(2 Dx t1/R) at the first output time
// and 1/50 of the domain, divided by Refine; the domain reaches past the
// farthest receptor by the outflow boundary layer (12 Dx/V, where the
// influence of the free outflow face has decayed by exp(-12)) or to beyond
// the front (V t/R + 5 sqrt(2 Dx t/R)), whichever is shorter.
func autoAxis1D(p *Problem1D) (Axis, error) {
	xr := 0.0
	for _, x := range p.Receptors {
		xr = math.Max(xr, x)
	}
	tl, steady := lastFinite(p.Times)
	front := math.Inf(1)
	if !steady {
		front = p.V*tl/p.R + 5*math.Sqrt(2*p.Dx*tl/p.R)
	}
	layer := 12 * p.Dx / p.V
	pe := orDefault(p.PecletMax, 2)
	refine := orDefault(p.Refine, 1)
	hPe := pe * p.Dx / p.V
	h := hPe
	if t1 := firstPositive(p.Times); t1 > 0 && !math.IsInf(t1, 1) {
		h = math.Min(h, 0.25*math.Sqrt(2*p.Dx*t1/p.R))
	}
	L := math.Max(xr, math.Min(front, xr+layer))
	L = math.Max(L, 1e-300)
	h = math.Min(h, L/50) / refine
	L += 2 * h
	nf := math.Ceil(L / h)
	budget := p.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget1D
	}
	n := int(math.Min(nf, 1<<53))
	if nf > float64(budget) {
		hFit := L / float64(budget)
		return Axis{}, fmt.Errorf("%w: Problem1D.CellBudget: need %.3g cells (spacing %.3g over %.4g) for grid Peclet <= %.3g but the budget is %d; a budget of %d fits spacing %.3g, grid Peclet <= %.3g",
			ErrBudget, nf, h, L, math.Min(pe, p.V*h/p.Dx), budget, budget, hFit, p.V*hFit/p.Dx)
	}
	return UniformAxis(L, n), nil
}
