package numeric

import (
	"context"
	"fmt"
	"math"
)

// Steady state of the 3D problem.
//
// The steady balance of every cell, with the same face fluxes as the time
// steps (advection with the flux-limited face value in its steady limit,
// C_i + phi b/2; dispersion by face conductances; the inlet patch and the
// outflow face as in the transient solver) and decay, is solved by defect
// correction in pseudo-time with an alternating-direction implicit (ADI)
// preconditioner (approximate factorization; Peaceman & Rachford 1955,
// J. SIAM 3(1); Douglas & Gunn 1964, Numer. Math. 6): with r(C) the
// residual of the nonlinear balance (per unit volume, over R),
//
//	(I + tau Ax)(I + tau Ay)(I + tau Az) dC = tau r(C),   C <- C + dC,
//
// where Ax is first-order upwind advection plus dispersion along x plus
// decay, and Ay, Az dispersion across; each factor is a set of tridiagonal
// systems along grid lines. The pseudo-time step tau cycles geometrically
// between the diffusion time of the smallest cell and the residence time of
// the domain, so that every error component, from cell scale to domain
// scale, is damped within a cycle (the parameter cycling of ADI iterations,
// Wachspress 1966, Iterative Solution of Elliptic Systems). The iteration
// stops when the summed absolute residual of the cells, a mass rate, is
// below SteadyTolerance times the inflow rate; the steady budget then
// closes to that tolerance. No time step enters the converged answer, so it
// carries no splitting error.

// steadyCycle is the number of pseudo-time steps per cycle.
const steadyCycle = 8

func (g *grid3) solveSteady(ctx context.Context) (steadyStats, error) {
	const cb = 1.0
	res := make([]float64, g.nx*g.np)
	taus, fs, err := g.steadyFactors()
	if err != nil {
		return steadyStats{}, err
	}
	var st steadyStats
	for it := 1; it <= steadyMaxIter; it++ {
		sum, in := g.steadyResidual(res, cb)
		st.iterations, st.residual = it-1, sum/in
		if st.residual <= SteadyTolerance {
			st.budget = g.steadyBudget(cb)
			return st, nil
		}
		if err := ctx.Err(); err != nil {
			return st, fmt.Errorf("numeric: steady-state iteration stopped after %d iterations: %w", it-1, err)
		}
		g.steadySweep(res, &fs[(it-1)%steadyCycle], taus[(it-1)%steadyCycle])
		for q, v := range res {
			g.c[q] += v
		}
	}
	return st, fmt.Errorf("%w: the steady-state iteration stopped after %d iterations at relative residual %.3g (tolerance %g)",
		ErrNotConverged, steadyMaxIter, st.residual, SteadyTolerance)
}

// steadyFactors are the factorizations of one pseudo-time step tau of the
// steady-state cycle: the x operator, and the y and z dispersion matrices.
type steadyFactors struct {
	x    triLU
	y, z *dispersionMatrix
}

// steadyFactors returns the cycle's pseudo-time steps (geometric from
// steadyTauRange's shortest to its longest) and their factorizations.
func (g *grid3) steadyFactors() ([]float64, []steadyFactors, error) {
	nx := g.nx
	tauMin, tauMax := g.steadyTauRange()
	taus := make([]float64, steadyCycle)
	for k := range taus {
		taus[k] = tauMin * math.Pow(tauMax/tauMin, float64(k)/float64(steadyCycle-1))
	}
	fs := make([]steadyFactors, steadyCycle)
	condx := g.dispX.cond
	dl, d, du := make([]float64, max(nx-1, 0)), make([]float64, nx), make([]float64, max(nx-1, 0))
	for k, tau := range taus {
		for i := 0; i < nx; i++ {
			d[i] = g.r*g.dx[i]*(1+tau*g.mu) + tau*g.v
			if i > 0 {
				d[i] += tau * condx[i-1]
			}
			if i < nx-1 {
				d[i] += tau * condx[i]
				du[i] = -tau * condx[i]
				dl[i] = -tau * (g.v + condx[i])
			}
		}
		d[0] += tau * g.dispX.gLo
		if !fs[k].x.factor(dl, d, du) {
			return nil, nil, fmt.Errorf("%w: steady-state x factorization failed", ErrNotConverged)
		}
		fs[k].y = newDispersionMatrix(g.dispY.stor, g.dispY.cond, 0)
		fs[k].y.fixedTheta = 1
		fs[k].y.factor(tau)
		fs[k].z = newDispersionMatrix(g.dispZ.stor, g.dispZ.cond, 0)
		fs[k].z.fixedTheta = 1
		fs[k].z.factor(tau)
	}
	return taus, fs, nil
}

// steadySweep turns the residual res into the correction of one
// pseudo-time step tau, in place, by the three directional solves of the
// approximate factorization.
func (g *grid3) steadySweep(res []float64, f *steadyFactors, tau float64) {
	nx, np, ny, nz := g.nx, g.np, g.ny, g.nz
	// x: [R dx (1 + tau mu) + tau (U + Kx)] w = tau r / (dy dz).
	for i := 0; i < nx; i++ {
		row := res[i*np : (i+1)*np]
		for p, a := range g.area {
			row[p] *= tau / a
		}
	}
	f.x.solveRows(res, np)
	// y: [R dy + tau Ky] w' = R dy w, lines of ny contiguous values.
	for l := 0; l < nx*nz; l++ {
		row := res[l*ny : (l+1)*ny]
		for j := range row {
			row[j] *= f.y.stor[j]
		}
	}
	for i := 0; i < nx; i++ {
		f.y.solveCols(res[i*np:(i+1)*np], nz)
	}
	// z: [R dz + tau Kz] dC = R dz w', rows of ny values per x-plane.
	for i := 0; i < nx; i++ {
		for k := 0; k < nz; k++ {
			row := res[i*np+k*ny : i*np+(k+1)*ny]
			s := f.z.stor[k]
			for j := range row {
				row[j] *= s
			}
		}
		f.z.solveRows(res[i*np:(i+1)*np], ny)
	}
}

// steadyTauRange returns the shortest and longest pseudo-time steps: a
// quarter of the smallest cell's dispersion time R h^2/D over the three
// directions, and the residence time R Lx / V of the domain (at least
// 1/Mu's share of it when decay is fast).
func (g *grid3) steadyTauRange() (lo, hi float64) {
	lo = math.Inf(1)
	for _, a := range []struct {
		ax   Axis
		cond []float64
		d    float64
	}{{g.x, g.dispX.cond, g.dDisp[0]}, {g.y, g.dispY.cond, g.dDisp[1]}, {g.z, g.dispZ.cond, g.dDisp[2]}} {
		h, _ := a.ax.minMax()
		lo = math.Min(lo, 0.25*g.r*h*h/a.d)
	}
	hi = g.r * g.x.Length() / g.v
	if hi < lo {
		hi = lo
	}
	return lo, hi
}

// steadyResidual writes into res the mass rate residual of every cell
// (net inflow minus decay) and returns its summed absolute value and the
// inflow rate (half domain).
func (g *grid3) steadyResidual(res []float64, cb float64) (sum, in float64) {
	in = g.steadyLongitudinal(res, cb)
	g.steadyTransverse(res)
	return g.steadyDecay(res), in
}

// steadyLongitudinal writes into res each cell's net inflow through its x
// faces (advection with the van Leer limiter, dispersion) and returns the
// inflow rate through the inlet face.
func (g *grid3) steadyLongitudinal(res []float64, cb float64) (in float64) {
	nx, np := g.nx, g.np
	c := g.c
	v := g.v
	condx := g.dispX.cond
	gLo := g.dispX.gLo
	fin := g.fin
	// Inlet face.
	for p, a := range g.area {
		b := cb * g.patch[p]
		fin[p] = v*b + gLo*(b-c[p])
		in += a * fin[p]
	}
	// x fluxes, per unit transverse area, times the face area.
	for i := 0; i < nx; i++ {
		cur := c[i*np : (i+1)*np]
		r := res[i*np : (i+1)*np]
		if i == nx-1 {
			for p, ci := range cur {
				r[p] = (fin[p] - v*ci) * g.area[p]
			}
			continue
		}
		next := c[(i+1)*np : (i+2)*np]
		k := condx[i]
		if i == 0 {
			for p, ci := range cur {
				fout := v*(ci+0.5*vanLeer(ci-cb*g.patch[p], next[p]-ci)) + k*(ci-next[p])
				r[p] = (fin[p] - fout) * g.area[p]
				fin[p] = fout
			}
			continue
		}
		prev := c[(i-1)*np : i*np]
		for p, ci := range cur {
			fout := v*(ci+0.5*vanLeer(ci-prev[p], next[p]-ci)) + k*(ci-next[p])
			r[p] = (fin[p] - fout) * g.area[p]
			fin[p] = fout
		}
	}
	return in
}

// steadyTransverse adds to res each cell's net dispersive inflow through
// its y and z faces.
func (g *grid3) steadyTransverse(res []float64) {
	nx, ny, nz, np := g.nx, g.ny, g.nz, g.np
	c := g.c
	condy, condz := g.dispY.cond, g.dispZ.cond
	for i := 0; i < nx; i++ {
		dxi := g.dx[i]
		for k := 0; k < nz; k++ {
			base := i*np + k*ny
			row := c[base : base+ny]
			r := res[base : base+ny]
			// y faces, area dx dz.
			w := dxi * g.dz[k]
			for j := 0; j < ny-1; j++ {
				f := w * condy[j] * (row[j] - row[j+1])
				r[j] -= f
				r[j+1] += f
			}
			// z faces to the next layer, area dx dy.
			if k < nz-1 {
				below := c[base+ny : base+2*ny]
				rb := res[base+ny : base+2*ny]
				for j := range row {
					f := dxi * g.dy[j] * condz[k] * (row[j] - below[j])
					r[j] -= f
					rb[j] += f
				}
			}
		}
	}
}

// steadyDecay subtracts each cell's decay rate from res and returns the
// summed absolute value of the residuals.
func (g *grid3) steadyDecay(res []float64) (sum float64) {
	nx, ny, nz, np := g.nx, g.ny, g.nz, g.np
	c := g.c
	rmu := g.r * g.mu
	for i := 0; i < nx; i++ {
		for k := 0; k < nz; k++ {
			base := i*np + k*ny
			row := c[base : base+ny]
			r := res[base : base+ny]
			vol := g.dx[i] * g.dz[k]
			for j, cj := range row {
				r[j] -= rmu * vol * g.dy[j] * cj
				sum += math.Abs(r[j])
			}
		}
	}
	return sum
}

// steadyBudget is the steady budget of the current field (whole plume).
func (g *grid3) steadyBudget(cb float64) SteadyBudget {
	var b SteadyBudget
	var adv, disp, out kahan
	np := g.np
	for p, a := range g.area {
		bc := cb * g.patch[p]
		adv.add(a * g.v * bc)
		disp.add(a * g.dispX.gLo * (bc - g.c[p]))
		out.add(a * g.v * g.c[(g.nx-1)*np+p])
	}
	stored := g.storedMass()
	b.InletAdvective, b.InletDispersive, b.Outflow = adv.sum, disp.sum, out.sum
	b.Stored = stored
	b.Decayed = g.mu * stored
	b.close(g.mirror())
	return b
}
