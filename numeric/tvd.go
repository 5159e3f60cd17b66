package numeric

// vanLeer returns the limited difference used in the flux-limited
// Lax-Wendroff face value: phi(r) * b with r = a/b and the van Leer limiter
// phi(r) = (r + |r|)/(1 + |r|), which is 2ab/(a+b) when a and b have the same
// sign and 0 otherwise. It never exceeds 2 min(|a|, |b|), the bound that keeps
// the scheme total variation diminishing (Sweby 1984, SIAM J. Numer. Anal.
// 21(5); LeVeque 2002, Finite Volume Methods for Hyperbolic Problems, ch. 6).
func vanLeer(a, b float64) float64 {
	if a*b <= 0 {
		return 0
	}
	return 2 * a * b / (a + b)
}

// advectColumn does one explicit advection step on a line of n cells with
// flow towards higher index:
//
//	stor_i C_i' = stor_i C_i - dt (F_{i+1/2} - F_{i-1/2})
//
// F_{-1/2} = q cin (the inlet value), F_{i+1/2} = q (C_i + (1-c_i)/2 phi b),
// with c_i = q dt / stor_i the cell Courant number (<= 1) and the last face
// first-order upwind, q C_{n-1}. The inlet value also serves as the ghost
// value below cell 0. The new values C_i' are written to out (which must not
// overlap c); inv holds 1/stor_i. The returned value is the outflow flux
// q C_{n-1} (per unit dt).
//
// With the correction at face i+1/2 taken with the Courant number of its
// upwind cell, each new value is a convex combination of C_i and C_{i-1}, so
// no new extrema appear on any grid.
func advectColumn(c, out, inv, half1mc []float64, q, dt, cin float64) float64 {
	n := len(c)
	qdt := q * dt
	fin := qdt * cin
	prev := cin
	for i := 0; i < n-1; i++ {
		ci := c[i]
		fout := qdt * (ci + half1mc[i]*vanLeer(ci-prev, c[i+1]-ci))
		out[i] = ci - inv[i]*(fout-fin)
		fin = fout
		prev = ci
	}
	last := c[n-1]
	fout := qdt * last
	out[n-1] = last - inv[n-1]*(fout-fin)
	return q * last
}
