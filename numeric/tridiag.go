package numeric

import "gonum.org/v1/gonum/lapack/gonum"

var lapackImpl gonum.Implementation

// dispersionMatrix is the backward-Euler matrix of implicit dispersion along
// one direction, M = S + dt K, with S the diagonal storage (cell size times
// cross-section) and K the symmetric conductance matrix (face area times
// dispersion coefficient over centre distance). M is symmetric positive
// definite, so it is factored as L D L^T with LAPACK Dpttrf and solved with
// Dpttrs for any number of right-hand sides.
type dispersionMatrix struct {
	stor []float64 // storage per cell, len n
	cond []float64 // conductance of internal face i+1/2, len n-1
	gLo  float64   // conductance to a Dirichlet value below cell 0 (0: no flux)
	gHi  float64   // conductance to a Dirichlet value above cell n-1 (0: no flux)
	d, e []float64 // factorization for the current dt
	dt   float64
}

func newDispersionMatrix(stor, cond []float64, gLo, gHi float64) *dispersionMatrix {
	n := len(stor)
	return &dispersionMatrix{stor: stor, cond: cond, gLo: gLo, gHi: gHi,
		d: make([]float64, n), e: make([]float64, max(n-1, 0)), dt: -1}
}

// factor builds and factors M for time step dt (no-op if dt is unchanged).
func (m *dispersionMatrix) factor(dt float64) {
	if dt == m.dt {
		return
	}
	n := len(m.stor)
	for i := 0; i < n; i++ {
		g := 0.0
		if i > 0 {
			g += m.cond[i-1]
		}
		if i < n-1 {
			g += m.cond[i]
			m.e[i] = -dt * m.cond[i]
		}
		m.d[i] = m.stor[i] + dt*g
	}
	m.d[0] += dt * m.gLo
	m.d[n-1] += dt * m.gHi
	if !lapackImpl.Dpttrf(n, m.d, m.e) {
		// Unreachable: M is strictly diagonally dominant with a positive
		// diagonal because every storage term is positive.
		panic("numeric: dispersion matrix not positive definite")
	}
	m.dt = dt
}

// solve overwrites the n x nrhs row-major block b (leading dimension ldb)
// with M^-1 b.
func (m *dispersionMatrix) solve(b []float64, nrhs, ldb int) {
	lapackImpl.Dpttrs(len(m.stor), nrhs, m.d, m.e, b, ldb)
}
