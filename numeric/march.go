package numeric

import (
	"context"
	"fmt"
	"math"
)

// model is a discretized problem that the time driver advances.
type model interface {
	// setStep prepares the operators for time step dt.
	setStep(dt float64)
	// advance moves the solution from t0 to t1 = t0 + dt (the dt last set).
	advance(t0, t1 float64)
	// sample writes the receptor values at time t into out.
	sample(t float64, out []float64)
	// storedMass is the mass in the domain now.
	storedMass() float64
	// solveSteady replaces the field by the steady state of a constant
	// source, computed directly (no time stepping).
	solveSteady(ctx context.Context) (steadyStats, error)
}

// marchPlan says where to stop, how long a step may be and how much work
// the stepping may cost.
type marchPlan struct {
	times     []float64 // ascending output times, >= 0; the last may be +Inf
	switchOff float64   // source switch-off time (+Inf: none); a step boundary
	// breaks are further step boundaries (the switch-off times of the
	// other sources of a run with several).
	breaks     []float64
	dtMax      float64 // largest step (Courant limit)
	steadyZero bool    // the source switches off or depletes: the steady state is 0
	// settled: output times at or after it are answered with the long-time
	// limit (the steady state, or 0 when steadyZero) instead of time
	// stepping, which would change nothing (see settleTime); +Inf: never.
	settled float64
	// minSteps, when > 0, asks for at least that many steps up to each
	// output time: dt <= t_k/minSteps on the stretch ending at t_k (the
	// early-time resolution of the 1D automatic grid).
	minSteps float64
	// cells and workBudget: the stepping may cost at most workBudget
	// cell-steps; field names the budget's setting in errors.
	cells, workBudget float64
	field             string
}

// piece is a stretch of time stepping between two break points (output
// times, the switch-off time), done in n equal steps.
type piece struct {
	t0, t1 float64
	n      float64 // steps, >= 1, counted in float64
	limit  float64 // the step limit that set n
}

// schedule lays out the time stepping to the last output time before
// p.settled, piece by piece, counting the steps in float64 before any is
// taken, and checks the work against the budget. The counts it returns fit
// an int (the budget is at most maxWorkBudget cell-steps).
func (p *marchPlan) schedule() ([]piece, error) {
	var ps []piece
	t, work := 0.0, 0.0
	for _, target := range p.times {
		if target >= p.settled || math.IsInf(target, 1) {
			break
		}
		for t < target {
			end := target
			if p.switchOff > t && p.switchOff < end {
				end = p.switchOff
			}
			for _, b := range p.breaks {
				if b > t && b < end {
					end = b
				}
			}
			limit := p.dtMax
			if p.minSteps > 0 {
				limit = math.Min(limit, target/p.minSteps)
			}
			n := math.Ceil((end - t) / limit * (1 - 1e-12))
			if n < 1 {
				n = 1
			}
			ps = append(ps, piece{t0: t, t1: end, n: n, limit: limit})
			work += n * p.cells
			t = end
		}
	}
	if !(work <= p.workBudget) {
		return nil, p.workError(ps, work)
	}
	return ps, nil
}

// workError says which output time the work budget does not reach, the
// latest time it reaches, and what to reduce.
func (p *marchPlan) workError(ps []piece, need float64) error {
	steps := 0.0
	for _, pc := range ps {
		steps += pc.n
	}
	left, reach := p.workBudget, 0.0
	for _, pc := range ps {
		if w := pc.n * p.cells; w <= left {
			left -= w
			reach = pc.t1
			continue
		}
		reach = pc.t0 + math.Floor(left/p.cells)*(pc.t1-pc.t0)/pc.n
		break
	}
	at := ps[len(ps)-1].t1
	for _, t := range p.times {
		if t > reach {
			at = t
			break
		}
	}
	e := &BudgetError{Kind: BudgetWork, Field: p.field + ".WorkBudget", Need: need, Budget: p.workBudget, Time: at, Reach: reach}
	e.Detail = fmt.Sprintf("%s: the time stepping to t = %.6g needs %.3g cell-steps (%.3g steps of at most %.3g on %s cells) but the budget is %.3g, which reaches t = %.4g; ask for earlier times, coarsen the grid (PecletMax, Refine) or raise WorkBudget",
		e.Field, ps[len(ps)-1].t1, need, steps, p.dtMax, fmtCount(p.cells), p.workBudget, reach)
	return e
}

type marchStats struct {
	steps   int
	dtLimit float64      // the largest step limit that applied (0: no step taken)
	steady  *steadyStats // set when a (non-zero) steady state was solved
	// settled is the first finite output time answered with the long-time
	// limit (0: none).
	settled float64
}

// ctxWork is about the number of cell updates between two checks of the
// context during time stepping (at least one check per step).
const ctxWork = 1 << 15

// march advances m through the plan and returns values[receptor][time].
// marchedMass receives the stored mass at the end of the time stepping
// (before a steady state replaces the field).
func march(ctx context.Context, m model, nrec int, p marchPlan, marchedMass *float64) ([][]float64, marchStats, error) {
	var st marchStats
	pieces, err := p.schedule()
	if err != nil {
		return nil, st, err
	}
	vals := make([][]float64, nrec)
	for r := range vals {
		vals[r] = make([]float64, len(p.times))
	}
	buf := make([]float64, nrec)
	put := func(ti int) {
		for r := range vals {
			vals[r][ti] = buf[r]
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, st, fmt.Errorf("numeric: not started: %w", err)
	}
	d := driver{ctx: ctx, m: m, st: &st, every: int(math.Max(1, ctxWork/p.cells)), curDt: -1}
	next := 0
	recorded, haveSteady := false, false
	steadyVals := make([]float64, nrec)
	for ti, target := range p.times {
		if target >= p.settled || math.IsInf(target, 1) {
			if !math.IsInf(target, 1) && st.settled == 0 {
				st.settled = target
			}
			if !recorded {
				*marchedMass, recorded = m.storedMass(), true
			}
			if p.steadyZero {
				for r := range vals {
					vals[r][ti] = 0
				}
				continue
			}
			if !haveSteady {
				ss, err := m.solveSteady(ctx)
				if err != nil {
					return nil, st, err
				}
				st.steady, haveSteady = &ss, true
				// Sampled as at t = 0, when the (constant) source is on.
				m.sample(0, steadyVals)
			}
			copy(buf, steadyVals)
			put(ti)
			continue
		}
		for ; next < len(pieces) && pieces[next].t1 <= target; next++ {
			if err := d.run(pieces[next]); err != nil {
				return nil, st, err
			}
		}
		m.sample(d.t, buf)
		put(ti)
	}
	if !recorded {
		*marchedMass = m.storedMass()
	}
	return vals, st, nil
}

// driver takes the time steps of the pieces and checks the context every
// few steps.
type driver struct {
	ctx   context.Context
	m     model
	st    *marchStats
	every int
	t     float64
	curDt float64
}

// run advances through the piece in equal steps, the last one ending
// exactly at pc.t1.
func (d *driver) run(pc piece) error {
	n := int(pc.n)
	dt := (pc.t1 - d.t) / pc.n
	d.st.dtLimit = math.Max(d.st.dtLimit, pc.limit)
	for k := 1; k <= n; k++ {
		t1 := d.t + dt
		if k == n {
			t1 = pc.t1
		}
		if err := d.step(d.t, t1); err != nil {
			return err
		}
		d.t = t1
	}
	return nil
}

func (d *driver) step(t0, t1 float64) error {
	dt := t1 - t0
	if dt != d.curDt {
		d.m.setStep(dt)
		d.curDt = dt
	}
	d.m.advance(t0, t1)
	d.st.steps++
	if d.st.steps%d.every == 0 {
		if err := d.ctx.Err(); err != nil {
			return fmt.Errorf("numeric: stopped at t = %g after %d steps: %w", t1, d.st.steps, err)
		}
	}
	return nil
}
