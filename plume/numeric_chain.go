package plume

import (
	"context"
	"errors"
	"math"
	"sort"

	"downgradient/numeric"
)

// runNumericChain is runNumeric for several compounds: the coupled species
// on one finite-volume grid (numeric.ScreenChain3D or ScreenChain1D), at
// the finite requested times (a chain has no directly solved steady state).
// values[c][r][j] is compound c at receptor r and requested time j, mg/L
// (NaN where the method has no value).
func (m *model) runNumericChain(ctx context.Context, pts []Point, taus []float64, budget int) (values [][][]float64, report *NumericReport, reason string, err error) {
	idx, times, reason := m.numericTargets(pts, taus)
	if reason != "" {
		return nil, nil, reason, nil
	}
	if n := len(times); n > 0 && math.IsInf(times[n-1], 1) {
		times = times[:n-1]
	}
	if len(times) == 0 {
		return nil, nil, "no requested time falls after the source start (a chain's steady state is not solved numerically)", nil
	}
	aq := m.aquiferFor(pts[idx[0]])
	for _, i := range idx[1:] {
		if m.aquiferFor(pts[i]).alpha != aq.alpha {
			return nil, nil, "the dispersivities were estimated at each receptor's own travel distance, and one finite-volume grid holds one dispersivity: give aquifer.dispersivity or aquifer.dispersivity_scale", nil
		}
	}
	r, err := m.solveChain(ctx, aq, pts, idx, times, budget)
	switch {
	case err == nil:
	case ctx.Err() != nil:
		return nil, nil, "", ctx.Err()
	case errors.Is(err, numeric.ErrWorkBudget):
		return nil, nil, "the time steps it needs exceed the work budget (" + err.Error() + ")", nil
	case errors.Is(err, numeric.ErrBudget):
		return nil, nil, "the grid it needs exceeds the cell budget (" + err.Error() + ")", nil
	default:
		return nil, nil, err.Error(), nil
	}
	rep := numericReport(numericOutput{solver: m.kind, grid: r.Grid}, budget)
	rep.MassBalanceError = chainClosure(r.Total)
	return chainValues(r, len(m.compounds), len(pts), idx, times, taus), rep, "", nil
}

// solveChain runs the finite-volume chain solver (1D or 3D, as the
// model's source) for the receptors pts[idx] at the times (retarded, d,
// ascending, finite), with the dispersion of aq.
func (m *model) solveChain(ctx context.Context, aq *aquiferParams, pts []Point, idx []int, times []float64, budget int) (*numeric.ChainResult, error) {
	species := make([]numeric.Species, len(m.compounds))
	for i, cp := range m.compounds {
		species[i] = numeric.Species{R: cp.r, Mu: cp.mu, Daughter: cp.daughter, Yield: cp.yield, Source: cp.srcConc}
	}
	hist := numeric.History{Duration: m.duration, Depletion: m.depletion}
	if m.kind == SourceKind1D {
		inlet := numeric.InletConcentration
		if m.inlet == InletFlux {
			inlet = numeric.InletFlux
		}
		xs := make([]float64, len(idx))
		for k, i := range idx {
			xs[k] = pts[i].X
		}
		return numeric.ScreenChain1D(ctx, numeric.ChainProblem1D{Species: species, Problem1D: numeric.Problem1D{
			V: m.v, Dx: aq.disp[0], Dm: math.Min(m.de, aq.disp[0]), R: 1, Inlet: inlet, History: hist,
			Receptors: xs, Times: times, CellBudget: budget}})
	}
	rs := make([]numeric.Receptor, len(idx))
	for k, i := range idx {
		p := pts[i]
		rs[k] = numeric.Receptor{X: p.X, Y: p.Y, Top: p.Top, Bottom: p.Bottom}
	}
	return numeric.ScreenChain3D(ctx, numeric.ChainProblem3D{Species: species, Problem3D: numeric.Problem3D{
		V: m.v, Dx: aq.disp[0], Dy: aq.disp[1], Dz: aq.disp[2], R: 1,
		Width: m.width, Depth: m.depth, History: hist, Receptors: rs, Times: times, CellBudget: budget}})
}

// chainValues lays the solver's values out as values[c][r][j]: compound c
// (of nc) at receptor r (of nr; the solved ones are idx) and requested
// time taus[j] (solved at times), 0 before the source starts and NaN at
// receptors not solved.
func chainValues(r *numeric.ChainResult, nc, nr int, idx []int, times, taus []float64) [][][]float64 {
	values := make([][][]float64, nc)
	for c := range values {
		values[c] = make([][]float64, nr)
		for i := range nr {
			values[c][i] = make([]float64, len(taus))
			for j := range taus {
				values[c][i][j] = math.NaN()
			}
		}
		for k, i := range idx {
			for j, t := range taus {
				if !(t > 0) {
					values[c][i][j] = 0
					continue
				}
				values[c][i][j] = r.C[c][k][sort.SearchFloat64s(times, t)]
			}
		}
	}
	return values
}

// chainClosure is the closure error of a chain's budget relative to the
// mass that entered or was formed.
func chainClosure(b numeric.SpeciesBudget) float64 {
	in := math.Abs(b.In) + math.Abs(b.Produced)
	if in == 0 {
		return 0
	}
	return math.Abs(b.In+b.Produced-b.Outflow-b.Decayed-b.Stored) / in
}

// attachNumericCompounds stores the chain's numeric values, compares them
// with the exact values where a closed form gives the compound, and, for
// each compound without one, sets its peak and verdict from them (over the
// requested times only; a caveat says so).
func (m *model) attachNumericCompounds(res *Result, values [][][]float64, pts []Point, sp screenPlan, tol float64) {
	for r := range res.Receptors {
		rr := &res.Receptors[r]
		for c := range rr.Compounds {
			cr := &rr.Compounds[c]
			best, bestJ := 0.0, -1
			worst, worstJ := 0.0, -1
			floor := m.compoundFloor(c)
			for j := range cr.Series {
				v := values[c][r][j]
				if math.IsNaN(v) {
					continue
				}
				cr.Series[j].Numeric = Ptr(v)
				if v > best || bestJ < 0 {
					best, bestJ = v, j
				}
				if e := cr.Series[j].Exact; e != nil && math.Max(*e, v) >= floor {
					if d := math.Abs(v-*e) / math.Max(*e, floor); d > worst {
						worst, worstJ = d, j
					}
				}
			}
			if worstJ >= 0 && worst > tol {
				res.caveat(CaveatNumericDisagreement, SeverityCaution, rr.ID,
					"The numeric cross-check of %s differs from the exact solution by %.3g %% at time %g (tolerance %.3g %%); the grid may be too coarse here.",
					cr.Name, 100*worst, sp.reqTimes[worstJ], 100*tol)
				res.Caveats[len(res.Caveats)-1].Compound = cr.Name
			}
			if cr.Peak != nil || bestJ < 0 {
				continue
			}
			cr.Peak = &Peak{Concentration: best, Method: MethodNumeric, Time: Ptr(m.start + sp.taus[bestJ])}
			cp := m.compounds[c]
			if cp.screening == nil || pts[r].upgradient() {
				continue
			}
			cr.ExceedsScreeningLevel = new(best >= *cp.screening && best > 0)
			for j := range cr.Series {
				if v := values[c][r][j]; v >= *cp.screening && v > 0 {
					cr.FirstExceedanceTime = Ptr(m.start + sp.taus[j])
					break
				}
			}
		}
		rr.ExceedsScreeningLevel = aggregateExceeds(rr.Compounds)
	}
}

// compoundFloor is the concentration, mg/L, below which differences
// between methods are not counted for compound c (see comparisonFloor).
func (m *model) compoundFloor(c int) float64 {
	cp := &m.compounds[c]
	if cp.screening != nil {
		return ComparisonLevelFraction * *cp.screening
	}
	return math.Max(ComparisonSourceFraction*m.c0, 1e-12)
}
