package numeric

import (
	"context"
	"fmt"
	"math"
)

// solveSteady replaces the field by the steady state of the column for a
// constant source (C/C0 = 1 at the inlet), computed directly from the
// steady conservative balance of every cell,
//
//	F_{i-1/2} - F_{i+1/2} - R Mu V_i C_i = 0,
//
// with the same face fluxes as the transient solver: dispersive A D (C_i -
// C_{i+1})/h, advective q times the limited face value C_i + L_i/2 with
// L_i = vanLeer(C_i - C_{i-1}, C_{i+1} - C_i) (the flux-limited
// Lax-Wendroff value in its steady limit, Courant number -> 0: second order
// where smooth, no new extrema), the inlet and outflow faces as in the time
// steps. No time step is involved, so the steady state carries no splitting
// error.
//
// The limiter makes the balance nonlinear. It is solved by Picard iteration
// on its positive-coefficient form: the advective part of the balance of
// cell i is exactly q beta_i (C_i - C_{i-1}) with
// beta_i = 1 + L_i/(2 a_i) - L_{i-1}/(2 b_{i-1}) in [0, 2] (a, b the upwind
// and downwind differences; the TVD bounds of the limiter), so with beta
// frozen at the current iterate the balance is a tridiagonal M-matrix
// system, solved with LAPACK Dgtsv (gonum); the first solve (beta = 1) is
// first-order upwind. The iteration stops when the residual of the
// nonlinear balance (summed absolute value over the cells, relative to the
// inflow) is below SteadyTolerance.
func (m *column) solveSteady(ctx context.Context) (steadyStats, error) {
	const cb = 1.0
	n, q := m.n, m.q
	cond := m.disp.cond
	dl, d, du := make([]float64, max(n-1, 0)), make([]float64, n), make([]float64, max(n-1, 0))
	beta := make([]float64, n)
	for i := range beta {
		beta[i] = 1
	}
	// Cell 0 is compared with the inflow value: cb (first-type) or the
	// Robin face value Cb = cb - (g_eff/q)(cb - c0) (third-type, where the
	// whole inflow q cb is fixed and C_0 - Cb = (1 - g_eff/q)(C_0 - cb)).
	robin := 1.0
	if !m.inletFirst {
		robin = 1 - m.gIn/q
	}
	c := m.c
	var st steadyStats
	for it := 1; it <= steadyMaxIter; it++ {
		for i := range d {
			d[i] = m.stor[i]*m.mu + q*beta[i]
			if i > 0 {
				d[i] += cond[i-1]
				dl[i-1] = -q*beta[i] - cond[i-1]
			}
			if i < n-1 {
				d[i] += cond[i]
				du[i] = -cond[i]
			}
		}
		rhs := c
		for i := range rhs {
			rhs[i] = 0
		}
		rhs[0] = q * beta[0] * cb
		if m.inletFirst {
			d[0] += m.gIn
			rhs[0] += m.gIn * cb
		}
		if !lapackImpl.Dgtsv(n, 1, dl, d, du, rhs, 1) {
			return st, fmt.Errorf("%w: singular steady-state system", ErrNotConverged)
		}
		if err := ctx.Err(); err != nil {
			return st, fmt.Errorf("numeric: steady-state iteration stopped after %d iterations: %w", it-1, err)
		}
		res, in := m.steadyResidual(c, cb, beta, robin)
		st.iterations, st.residual = it, res/in
		if st.residual <= SteadyTolerance {
			st.budget = m.steadyBudget(c, cb)
			return st, nil
		}
	}
	return st, fmt.Errorf("%w: the steady-state iteration stopped after %d iterations at relative residual %.3g (tolerance %g)",
		ErrNotConverged, steadyMaxIter, st.residual, SteadyTolerance)
}

// inflowValue is the concentration carried into cell 0 by advection: the
// source value (first-type) or the inlet face value Cb of the Robin condition
// (third-type).
func (m *column) inflowValue(c0, cb float64) float64 {
	if m.inletFirst {
		return cb
	}
	return cb - m.gIn/m.q*(cb-c0)
}

// steadyResidual returns the summed absolute cell residual of the steady
// balance at c and the inflow rate, and stores in beta the coefficients of
// the positive-coefficient form at c (see solveSteady).
func (m *column) steadyResidual(c []float64, cb float64, beta []float64, robin float64) (res, in float64) {
	n, q := m.n, m.q
	cond := m.disp.cond
	prev := m.inflowValue(c[0], cb)
	fin := q * cb // third-type: q Cb + g_eff (cb - c0) = q cb
	if m.inletFirst {
		fin += m.gIn * (cb - c[0])
	}
	in = fin
	phiPrev := 0.0 // L_{i-1}/b_{i-1}
	for i := 0; i < n; i++ {
		var fout, kappa, phi float64
		if i < n-1 {
			a, b := c[i]-prev, c[i+1]-c[i]
			lim := vanLeer(a, b)
			if lim != 0 {
				kappa, phi = lim/a, lim/b
			}
			fout = q*(c[i]+0.5*lim) + cond[i]*(c[i]-c[i+1])
		} else {
			fout = q * c[i]
		}
		if i == 0 {
			beta[0] = 1 + 0.5*kappa*robin
		} else {
			beta[i] = 1 + 0.5*kappa - 0.5*phiPrev
		}
		res += math.Abs(fin - fout - m.stor[i]*m.mu*c[i])
		fin = fout
		prev = c[i]
		phiPrev = phi
	}
	return res, in
}

func (m *column) steadyBudget(c []float64, cb float64) SteadyBudget {
	var b SteadyBudget
	cin := m.inflowValue(c[0], cb)
	b.InletAdvective = m.q * cin
	if m.inletFirst {
		b.InletDispersive = m.gIn * (cb - c[0])
	} else {
		b.InletDispersive = m.q*cb - b.InletAdvective
	}
	b.Outflow = m.q * c[m.n-1]
	var dec, st kahan
	for i, v := range c {
		dec.add(m.stor[i] * m.mu * v)
		st.add(m.stor[i] * v)
	}
	b.Decayed, b.Stored = dec.sum, st.sum
	b.close(1)
	return b
}
