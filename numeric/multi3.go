package numeric

import (
	"context"
	"math"
)

// multi3 is the model of a run with several sources: one field per source
// (a grid3 over the cells downstream of its face, on the shared y and z
// axes), advanced together with the same time steps; the receptor values
// are the sum of Strength times each field's (see sources3d.go).
type multi3 struct {
	comps    []*grid3
	strength []float64
	hist     []History
	// recIdx[i][k] is the receptor (of the problem) that receptor k of
	// field i is; receptors upstream of a source's face are not in its
	// field (it contributes nothing there).
	recIdx [][]int
	trIdx  [][]int   // the same for the transects
	stored []float64 // per field: stored mass at the last storedMass
	steady bool      // the fields hold the long-time limit
	buf    []float64
	nrec   int // receptors of the problem (the transects follow them in the output)
}

func newMulti3(p *Problem3D, lay layout3) *multi3 {
	m := &multi3{stored: make([]float64, len(p.Sources)), nrec: len(p.Receptors)}
	for _, s := range p.Sources {
		k := lay.faceIndex(s.X)
		shift := lay.x.Faces[k]
		sub := make([]float64, len(lay.x.Faces)-k)
		for i := range sub {
			sub[i] = lay.x.Faces[k+i] - shift
		}
		g := newGrid3(Axis{Faces: sub}, lay.y, lay.z, p.V, p.Dx, p.Dy, p.Dz, p.R, p.Mu, 0, 0, s.History)
		g.fullY = lay.full
		g.setPatch(s.Y, 0.5*s.Width, s.Depth)
		var idx []int
		for r, rc := range p.Receptors {
			x := (rc.X - lay.x0) - shift
			if x < 0 {
				continue
			}
			rc.X = x
			g.rec = append(g.rec, rc)
			idx = append(idx, r)
		}
		var tIdx []int
		for q, tr := range p.Transects {
			x := (tr.X - lay.x0) - shift
			if x < 0 {
				continue
			}
			tr.X = x
			g.tr = append(g.tr, tr)
			tIdx = append(tIdx, q)
		}
		m.trIdx = append(m.trIdx, tIdx)
		m.comps = append(m.comps, g)
		m.strength = append(m.strength, s.Strength)
		m.hist = append(m.hist, s.History)
		m.recIdx = append(m.recIdx, idx)
		m.buf = make([]float64, max(len(m.buf), len(idx)+len(tIdx)))
	}
	return m
}

// plan is the time stepping of the run: the Courant limit on the smallest
// cell of the shared x axis (and, on the automatic grid, the travel time
// to the nearest receptor downstream of any source), a break at every
// source's switch-off, work counted over all the fields, and the long-time
// limit once every field has reached its own.
func (m *multi3) plan(p *Problem3D, lay layout3) marchPlan {
	lo, _ := lay.x.minMax()
	dtMax := orDefault(p.Courant, 1) * p.R * lo / p.V
	if p.Grid == nil {
		dtMax = math.Max(math.Min(dtMax, nearStepSources(p)), 0.5*dtMax)
	}
	plan := marchPlan{times: p.Times, switchOff: math.Inf(1), dtMax: dtMax, steadyZero: true,
		workBudget: orDefault(p.WorkBudget, DefaultWorkBudget3D), field: "Problem3D"}
	acr := []across{{lay.y.Length(), p.Dy}, {lay.z.Length(), p.Dz}}
	for i, g := range m.comps {
		h := m.hist[i]
		if off := h.switchOff(); !math.IsInf(off, 1) {
			plan.breaks = append(plan.breaks, off)
		}
		plan.steadyZero = plan.steadyZero && h.fades()
		plan.cells += float64(g.nx) * float64(g.np)
		_, hMax := g.x.minMax()
		dEff := p.Dx + 0.5*p.V*hMax
		l := g.x.Length()
		s := settledFrom(h, func(k float64) float64 { return settleTime(p.V, dEff, p.R, p.Mu, l, acr, k) })
		plan.settled = math.Max(plan.settled, s)
	}
	return plan
}

func (m *multi3) setStep(dt float64) {
	for _, g := range m.comps {
		g.setStep(dt)
	}
}

func (m *multi3) advance(t0, t1 float64) {
	for _, g := range m.comps {
		g.advance(t0, t1)
	}
}

// sample writes the sum over the sources of Strength times the field's
// value (each in [0, 1] relative to its own source).
func (m *multi3) sample(t float64, out []float64) {
	for r := range out {
		out[r] = 0
	}
	for i, g := range m.comps {
		if m.steady && m.hist[i].fades() {
			continue // its long-time limit is 0
		}
		v := m.buf[:len(g.rec)+len(g.tr)]
		g.sample(t, v)
		for k, r := range m.recIdx[i] {
			out[r] += m.strength[i] * v[k]
		}
		nr := len(m.recIdx[i])
		for k, q := range m.trIdx[i] {
			out[m.nrec+q] += m.strength[i] * v[nr+k]
		}
	}
}

// storedMass is the mass in all the fields (relative to C_ref, half domain
// when mirrored), and keeps each field's for the budget.
func (m *multi3) storedMass() float64 {
	s := 0.0
	for i, g := range m.comps {
		m.stored[i] = g.storedMass()
		s += m.strength[i] * m.stored[i]
	}
	return s
}

// solveSteady solves the steady state of every field whose source is
// constant and empties the others (their limit is 0).
func (m *multi3) solveSteady(ctx context.Context) (steadyStats, error) {
	var st steadyStats
	var sum SteadyBudget
	m.steady = true
	for i, g := range m.comps {
		if m.hist[i].fades() {
			clear(g.c)
			continue
		}
		s, err := g.solveSteady(ctx)
		if err != nil {
			return st, err
		}
		st.iterations = max(st.iterations, s.iterations)
		st.residual = math.Max(st.residual, s.residual)
		w := m.strength[i]
		b := s.budget
		sum.InletAdvective += w * b.InletAdvective
		sum.InletDispersive += w * b.InletDispersive
		sum.Outflow += w * b.Outflow
		sum.Decayed += w * b.Decayed
		sum.Stored += w * b.Stored
	}
	sum.close(1)
	st.budget = sum
	return st, nil
}

// budget is the mass budget of the time stepping, summed over the fields
// weighted by Strength (whole plume).
func (m *multi3) budget() MassBudget {
	var sum MassBudget
	for i, g := range m.comps {
		b := g.acc.result(m.stored[i], g.mirror())
		w := m.strength[i]
		sum.InletAdvective += w * b.InletAdvective
		sum.InletDispersive += w * b.InletDispersive
		sum.Outflow += w * b.Outflow
		sum.Decayed += w * b.Decayed
		sum.Stored += w * b.Stored
	}
	sum.In = sum.InletAdvective + sum.InletDispersive
	if sum.In > 0 {
		sum.ClosureError = math.Abs(sum.Stored-(sum.In-sum.Outflow-sum.Decayed)) / sum.In
	}
	return sum
}
