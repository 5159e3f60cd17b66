package numeric

import "math"

// Receptor is an observation point or well screen in the plume frame, L.
type Receptor struct {
	X float64 // distance along flow from the source face, >= 0
	Y float64 // transverse offset from the plume axis (the solution is symmetric in y)
	// Top and Bottom bound the depth interval below the water table,
	// 0 <= Top <= Bottom; the value is the average over the interval of the
	// concentration interpolated between cell centres. Top ==
	// Bottom is a point at that depth.
	Top, Bottom float64
}

type receptor3 = Receptor

// sample writes the receptor values at time t.
func (g *grid3) sample(t float64, out []float64) {
	cb := g.hist.value(t)
	prof := make([]float64, g.nz)
	for r, rc := range g.rec {
		out[r] = clamp01(g.valueAt(rc, cb, prof))
	}
	for q, tr := range g.tr {
		out[len(g.rec)+q] = g.discharge(tr, cb)
	}
}

// valueAt interpolates (geometrically where positive, see mix): in x between cell centres (between the
// inflow face, held at the source value on the source patch and 0 elsewhere,
// and the first centre), bilinearly in y and z between centres with constant
// extension to the symmetry plane, the water table and the far faces (all
// no-flux), then averages over the depth interval.
func (g *grid3) valueAt(rc Receptor, cb float64, prof []float64) float64 {
	ix, wx := locate(g.xc, rc.X)
	yq := math.Abs(rc.Y)
	if g.fullY {
		yq = rc.Y
	}
	iy, wy := locate(g.yc, yq)
	if iy < 0 {
		iy, wy = 0, 0
	}
	at := func(k, j int) float64 {
		p := k*g.ny + j
		if ix < 0 {
			return mix(cb*g.patch[p], g.c[p], rc.X/g.xc[0])
		}
		if wx == 0 {
			return g.c[ix*g.np+p]
		}
		return mix(g.c[ix*g.np+p], g.c[(ix+1)*g.np+p], wx)
	}
	for k := 0; k < g.nz; k++ {
		v := at(k, iy)
		if wy > 0 {
			v = mix(v, at(k, iy+1), wy)
		}
		prof[k] = v
	}
	return averagePL(g.zc, prof, rc.Top, rc.Bottom)
}

// averagePL is the average over [a, b] of the piecewise interpolant (mix)
// through (zs[k], vs[k]), constant beyond the first and last points; a == b
// gives the value at a.
func averagePL(zs, vs []float64, a, b float64) float64 {
	n := len(zs)
	f := func(z float64) float64 {
		k, w := locate(zs, z)
		if k < 0 {
			return vs[0]
		}
		if w == 0 {
			return vs[k]
		}
		return mix(vs[k], vs[k+1], w)
	}
	if !(b > a) {
		return f(a)
	}
	// Segments: (-inf, zs0], [zs_k, zs_k+1], [zs_n-1, inf).
	total := 0.0
	seg := func(lo, hi float64) {
		l, u := math.Max(lo, a), math.Min(hi, b)
		if u > l {
			total += (u - l) * logMean(f(l), f(u))
		}
	}
	seg(math.Inf(-1), zs[0])
	for k := 0; k+1 < n; k++ {
		seg(zs[k], zs[k+1])
	}
	seg(zs[n-1], math.Inf(1))
	return total / (b - a)
}
