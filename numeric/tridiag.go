package numeric

import (
	"math"

	"gonum.org/v1/gonum/lapack/gonum"
)

var lapackImpl gonum.Implementation

// dispersionMatrix is the theta-scheme of implicit dispersion along one
// direction:
//
//	(S + theta dt K) C' = (S - (1-theta) dt K) C + dt g cb
//
// with S the diagonal storage (cell size times cross-section, times R), K
// the symmetric conductance matrix (face area times dispersion coefficient
// over centre distance) and g cb the Dirichlet boundary terms. The left
// matrix is symmetric positive definite, factored as L D L^T with LAPACK
// Dpttrf and solved with Dpttrs for any number of right-hand sides.
//
// theta is the smallest value >= 1/2 (Crank-Nicolson, second order in time)
// for which the explicit part keeps every coefficient non-negative,
// theta >= 1 - min_i S_i/(dt K_ii). With it the step is positive and obeys
// the discrete maximum principle for any dt (the implicit matrix is an
// M-matrix), so dispersion never creates negative values or overshoot;
// where cells are small compared with sqrt(D dt) it tends to backward Euler.
type dispersionMatrix struct {
	stor  []float64 // storage per cell, len n
	cond  []float64 // conductance of internal face i+1/2, len n-1
	gLo   float64   // conductance to a Dirichlet value below cell 0 (0: no flux)
	d, e  []float64 // factorization for the current dt (LAPACK Dpttrf: A = L D L^T)
	dinv  []float64 // 1/d
	dt    float64
	theta float64
	// fixedTheta, when > 0, is used instead of the positivity-preserving
	// choice (Crank-Nicolson candidate steps of the 1D solver).
	fixedTheta float64
	ex         float64 // (1 - theta) dt
}

func newDispersionMatrix(stor, cond []float64, gLo float64) *dispersionMatrix {
	n := len(stor)
	return &dispersionMatrix{stor: stor, cond: cond, gLo: gLo,
		d: make([]float64, n), e: make([]float64, max(n-1, 0)), dinv: make([]float64, n), dt: -1}
}

// diagK is K_ii.
func (m *dispersionMatrix) diagK(i int) float64 {
	n := len(m.stor)
	g := 0.0
	if i > 0 {
		g += m.cond[i-1]
	}
	if i < n-1 {
		g += m.cond[i]
	}
	if i == 0 {
		g += m.gLo
	}
	return g
}

// factor chooses theta and builds and factors the implicit matrix for time
// step dt (no-op if dt is unchanged).
func (m *dispersionMatrix) factor(dt float64) {
	if dt == m.dt {
		return
	}
	n := len(m.stor)
	theta := 0.5
	for i := 0; i < n && m.fixedTheta == 0; i++ {
		if k := m.diagK(i); k > 0 {
			theta = math.Max(theta, 1-m.stor[i]/(dt*k))
		}
	}
	if m.fixedTheta > 0 {
		theta = m.fixedTheta
	}
	td := theta * dt
	for i := 0; i < n; i++ {
		m.d[i] = m.stor[i] + td*m.diagK(i)
		if i < n-1 {
			m.e[i] = -td * m.cond[i]
		}
	}
	if !lapackImpl.Dpttrf(n, m.d, m.e) {
		// Unreachable: the matrix is diagonally dominant with a positive
		// diagonal because every storage term is positive.
		panic("numeric: dispersion matrix not positive definite")
	}
	for i, v := range m.d {
		m.dinv[i] = 1 / v
	}
	m.dt, m.theta, m.ex = dt, theta, (1-theta)*dt
}

// explicit writes the right-hand side (S - (1-theta) dt K) c + dt gLo cb for
// one line into out (c and out must not overlap).
func (m *dispersionMatrix) explicit(c, out []float64, cb float64) {
	n := len(c)
	ex := m.ex
	if n == 1 {
		out[0] = m.stor[0]*c[0] + ex*m.gLo*(cb-c[0]) + (m.dt-ex)*m.gLo*cb
		return
	}
	out[0] = m.stor[0]*c[0] + ex*(m.cond[0]*(c[1]-c[0])+m.gLo*(cb-c[0])) + (m.dt-ex)*m.gLo*cb
	for i := 1; i < n-1; i++ {
		out[i] = m.stor[i]*c[i] + ex*(m.cond[i-1]*(c[i-1]-c[i])+m.cond[i]*(c[i+1]-c[i]))
	}
	out[n-1] = m.stor[n-1]*c[n-1] + ex*m.cond[n-2]*(c[n-2]-c[n-1])
}

// solve overwrites the n x nrhs row-major block b (leading dimension ldb)
// with the solution of the implicit system, using LAPACK Dpttrs.
func (m *dispersionMatrix) solve(b []float64, nrhs, ldb int) {
	lapackImpl.Dpttrs(len(m.stor), nrhs, m.d, m.e, b, ldb)
}

// solveRows is solve for a contiguous n x nrhs block (ldb = nrhs) with many
// right-hand sides: the same substitutions with the same Dpttrf factors as
// Dpttrs, but ordered row by row so that the inner loop runs over the
// independent right-hand sides in contiguous memory. Dpttrs (reference
// dptts2) sweeps one right-hand side at a time down a strided column with a
// division per element, a chain of dependent operations that made it 80 % of
// the run time of the 3D solver; this order is several times faster and gives
// the same result up to rounding.
func (m *dispersionMatrix) solveRows(b []float64, nrhs int) {
	n := len(m.stor)
	for i := 1; i < n; i++ {
		l := m.e[i-1]
		prev := b[(i-1)*nrhs : i*nrhs]
		row := b[i*nrhs : (i+1)*nrhs]
		for j := range row {
			row[j] -= l * prev[j]
		}
	}
	last := b[(n-1)*nrhs : n*nrhs]
	dl := m.dinv[n-1]
	for j := range last {
		last[j] *= dl
	}
	for i := n - 2; i >= 0; i-- {
		u, di := m.e[i], m.dinv[i]
		next := b[(i+1)*nrhs : (i+2)*nrhs]
		row := b[i*nrhs : (i+1)*nrhs]
		for j := range row {
			row[j] = row[j]*di - u*next[j]
		}
	}
}

// solveCols solves nrhs systems whose unknowns are contiguous (system r
// occupies b[r*n : (r+1)*n]), interleaving the systems so that consecutive
// operations are independent (same substitutions as Dpttrs).
func (m *dispersionMatrix) solveCols(b []float64, nrhs int) {
	n := len(m.stor)
	for i := 1; i < n; i++ {
		l := m.e[i-1]
		for r := 0; r < nrhs; r++ {
			b[r*n+i] -= l * b[r*n+i-1]
		}
	}
	dl := m.dinv[n-1]
	for r := 0; r < nrhs; r++ {
		b[r*n+n-1] *= dl
	}
	for i := n - 2; i >= 0; i-- {
		u, di := m.e[i], m.dinv[i]
		for r := 0; r < nrhs; r++ {
			b[r*n+i] = b[r*n+i]*di - u*b[r*n+i+1]
		}
	}
}

// inletFlux is the mass that crossed the Dirichlet face during the step,
// given the cell-0 values before (c0) and after (c1) the step.
func (m *dispersionMatrix) inletFlux(cb, c0, c1 float64) float64 {
	return m.gLo * ((m.dt-m.ex)*(cb-c1) + m.ex*(cb-c0))
}
