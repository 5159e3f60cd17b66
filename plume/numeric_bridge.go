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
func (m *model) runNumeric(ctx context.Context, pts []point, taus []float64, budget int) (*numericRun, string, error) {
	if m.kind == SourceKindInstantaneous {
		return nil, "the finite-volume solver models a continuous source, not an instantaneous release", nil
	}
	// Receptors in the domain (px > 0) and the distinct positive times.
	var idx []int
	for i, p := range pts {
		if !p.upgradient && !p.inside {
			idx = append(idx, i)
		}
	}
	if len(idx) == 0 {
		return nil, "no receptor lies downgradient of the source face", nil
	}
	var times []float64
	for _, t := range taus {
		if t > 0 {
			times = append(times, t)
		}
	}
	sort.Float64s(times)
	times = uniq(times)
	steady := m.continuous()
	if steady {
		times = append(times, math.Inf(1))
	}
	if len(times) == 0 {
		return nil, "no requested time falls after the source start (and a source that stops or depletes has no steady state to solve)", nil
	}
	hist := numeric.History{Duration: m.duration, Depletion: m.depletion}

	var c [][]float64
	var grid numeric.GridReport
	var budgetRep numeric.MassBudget
	var err error
	solver := SourceKind3D
	if m.kind == SourceKind1D {
		solver = SourceKind1D
		inlet := numeric.InletConcentration
		if m.inlet == InletFlux {
			inlet = numeric.InletFlux
		}
		xs := make([]float64, len(idx))
		for k, i := range idx {
			xs[k] = pts[i].px
		}
		var r *numeric.Result1D
		r, err = numeric.Screen1D(ctx, numeric.Problem1D{
			V: m.v, Dx: m.disp[0], Dm: math.Min(m.de(), m.disp[0]), R: m.r, Mu: m.mu,
			Inlet: inlet, History: hist, Receptors: xs, Times: times, CellBudget: budget,
		})
		if r != nil {
			c, grid, budgetRep = r.C, r.Grid, r.Budget
		}
	} else {
		rs := make([]numeric.Receptor, len(idx))
		for k, i := range idx {
			p := pts[i]
			rs[k] = numeric.Receptor{X: p.px, Y: p.py, Top: p.top, Bottom: p.bot}
		}
		var r *numeric.Result3D
		r, err = numeric.Screen3D(ctx, numeric.Problem3D{
			V: m.v, Dx: m.disp[0], Dy: m.disp[1], Dz: m.disp[2], R: m.r, Mu: m.mu,
			Width: m.width, Depth: m.depth, History: hist,
			Receptors: rs, Times: times, CellBudget: budget,
		})
		if r != nil {
			c, grid, budgetRep = r.C, r.Grid, r.Budget
		}
	}
	switch {
	case err == nil:
	case ctx.Err() != nil:
		return nil, "", ctx.Err()
	case errors.Is(err, numeric.ErrBudget):
		return nil, "the grid it needs exceeds the cell budget (" + err.Error() + ")", nil
	default:
		return nil, err.Error(), nil
	}

	run := &numericRun{values: make([][]float64, len(pts))}
	for i := range pts {
		run.values[i] = make([]float64, len(taus))
		for j := range taus {
			run.values[i][j] = math.NaN()
		}
	}
	if steady {
		run.steady = make([]float64, len(pts))
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
			n := sort.SearchFloat64s(times, t)
			run.values[i][j] = m.c0 * c[k][n]
		}
	}
	run.report = &NumericReport{
		Solver:           solver,
		Cells:            [3]int{grid.NX, grid.NY, grid.NZ},
		TotalCells:       grid.Cells,
		Spacing:          [3]float64{grid.DXMin, grid.DYMin, grid.DZMin},
		MaxSpacing:       [3]float64{grid.DXMax, grid.DYMax, grid.DZMax},
		XMin:             0,
		XMax:             grid.XLength,
		YHalf:            grid.YLength,
		ZMax:             grid.ZLength,
		GridPeclet:       grid.PecletX,
		TimeStep:         grid.TimeStep,
		Courant:          grid.Courant,
		TimeSteps:        grid.Steps,
		MassBalanceError: budgetRep.ClosureError,
		CellBudget:       budget,
	}
	return run, "", nil
}

// de is the effective diffusion coefficient, m^2/d (D_x - alpha_L v).
func (m *model) de() float64 {
	return math.Max(m.disp[0]-m.alpha[0]*m.v, 0)
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
