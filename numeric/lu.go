package numeric

// triLU is the LU factorization without pivoting of a general tridiagonal
// matrix (sub-diagonal dl, diagonal d, super-diagonal du), for matrices
// that are column diagonally dominant, for which Gaussian elimination needs
// no pivoting and is stable (Golub & Van Loan, Matrix Computations, 4th ed.,
// section 4.3.3). The steady 3D solver uses it for its x-direction systems
// (implicit upwind advection plus dispersion), one matrix for every line,
// solved row by row over contiguous right-hand sides like
// dispersionMatrix.solveRows. Tests check it against LAPACK Dgtsv.
type triLU struct {
	l    []float64 // multipliers, len n-1
	uinv []float64 // 1/u_i, len n
	du   []float64 // super-diagonal, len n-1
}

// factor computes the factorization; it reports false when a pivot is not
// positive (the matrix is then not of the kind described above).
func (f *triLU) factor(dl, d, du []float64) bool {
	n := len(d)
	if cap(f.uinv) < n {
		f.l, f.uinv, f.du = make([]float64, max(n-1, 0)), make([]float64, n), make([]float64, max(n-1, 0))
	}
	f.l, f.uinv, f.du = f.l[:max(n-1, 0)], f.uinv[:n], f.du[:max(n-1, 0)]
	copy(f.du, du)
	u := d[0]
	if !(u > 0) {
		return false
	}
	f.uinv[0] = 1 / u
	for i := 1; i < n; i++ {
		f.l[i-1] = dl[i-1] * f.uinv[i-1]
		u = d[i] - f.l[i-1]*du[i-1]
		if !(u > 0) {
			return false
		}
		f.uinv[i] = 1 / u
	}
	return true
}

// solveRows overwrites the contiguous n x nrhs row-major block b with the
// solution for its nrhs right-hand sides (columns).
func (f *triLU) solveRows(b []float64, nrhs int) {
	n := len(f.uinv)
	for i := 1; i < n; i++ {
		l := f.l[i-1]
		prev := b[(i-1)*nrhs : i*nrhs]
		row := b[i*nrhs : (i+1)*nrhs]
		for j := range row {
			row[j] -= l * prev[j]
		}
	}
	last := b[(n-1)*nrhs : n*nrhs]
	ul := f.uinv[n-1]
	for j := range last {
		last[j] *= ul
	}
	for i := n - 2; i >= 0; i-- {
		u, ui := f.du[i], f.uinv[i]
		next := b[(i+1)*nrhs : (i+2)*nrhs]
		row := b[i*nrhs : (i+1)*nrhs]
		for j := range row {
			row[j] = (row[j] - u*next[j]) * ui
		}
	}
}
