package numeric

import (
	"context"
	"errors"
	"math"
)

// ChainProblem3D is the 3D screening problem of Problem3D for a decay
// chain: the flow, dispersion, source rectangle, history, receptors, times,
// grid and budgets of Problem3D (its R and Mu are not used; each species
// has its own), and the species with their source values (the value held
// on the source patch, times the History factor). The output times must be
// finite.
type ChainProblem3D struct {
	Problem3D
	Species []Species
}

// ScreenChain3D solves the chain in 3D: each species transported as in
// Screen3D with its own retardation factor, the reaction step coupling them
// (see chain.go). The automatic grid is designed for the smallest
// retardation factor (the longest reach); the time step obeys the Courant
// limit of the fastest species and the near-receptor limit of Screen3D for
// it. Work is counted as cells times species times steps, and the cells of
// all species together against CellBudget.
func ScreenChain3D(ctx context.Context, p ChainProblem3D) (*ChainResult, error) {
	if err := validateSpecies("ChainProblem3D.Species", p.Species); err != nil {
		return nil, err
	}
	base := p.Problem3D
	base.R, base.Mu = minR(p.Species), 0
	// The cell budget bounds the memory: every species has its fields.
	ns := len(p.Species)
	base.CellBudget = max(int(orDefault(float64(base.CellBudget), DefaultCellBudget3D))/ns, 1)
	if err := finiteTimes("ChainProblem3D.Times", base.Times); err != nil {
		return nil, err
	}
	g0, plan, err := setup3D(&base)
	if err != nil {
		return nil, err
	}
	m := &chainGrid{sp: p.Species, re: newReaction(p.Species), hist: base.History, produced: make([]kahan, ns)}
	reused := false
	for _, s := range p.Species {
		g := g0 // built by setup3D for the smallest R, without decay
		if s.R != base.R || reused {
			g = newGrid3(g0.x, g0.y, g0.z, base.V, base.Dx, base.Dy, base.Dz, s.R, 0, 0.5*base.Width, base.Depth, base.History)
			g.rec = base.Receptors
		} else {
			reused = true
		}
		m.grids = append(m.grids, g)
	}
	// setup3D planned for the smallest R; every species steps with it.
	plan.settled = math.Inf(1)
	plan.cells *= float64(ns)
	plan.field = "ChainProblem3D"
	nrec := len(base.Receptors)
	var marched float64
	vals, st, err := march(ctx, m, ns*nrec, plan, &marched)
	if err != nil {
		return nil, err
	}
	rep := report3(g0, base.V, base.Dx)
	rep.Steps = st.steps
	rep.CellSteps = float64(rep.Cells) * float64(ns) * float64(st.steps)
	if st.steps > 0 {
		rep.TimeStep = plan.dtMax
		rep.Courant = base.V * plan.dtMax / (base.R * rep.DXMin)
	}
	res := &ChainResult{C: reshape(vals, ns, nrec), Grid: rep}
	for i, g := range m.grids {
		mb := g.acc.result(g.storedMass(), 2)
		res.Budgets = append(res.Budgets, speciesBudget(mb, 2*m.produced[i].sum))
	}
	res.Total = chainTotal(res.Budgets)
	return res, nil
}

// chainGrid is the discretized 3D chain: one grid3 per species on the same
// axes, and the reaction step.
type chainGrid struct {
	grids    []*grid3
	sp       []Species
	re       *reaction
	hist     History
	parity   int
	produced []kahan
	vol      []float64   // cell volumes dx dy dz, len nx*np
	wf       [][]float64 // per species: integral of its concentration over the step
}

func (m *chainGrid) setStep(dt float64) {
	for _, g := range m.grids {
		g.setStep(dt)
	}
	m.re.setStep(dt)
}

func (m *chainGrid) advance(t0, t1 float64) {
	cb := m.hist.mean(t0, t1)
	m.parity ^= 1
	if m.parity == 1 {
		for i, g := range m.grids {
			cbi := cb * m.sp[i].Source
			g.advect(cbi)
			g.disperseX(cbi)
			g.disperseY()
			g.disperseZ()
		}
		m.react()
	} else {
		m.react()
		for i, g := range m.grids {
			cbi := cb * m.sp[i].Source
			g.disperseZ()
			g.disperseY()
			g.disperseX(cbi)
			g.advect(cbi)
		}
	}
}

// react applies the reaction step to every cell (reaction.cell, written
// species by species over whole fields so that the loops stream through
// memory); the mass of a cell is its concentration times R dx dy dz.
func (m *chainGrid) react() {
	g0 := m.grids[0]
	if m.vol == nil {
		m.vol = make([]float64, len(g0.c))
		for ix := 0; ix < g0.nx; ix++ {
			for k := 0; k < g0.nz; k++ {
				for j := 0; j < g0.ny; j++ {
					m.vol[ix*g0.np+k*g0.ny+j] = g0.dx[ix] * g0.dz[k] * g0.dy[j]
				}
			}
		}
		m.wf = make([][]float64, len(m.grids))
		for i := range m.wf {
			m.wf[i] = make([]float64, len(g0.c))
		}
	}
	re := m.re
	for i, js := range re.nz {
		w := m.wf[i]
		clear(w)
		for k, j := range js {
			axpy(re.vals[i][k], m.grids[j].c, w)
		}
	}
	for i, s := range re.sp {
		w, c := m.wf[i], m.grids[i].c
		var lost float64
		for q, wq := range w {
			d := s.Mu * wq
			c[q] -= d
			lost += d * m.vol[q]
		}
		m.grids[i].acc.decayed.add(m.grids[i].r * lost)
		if s.Daughter < 0 {
			continue
		}
		cd := m.grids[s.Daughter].c
		pr := re.prod[i]
		var made float64
		for q, wq := range w {
			g := pr * wq
			cd[q] += g
			made += g * m.vol[q]
		}
		m.produced[s.Daughter].add(m.grids[s.Daughter].r * made)
	}
}

// axpy adds a times x to y.
func axpy(a float64, x, y []float64) {
	y = y[:len(x)]
	for q, v := range x {
		y[q] += a * v
	}
}

func (m *chainGrid) sample(t float64, out []float64) {
	cb := m.hist.value(t)
	g0 := m.grids[0]
	nrec := len(g0.rec)
	prof := make([]float64, g0.nz)
	for s, g := range m.grids {
		for r, rc := range g.rec {
			out[s*nrec+r] = math.Max(0, g.valueAt(rc, cb*m.sp[s].Source, prof))
		}
	}
}

func (m *chainGrid) storedMass() float64 {
	s := 0.0
	for _, g := range m.grids {
		s += g.storedMass()
	}
	return s
}

func (m *chainGrid) solveSteady(context.Context) (steadyStats, error) {
	return steadyStats{}, errors.New("numeric: the steady state of a chain is not solved directly")
}
