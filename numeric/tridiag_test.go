package numeric

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestHandSolvesAgainstLAPACK: the hand-ordered substitution loops used for
// speed (dispersionMatrix.solveRows and solveCols, which reorder the
// substitutions of LAPACK Dpttrs, and triLU, the unpivoted LU of the steady
// 3D solver) against gonum's LAPACK Dpttrs and Dgtsv on random systems of
// the kinds they are used for: symmetric positive definite tridiagonal
// (storage plus conductances) and column diagonally dominant
// nonsymmetric (upwind advection plus dispersion), many right-hand sides.
func TestHandSolvesAgainstLAPACK(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 17))
	for _, tc := range []struct{ n, nrhs int }{{1, 1}, {2, 3}, {7, 1}, {50, 13}, {200, 64}} {
		n, nrhs := tc.n, tc.nrhs
		stor := make([]float64, n)
		cond := make([]float64, max(n-1, 0))
		for i := range stor {
			stor[i] = 0.1 + rng.Float64()
		}
		for i := range cond {
			cond[i] = math.Exp(4 * (rng.Float64() - 0.5))
		}
		gLo := rng.Float64()
		b := make([]float64, n*nrhs)
		for i := range b {
			b[i] = rng.Float64() - 0.3
		}

		// Symmetric: Dpttrs on the row-major block (ldb = nrhs).
		m := newDispersionMatrix(stor, cond, gLo)
		m.factor(0.1 + 10*rng.Float64())
		want := append([]float64(nil), b...)
		m.solve(want, nrhs, nrhs)
		got := append([]float64(nil), b...)
		m.solveRows(got, nrhs)
		compare(t, "solveRows vs Dpttrs", got, want)
		// solveCols: system r contiguous.
		colB := make([]float64, n*nrhs)
		for i := 0; i < n; i++ {
			for r := 0; r < nrhs; r++ {
				colB[r*n+i] = b[i*nrhs+r]
			}
		}
		m.solveCols(colB, nrhs)
		got2 := make([]float64, n*nrhs)
		for i := 0; i < n; i++ {
			for r := 0; r < nrhs; r++ {
				got2[i*nrhs+r] = colB[r*n+i]
			}
		}
		compare(t, "solveCols vs Dpttrs", got2, want)

		// Nonsymmetric, column diagonally dominant: triLU vs Dgtsv.
		v := rng.Float64() * 5
		dl, d, du := make([]float64, max(n-1, 0)), make([]float64, n), make([]float64, max(n-1, 0))
		for i := 0; i < n; i++ {
			d[i] = stor[i] + v
			if i > 0 {
				d[i] += cond[i-1]
			}
			if i < n-1 {
				d[i] += cond[i]
				du[i] = -cond[i]
				dl[i] = -(v + cond[i])
			}
		}
		var lu triLU
		if !lu.factor(dl, d, du) {
			t.Fatalf("n=%d: triLU factor failed", n)
		}
		got3 := append([]float64(nil), b...)
		lu.solveRows(got3, nrhs)
		want3 := append([]float64(nil), b...)
		if !lapackImpl.Dgtsv(n, nrhs, append([]float64(nil), dl...), append([]float64(nil), d...), append([]float64(nil), du...), want3, nrhs) {
			t.Fatalf("n=%d: Dgtsv failed", n)
		}
		compare(t, "triLU vs Dgtsv", got3, want3)
	}
}

func compare(t *testing.T, what string, got, want []float64) {
	t.Helper()
	scale := 0.0
	for _, w := range want {
		scale = math.Max(scale, math.Abs(w))
	}
	for i := range got {
		if d := math.Abs(got[i] - want[i]); !(d <= 1e-12*scale) {
			t.Fatalf("%s: element %d: %.17g vs %.17g", what, i, got[i], want[i])
		}
	}
}
