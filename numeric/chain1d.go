package numeric

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// ChainProblem1D is the column problem of Problem1D for a decay chain: the
// flow, dispersion, inlet type, source history, cross-section, receptors,
// times, grid and budgets of Problem1D (its R and Mu are not used; each
// species has its own), and the species with their inlet values.
// The output times must be finite: a chain's steady state is not solved
// directly (ask the closed forms for it).
type ChainProblem1D struct {
	Problem1D
	Species []Species
}

// ChainResult holds the concentrations of every species at the receptors,
// the grid and the mass budgets of a chain run.
type ChainResult struct {
	// C[s][r][k] is species s at receptor r and output time k, in the
	// unit of Species.Source.
	C    [][][]float64
	Grid GridReport
	// Budgets[s] is the budget of species s over the time stepping to the
	// last output time; Total that of the chain as a whole (its Produced
	// is the mass passed down the chain by yield).
	Budgets []SpeciesBudget
	Total   SpeciesBudget
}

// ScreenChain1D solves the chain in the column: each species transported
// as in Screen1D with its own retardation factor, the reaction step
// coupling them (see chain.go). The automatic grid is the finer and longer
// of the designs for the smallest and the largest retardation factor; the
// time step obeys the Courant limit of the fastest species. Work is
// counted as cells times species times steps against WorkBudget.
func ScreenChain1D(ctx context.Context, p ChainProblem1D) (*ChainResult, error) {
	if err := validateSpecies("ChainProblem1D.Species", p.Species); err != nil {
		return nil, err
	}
	base := p.Problem1D
	base.R, base.Mu = minR(p.Species), 0
	if err := base.validate(); err != nil {
		return nil, err
	}
	if err := finiteTimes("ChainProblem1D.Times", base.Times); err != nil {
		return nil, err
	}
	if len(base.Grid.Faces) > 0 {
		return solveChain1D(ctx, &base, p.Species, base.Grid, 0)
	}
	if axis, err := chainAxis1D(&base, p.Species, resolvedPerSpread); err == nil {
		res, err := solveChain1D(ctx, &base, p.Species, axis, stepsPerOutput)
		if !errors.Is(err, ErrBudget) {
			return res, err
		}
	}
	axis, err := chainAxis1D(&base, p.Species, basePerSpread)
	if err != nil {
		return nil, err
	}
	return solveChain1D(ctx, &base, p.Species, axis, 0)
}

func minR(sp []Species) float64 {
	r := math.Inf(1)
	for _, s := range sp {
		r = math.Min(r, s.R)
	}
	return r
}

func maxR(sp []Species) float64 {
	r := 0.0
	for _, s := range sp {
		r = math.Max(r, s.R)
	}
	return r
}

// finiteTimes rejects a steady state (+Inf) among the output times.
func finiteTimes(field string, ts []float64) error {
	for i, t := range ts {
		if math.IsInf(t, 1) {
			return invalid(fmt.Sprintf("%s[%d]", field, i), "the steady state of a chain is not solved numerically; ask for finite times")
		}
	}
	return nil
}

// chainAxis1D is the uniform grid with the longer domain and the finer
// spacing of the automatic designs for the smallest and largest R.
func chainAxis1D(base *Problem1D, sp []Species, perSpread float64) (Axis, error) {
	lo, hi := *base, *base
	lo.R, hi.R = minR(sp), maxR(sp)
	a, err := autoAxis1D(&lo, perSpread)
	if err != nil {
		return Axis{}, err
	}
	b, err := autoAxis1D(&hi, perSpread)
	if err != nil {
		return Axis{}, err
	}
	L := math.Max(a.Length(), b.Length())
	h := math.Min(a.Width(0), b.Width(0))
	nf := math.Ceil(L / h * (1 - 1e-12))
	budget := base.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget1D
	}
	if !(nf <= float64(budget)) {
		return Axis{}, cellBudgetError("ChainProblem1D.CellBudget", nf, budget, "need %.3g cells (spacing %.3g over %.4g) but the budget is %d", nf, h, L, budget)
	}
	return UniformAxis(L, int(nf)), nil
}

// chainColumn is the discretized chain: one column per species on the same
// axis, and the reaction step.
type chainColumn struct {
	cols     []*column
	sp       []Species
	re       *reaction
	hist     History
	parity   int
	produced []kahan
	c, w     []float64 // one cell's values and scratch
	dec, prd []float64
	sdec     []float64
	sprd     []float64
}

func solveChain1D(ctx context.Context, base *Problem1D, sp []Species, axis Axis, minSteps float64) (*ChainResult, error) {
	n := axis.N()
	budget := base.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget1D
	}
	if n > budget {
		return nil, cellBudgetError("ChainProblem1D.CellBudget", float64(n), budget, "the given grid has %d cells but the budget is %d", n, budget)
	}
	ns := len(sp)
	m := &chainColumn{sp: sp, re: newReaction(sp), hist: base.History, produced: make([]kahan, ns),
		c: make([]float64, ns), w: make([]float64, ns), dec: make([]float64, ns), prd: make([]float64, ns),
		sdec: make([]float64, ns), sprd: make([]float64, ns)}
	pe := 0.0
	courant := orDefault(base.Courant, 1)
	dtMax := math.Inf(1)
	for _, s := range sp {
		q := *base
		q.R, q.Mu = s.R, 0
		col, cpe, err := newColumn(&q, axis)
		if err != nil {
			return nil, err
		}
		m.cols = append(m.cols, col)
		pe = math.Max(pe, cpe)
		for _, st := range col.stor {
			dtMax = math.Min(dtMax, courant*st/col.q)
		}
	}
	plan := marchPlan{
		times: base.Times, switchOff: base.History.switchOff(), dtMax: dtMax,
		settled: math.Inf(1), minSteps: minSteps,
		cells: float64(n) * float64(ns), workBudget: orDefault(base.WorkBudget, DefaultWorkBudget1D), field: "ChainProblem1D",
	}
	nrec := len(base.Receptors)
	var marched float64
	vals, st, err := march(ctx, m, ns*nrec, plan, &marched)
	if err != nil {
		return nil, err
	}
	dxMin, dxMax := axis.minMax()
	res := &ChainResult{C: reshape(vals, ns, nrec),
		Grid: GridReport{NX: n, NY: 1, NZ: 1, Cells: n, XLength: axis.Length(), DXMin: dxMin, DXMax: dxMax,
			PecletX: pe, TimeStep: st.dtLimit, Steps: st.steps, CellSteps: float64(n) * float64(ns) * float64(st.steps)}}
	if st.dtLimit > 0 {
		res.Grid.Courant = m.cols[0].q * st.dtLimit / minSlice(m.cols[argMinR(sp)].stor)
	}
	for i, col := range m.cols {
		mb := col.acc.result(col.storedMass(), 1)
		res.Budgets = append(res.Budgets, speciesBudget(mb, m.produced[i].sum))
	}
	res.Total = chainTotal(res.Budgets)
	return res, nil
}

// argMinR is the index of the species with the smallest R.
func argMinR(sp []Species) int {
	k := 0
	for i, s := range sp {
		if s.R < sp[k].R {
			k = i
		}
	}
	return k
}

// reshape turns values[s*nrec+r][k] into C[s][r][k].
func reshape(vals [][]float64, ns, nrec int) [][][]float64 {
	out := make([][][]float64, ns)
	for s := range out {
		out[s] = vals[s*nrec : (s+1)*nrec]
	}
	return out
}

func speciesBudget(mb MassBudget, produced float64) SpeciesBudget {
	b := SpeciesBudget{InletAdvective: mb.InletAdvective, InletDispersive: mb.InletDispersive,
		Outflow: mb.Outflow, Decayed: mb.Decayed, Produced: produced, Stored: mb.Stored}
	b.close()
	return b
}

func chainTotal(bs []SpeciesBudget) SpeciesBudget {
	var t SpeciesBudget
	for _, b := range bs {
		t.add(b)
	}
	t.close()
	return t
}

func (m *chainColumn) setStep(dt float64) {
	for _, c := range m.cols {
		c.setStep(dt)
	}
	m.re.setStep(dt)
}

func (m *chainColumn) advance(t0, t1 float64) {
	cb := m.hist.mean(t0, t1)
	for i, c := range m.cols {
		if !c.inletFirst {
			c.robin = c.gIn * (cb*m.sp[i].Source - c.c[0])
		}
	}
	m.parity ^= 1
	if m.parity == 1 {
		for i, c := range m.cols {
			cbi := cb * m.sp[i].Source
			c.advect(cbi)
			c.disperse(cbi)
		}
		m.react()
	} else {
		m.react()
		for i, c := range m.cols {
			cbi := cb * m.sp[i].Source
			c.disperse(cbi)
			c.advect(cbi)
		}
	}
}

// react applies the reaction step cell by cell.
func (m *chainColumn) react() {
	for i := range m.sdec {
		m.sdec[i], m.sprd[i] = 0, 0
	}
	n := m.cols[0].n
	for k := 0; k < n; k++ {
		for i, c := range m.cols {
			m.c[i] = c.c[k]
		}
		m.re.cell(m.c, m.w, m.dec, m.prd)
		for i, c := range m.cols {
			c.c[k] = m.c[i]
			m.sdec[i] += c.stor[k] * m.dec[i]
			m.sprd[i] += c.stor[k] * m.prd[i]
		}
	}
	for i, c := range m.cols {
		c.acc.decayed.add(m.sdec[i])
		m.produced[i].add(m.sprd[i])
	}
}

func (m *chainColumn) sample(t float64, out []float64) {
	cb := m.hist.value(t)
	nrec := len(m.cols[0].rec)
	for s, c := range m.cols {
		for r, x := range c.rec {
			out[s*nrec+r] = math.Max(0, chainValueAt(c, x, cb*m.sp[s].Source))
		}
	}
}

// chainValueAt is column.valueAt with the inlet value cb of the species.
func chainValueAt(m *column, x, cb float64) float64 {
	i, w := locate(m.centers, x)
	if i >= 0 {
		return mix(m.c[i], m.c[min(i+1, m.n-1)], w)
	}
	var c0 float64
	switch {
	case m.inletFirst:
		c0 = cb
	case m.n == 1:
		c0 = m.c[0]
	default:
		x0, x1 := m.centers[0], m.centers[1]
		c0 = math.Max(0, m.c[0]-(m.c[1]-m.c[0])*x0/(x1-x0))
	}
	return mix(c0, m.c[0], x/m.centers[0])
}

func (m *chainColumn) storedMass() float64 {
	s := 0.0
	for _, c := range m.cols {
		s += c.storedMass()
	}
	return s
}

func (m *chainColumn) solveSteady(context.Context) (steadyStats, error) {
	return steadyStats{}, errors.New("numeric: the steady state of a chain is not solved directly")
}
