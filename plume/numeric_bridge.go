package plume

import (
	"context"
	"errors"
	"math"
	"sort"

	"downgradient/numeric"
)

// numericRun holds the numeric values, mg/L, per receptor and requested
// time; NaN where the method has no value (receptor outside the modelled
// domain).
type numericRun struct {
	values [][]float64 // [receptor][time]
	steady []float64   // [receptor]; nil when the steady state was not solved
	report *NumericReport
}

// runNumeric runs the finite-volume cross-check (numeric.Screen3D for a
// rectangular source, numeric.Screen1D for a column) for every receptor
// downgradient of the source face at the requested elapsed times taus (d).
// For a constant continuous source it also solves the steady state
// directly. It returns a nil run and the reason when
// the method cannot run for this scenario (instantaneous release, no
// receptor in the domain, no time after the start, cell budget exceeded);
// ctx errors are returned as errors.
func (m *model) runNumeric(ctx context.Context, pts []Point, taus []float64, budget int) (*numericRun, string, error) {
	if m.kind == SourceKindInstantaneous {
		return nil, "the finite-volume solver models a continuous source, not an instantaneous release", nil
	}
	for i := range m.extra {
		if m.extra[i].lag != 0 {
			return nil, "the sources start at different times, which the finite-volume grid does not represent; check each source on its own", nil
		}
	}
	idx, times, reason := m.numericTargets(pts, taus)
	if reason != "" {
		return nil, reason, nil
	}
	aq := m.aquiferFor(pts[idx[0]])
	for _, i := range idx[1:] {
		if m.aquiferFor(pts[i]).alpha != aq.alpha {
			return nil, "the dispersivities were estimated at each receptor's own travel distance, and one finite-volume grid holds one dispersivity: " +
				"give aquifer.dispersivity or aquifer.dispersivity_scale for a cross-check of several receptors (or check one receptor at a time)", nil
		}
	}
	out, err := m.solveNumeric(ctx, aq, pts, idx, times, budget)
	switch {
	case err == nil:
	case ctx.Err() != nil:
		return nil, "", ctx.Err()
	case errors.Is(err, numeric.ErrWorkBudget):
		return nil, "the time steps it needs exceed the work budget (" + err.Error() + ")", nil
	case errors.Is(err, numeric.ErrBudget):
		return nil, "the grid it needs exceeds the cell budget (" + err.Error() + ")", nil
	default:
		return nil, err.Error(), nil
	}
	run := m.numericValues(out.c, len(pts), idx, taus, times)
	run.report = numericReport(out, budget)
	return run, "", nil
}

// numericTargets are the receptors in the domain (px > 0), by index, and
// the distinct positive times, plus +Inf for a source with a steady state;
// reason says why nothing can run.
func (m *model) numericTargets(pts []Point, taus []float64) (idx []int, times []float64, reason string) {
	for i, p := range pts {
		if !p.upgradient() && !p.inside() {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 {
		return nil, nil, "no receptor lies downgradient of the source face"
	}
	for _, t := range taus {
		if t > 0 {
			times = append(times, t)
		}
	}
	sort.Float64s(times)
	times = uniq(times)
	if m.continuous() {
		times = append(times, math.Inf(1))
	}
	if len(times) == 0 {
		return nil, nil, "no requested time falls after the source start (and a source that stops or depletes has no steady state to solve)"
	}
	return idx, times, ""
}

// numericOutput is what a finite-volume run gives back.
type numericOutput struct {
	solver string
	c      [][]float64 // C/C0 per receptor of idx and time
	grid   numeric.GridReport
	budget numeric.MassBudget
}

// solveNumeric runs the 1D or 3D solver for the receptors idx at times.
func (m *model) solveNumeric(ctx context.Context, aq *aquiferParams, pts []Point, idx []int, times []float64, budget int) (numericOutput, error) {
	hist := m.sourceParams.numericHistory()
	if m.kind == SourceKind1D {
		inlet := numeric.InletConcentration
		if m.inlet == InletFlux {
			inlet = numeric.InletFlux
		}
		xs := make([]float64, len(idx))
		for k, i := range idx {
			xs[k] = pts[i].X
		}
		r, err := numeric.Screen1D(ctx, numeric.Problem1D{
			V: m.v, Dx: aq.disp[0], Dm: math.Min(m.de, aq.disp[0]), R: m.r, Mu: m.mu,
			Inlet: inlet, History: hist, Receptors: xs, Times: times, CellBudget: budget,
		})
		if r == nil {
			return numericOutput{}, err
		}
		return numericOutput{solver: SourceKind1D, c: r.C, grid: r.Grid, budget: r.Budget}, err
	}
	rs := make([]numeric.Receptor, len(idx))
	for k, i := range idx {
		p := pts[i]
		rs[k] = numeric.Receptor{X: p.X, Y: p.Y, Top: p.Top, Bottom: p.Bottom}
	}
	pb := numeric.Problem3D{
		V: m.v, Dx: aq.disp[0], Dy: aq.disp[1], Dz: aq.disp[2], R: m.r, Mu: m.mu,
		Width: m.width, Depth: m.depth, History: hist,
		Receptors: rs, Times: times, CellBudget: budget,
	}
	scale := 1.0
	if len(m.extra) > 0 {
		// Several sources on one grid, in the first source's plume frame,
		// each at its strength relative to the largest.
		scale = m.referenceConcentration()
		pb.Width, pb.Depth, pb.History = 0, 0, numeric.History{}
		for i := range m.sourceCount() {
			s := m.source(i)
			x, y := 0.0, 0.0
			if i > 0 {
				x, y = m.frame.ToPlume(s.frame.X0, s.frame.Y0)
			}
			pb.Sources = append(pb.Sources, numeric.SourceFace{X: x, Y: y, Width: s.width, Depth: s.depth,
				Strength: s.c0 / scale, History: s.numericHistory()})
		}
	}
	r, err := numeric.Screen3D(ctx, pb)
	if r == nil {
		return numericOutput{}, err
	}
	if scale != 1 {
		for k := range r.C {
			for j := range r.C[k] {
				r.C[k][j] *= scale / m.c0 // numericValues multiplies by the first source's c0
			}
		}
	}
	return numericOutput{solver: SourceKind3D, c: r.C, grid: r.Grid, budget: r.Budget}, err
}

// numericHistory is the source's history for the finite-volume solver
// (the same as history's for the closed forms).
func (s *sourceParams) numericHistory() numeric.History {
	return numeric.History{Duration: s.duration, Depletion: s.depletion, Rate: s.rate, Exponent: s.gamma}
}

// numericValues spreads the solver's values (c, per receptor of idx and
// time of times) over all receptors and requested times taus, in mg/L;
// NaN where the method has no value.
func (m *model) numericValues(c [][]float64, n int, idx []int, taus, times []float64) *numericRun {
	run := &numericRun{values: make([][]float64, n)}
	for i := range n {
		run.values[i] = make([]float64, len(taus))
		for j := range taus {
			run.values[i][j] = math.NaN()
		}
	}
	if m.continuous() {
		run.steady = make([]float64, n)
		for i := range run.steady {
			run.steady[i] = math.NaN()
		}
		for k, i := range idx {
			run.steady[i] = m.c0 * c[k][len(times)-1]
		}
	}
	for k, i := range idx {
		for j, t := range taus {
			if !(t > 0) {
				run.values[i][j] = 0 // before the source starts
				continue
			}
			nt := sort.SearchFloat64s(times, t)
			run.values[i][j] = m.c0 * c[k][nt]
		}
	}
	return run
}

// numericReport describes the grid of a run, canonical units.
func numericReport(out numericOutput, budget int) *NumericReport {
	grid := out.grid
	return &NumericReport{
		Solver:           out.solver,
		Cells:            [3]int{grid.NX, grid.NY, grid.NZ},
		TotalCells:       grid.Cells,
		Spacing:          [3]float64{grid.DXMin, grid.DYMin, grid.DZMin},
		MaxSpacing:       [3]float64{grid.DXMax, grid.DYMax, grid.DZMax},
		XMin:             grid.XStart,
		XMax:             grid.XStart + grid.XLength,
		YHalf:            grid.YLength,
		ZMax:             grid.ZLength,
		GridPeclet:       grid.PecletX,
		TimeStep:         grid.TimeStep,
		Courant:          grid.Courant,
		TimeSteps:        grid.Steps,
		MassBalanceError: out.budget.ClosureError,
		CellBudget:       budget,
		SteadyFrom:       steadyFrom(grid.SteadyFrom),
	}
}

// uniq removes repeated values from a sorted slice.
func uniq(s []float64) []float64 {
	out := s[:0]
	for i, v := range s {
		if i == 0 || v != s[i-1] {
			out = append(out, v)
		}
	}
	return out
}

// steadyFrom is the report's steady_from, d: nil when every value was time
// stepped.
func steadyFrom(t float64) *float64 {
	if !(t > 0) || math.IsInf(t, 0) {
		return nil
	}
	return Ptr(t)
}
