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
}

// marchPlan says where to stop and how long a step may be.
type marchPlan struct {
	times      []float64 // ascending output times, >= 0; the last may be +Inf
	switchOff  float64   // source switch-off time (+Inf: none); a step boundary
	dtMax      float64   // largest step (Courant limit)
	tMinSteady float64   // steady state: do not test convergence before this time
	tCapSteady float64   // steady state: give up after this time
	window     float64   // steady state: interval between convergence tests
	steadyZero bool      // the source switches off or depletes: the steady state is 0
}

// Steady-state tolerance: the receptor values and the stored mass change by
// less than this (relative, with an absolute floor for receptor values) over
// one test window.
const (
	steadyRelTol = 1e-8
	steadyAbsTol = 1e-11
)

type marchStats struct {
	steps      int
	steadyTime float64 // time reached when the steady state was accepted (0 if not asked)
	dtLast     float64
}

// march advances m through the plan and returns values[receptor][time].
func march(ctx context.Context, m model, nrec int, p marchPlan) ([][]float64, marchStats, error) {
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
			if err := runSteady(m, &t, p, buf, nrec, step, &st); err != nil {
				return nil, st, err
			}
			put(ti)
			continue
		}
		if err := runTo(target); err != nil {
			return nil, st, err
		}
		m.sample(t, buf)
		put(ti)
	}
	return vals, st, nil
}

func runSteady(m model, t *float64, p marchPlan, buf []float64, nrec int,
	step func(t0, t1 float64) error, st *marchStats) error {
	// Steps of dtMax in windows of an even number of steps: the split
	// operators alternate their order from step to step, so the state is
	// compared at the same parity.
	dt := p.dtMax
	nw := 2 * int(math.Ceil(p.window/dt/2))
	prev := make([]float64, nrec)
	m.sample(*t, prev)
	prevMass := m.storedMass()
	for {
		for k := 0; k < nw; k++ {
			if err := step(*t, *t+dt); err != nil {
				return err
			}
			*t += dt
		}
		m.sample(*t, buf)
		mass := m.storedMass()
		ok := *t >= p.tMinSteady && math.Abs(mass-prevMass) <= steadyRelTol*math.Abs(mass)
		for r := 0; ok && r < nrec; r++ {
			if math.Abs(buf[r]-prev[r]) > steadyAbsTol+steadyRelTol*math.Abs(buf[r]) {
				ok = false
			}
		}
		if ok {
			// The two orders of the split step leave states a splitting
			// error O(dt) apart on either side of the steady state; their
			// mean cancels the leading term.
			if err := step(*t, *t+dt); err != nil {
				return err
			}
			*t += dt
			m.sample(*t, prev)
			for r := range buf {
				buf[r] = 0.5 * (buf[r] + prev[r])
			}
			st.steadyTime = *t
			return nil
		}
		if *t > p.tCapSteady {
			return fmt.Errorf("%w: still changing at t = %g (limit %g); receptor or mass change over the last %g exceeds %g relative",
				ErrNotConverged, *t, p.tCapSteady, float64(nw)*dt, steadyRelTol)
		}
		copy(prev, buf)
		prevMass = mass
	}
}
