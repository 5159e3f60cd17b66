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

// marchPlan says where to stop and how long a step may be.
type marchPlan struct {
	times      []float64 // ascending output times, >= 0; the last may be +Inf
	switchOff  float64   // source switch-off time (+Inf: none); a step boundary
	dtMax      float64   // largest step (Courant limit)
	steadyZero bool      // the source switches off or depletes: the steady state is 0
}

type marchStats struct {
	steps  int
	dtLast float64
	steady *steadyStats // set when a (non-zero) steady state was solved
}

// march advances m through the plan and returns values[receptor][time].
// marchedMass receives the stored mass at the end of the time stepping
// (before a steady state replaces the field).
func march(ctx context.Context, m model, nrec int, p marchPlan, marchedMass *float64) ([][]float64, marchStats, error) {
	var st marchStats
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
	t := 0.0
	curDt := -1.0
	step := func(t0, t1 float64) error {
		dt := t1 - t0
		if dt != curDt {
			m.setStep(dt)
			curDt = dt
		}
		m.advance(t0, t1)
		st.steps++
		st.dtLast = dt
		if st.steps&7 == 0 {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("numeric: stopped at t = %g after %d steps: %w", t1, st.steps, err)
			}
		}
		return nil
	}
	// runTo advances to target exactly, in equal steps within each piece
	// between break points.
	runTo := func(target float64) error {
		for t < target {
			end := target
			if p.switchOff > t && p.switchOff < end {
				end = p.switchOff
			}
			n := math.Ceil((end - t) / p.dtMax * (1 - 1e-12))
			if n < 1 {
				n = 1
			}
			dt := (end - t) / n
			for k := 1; k <= int(n); k++ {
				t1 := t + dt
				if k == int(n) {
					t1 = end
				}
				if err := step(t, t1); err != nil {
					return err
				}
				t = t1
			}
		}
		return nil
	}
	if err := ctx.Err(); err != nil {
		return nil, st, fmt.Errorf("numeric: not started: %w", err)
	}
	for ti, target := range p.times {
		if math.IsInf(target, 1) && p.steadyZero {
			for r := range vals {
				vals[r][ti] = 0
			}
			continue
		}
		if math.IsInf(target, 1) {
			*marchedMass = m.storedMass()
			ss, err := m.solveSteady(ctx)
			if err != nil {
				return nil, st, err
			}
			st.steady = &ss
			// Sampled as at t = 0, when the (constant) source is on.
			m.sample(0, buf)
			put(ti)
			continue
		}
		if err := runTo(target); err != nil {
			return nil, st, err
		}
		m.sample(t, buf)
		put(ti)
	}
	if len(p.times) == 0 || !math.IsInf(p.times[len(p.times)-1], 1) || p.steadyZero {
		*marchedMass = m.storedMass()
	}
	return vals, st, nil
}
