package numeric

import "math"

// grid3 is the discretized 3D problem on half the domain, y >= 0. The field
// is stored with y fastest, then z, then x: c[(i*nz+k)*ny+j], so an x-plane
// (fixed i) is a contiguous nz x ny block.
type grid3 struct {
	nx, ny, nz, np int // np = ny*nz, cells per x-plane
	x, y, z        Axis
	xc, yc, zc     []float64
	dx, dy, dz     []float64
	v, r           float64
	dDisp          [3]float64 // Dx, Dy, Dz

	c, buf []float64 // field and work array, len nx*np
	fin    []float64 // face flux plane (advection)
	c0     []float64 // cell-plane 0 before the x-dispersion step
	patch  []float64 // 1 where the inflow face belongs to the source, else 0, len np
	area   []float64 // dy_j dz_k, len np
	// patchArea is the inflow-face area of the source in the half domain.
	patchArea float64

	invx    []float64 // 1/(R dx_i) (advection per unit transverse area)
	half1mc []float64 // (1 - Courant_i)/2 for the current dt
	dispX   *dispersionMatrix
	dispY   *dispersionMatrix
	dispZ   *dispersionMatrix
	mu      float64
	decay   float64 // -expm1(-mu dt)
	dt      float64
	parity  int
	hist    History
	acc     budgetAcc
	rec     []receptor3
	// fullY: the y axis spans the whole width (a source off the plume
	// axis, see sources3d.go) instead of the half y >= 0 mirrored about
	// the axis.
	fullY bool
	tr    []Transect // transects, x relative to the field's face
}

func newGrid3(x, y, z Axis, v, dxc, dyc, dzc, r, mu, halfWidth, depth float64, hist History) *grid3 {
	g := &grid3{nx: x.N(), ny: y.N(), nz: z.N(), x: x, y: y, z: z, v: v, r: r, mu: mu, hist: hist, dDisp: [3]float64{dxc, dyc, dzc}}
	g.np = g.ny * g.nz
	g.xc, g.yc, g.zc = x.centers(), y.centers(), z.centers()
	g.dx, g.dy, g.dz = x.widths(), y.widths(), z.widths()
	n := g.nx * g.np
	g.c, g.buf = make([]float64, n), make([]float64, n)
	g.fin, g.c0 = make([]float64, g.np), make([]float64, g.np)
	g.patch, g.area = make([]float64, g.np), make([]float64, g.np)
	for k := 0; k < g.nz; k++ {
		for j := 0; j < g.ny; j++ {
			p := k*g.ny + j
			g.area[p] = g.dy[j] * g.dz[k]
			if g.yc[j] < halfWidth && g.zc[k] < depth {
				g.patch[p] = 1
				g.patchArea += g.area[p]
			}
		}
	}
	g.invx = make([]float64, g.nx)
	g.half1mc = make([]float64, g.nx)
	stor := func(w []float64) []float64 {
		s := make([]float64, len(w))
		for i, v := range w {
			s[i] = r * v
		}
		return s
	}
	cond := func(cs []float64, d float64) []float64 {
		k := make([]float64, max(len(cs)-1, 0))
		for i := range k {
			k[i] = d / (cs[i+1] - cs[i])
		}
		return k
	}
	sx := stor(g.dx)
	for i, s := range sx {
		g.invx[i] = 1 / s
	}
	g.dispX = newDispersionMatrix(sx, cond(g.xc, dxc), dxc/(0.5*g.dx[0]))
	g.dispY = newDispersionMatrix(stor(g.dy), cond(g.yc, dyc), 0)
	g.dispZ = newDispersionMatrix(stor(g.dz), cond(g.zc, dzc), 0)
	return g
}

// maxStep is the largest dt with V dt/(R dx_i) <= courant in every cell.
func (g *grid3) maxStep(courant float64) float64 {
	lo, _ := g.x.minMax()
	return courant * g.r * lo / g.v
}

func (g *grid3) setStep(dt float64) {
	g.dt = dt
	for i := range g.half1mc {
		g.half1mc[i] = 0.5 * math.Max(0, 1-g.v*dt*g.invx[i])
	}
	g.dispX.factor(dt)
	g.dispY.factor(dt)
	g.dispZ.factor(dt)
	g.decay = -math.Expm1(-g.mu * dt)
}

func (g *grid3) advance(t0, t1 float64) {
	cb := g.hist.mean(t0, t1)
	g.parity ^= 1
	if g.parity == 1 {
		g.advect(cb)
		g.disperseX(cb)
		g.disperseY()
		g.disperseZ()
		g.applyDecay()
	} else {
		g.applyDecay()
		g.disperseZ()
		g.disperseY()
		g.disperseX(cb)
		g.advect(cb)
	}
}

// advect is advectColumn applied to every (y, z) line at once, plane by
// plane, so the inner loops run over contiguous memory.
func (g *grid3) advect(cb float64) {
	np, nx := g.np, g.nx
	vdt := g.v * g.dt
	c, out, fin := g.c, g.buf, g.fin
	for p := 0; p < np; p++ {
		fin[p] = vdt * cb * g.patch[p]
	}
	g.acc.advIn.add(vdt * cb * g.patchArea)
	for i := 0; i < nx-1; i++ {
		cur := c[i*np : (i+1)*np]
		next := c[(i+1)*np : (i+2)*np]
		o := out[i*np : (i+1)*np]
		h, inv := g.half1mc[i], g.invx[i]
		if i == 0 {
			for p := range cur {
				ci := cur[p]
				fout := vdt * (ci + h*vanLeer(ci-cb*g.patch[p], next[p]-ci))
				o[p] = ci - inv*(fout-fin[p])
				fin[p] = fout
			}
			continue
		}
		prev := c[(i-1)*np : i*np]
		for p := range cur {
			ci := cur[p]
			fout := vdt * (ci + h*vanLeer(ci-prev[p], next[p]-ci))
			o[p] = ci - inv*(fout-fin[p])
			fin[p] = fout
		}
	}
	i := nx - 1
	last := c[i*np : (i+1)*np]
	o := out[i*np : (i+1)*np]
	inv := g.invx[i]
	s := 0.0
	for p, cl := range last {
		fout := vdt * cl
		o[p] = cl - inv*(fout-fin[p])
		s += cl * g.area[p]
	}
	g.acc.out.add(vdt * s)
	g.c, g.buf = g.buf, g.c
}

// disperseX: theta-scheme along x for all (y, z) lines at once; the x-planes
// are the rows of an nx x np matrix, solved with np right-hand sides.
func (g *grid3) disperseX(cb float64) {
	m := g.dispX
	np, nx := g.np, g.nx
	c, out := g.c, g.buf
	ex := m.ex
	impl := m.dt - ex
	copy(g.c0, c[:np])
	for i := 0; i < nx; i++ {
		cur := c[i*np : (i+1)*np]
		o := out[i*np : (i+1)*np]
		s := m.stor[i]
		var kl, kr float64
		var prev, next []float64
		if i > 0 {
			kl = ex * m.cond[i-1]
			prev = c[(i-1)*np : i*np]
		}
		if i < nx-1 {
			kr = ex * m.cond[i]
			next = c[(i+1)*np : (i+2)*np]
		}
		switch {
		case i == 0 && nx == 1:
			for p, ci := range cur {
				b := cb * g.patch[p]
				o[p] = s*ci + ex*m.gLo*(b-ci) + impl*m.gLo*b
			}
		case i == 0:
			for p, ci := range cur {
				b := cb * g.patch[p]
				o[p] = s*ci + kr*(next[p]-ci) + ex*m.gLo*(b-ci) + impl*m.gLo*b
			}
		case i == nx-1:
			for p, ci := range cur {
				o[p] = s*ci + kl*(prev[p]-ci)
			}
		default:
			for p, ci := range cur {
				o[p] = s*ci + kl*(prev[p]-ci) + kr*(next[p]-ci)
			}
		}
	}
	m.solveRows(out, np)
	g.c, g.buf = g.buf, g.c
	s := 0.0
	for p, a := range g.area {
		s += a * m.inletFlux(cb*g.patch[p], g.c0[p], g.c[p])
	}
	g.acc.dispIn.add(s)
}

// disperseY: theta-scheme along y, one contiguous line per (x, z); the nz
// lines of an x-plane are solved together.
func (g *grid3) disperseY() {
	m := g.dispY
	ny, np := g.ny, g.np
	c, out := g.c, g.buf
	for i := 0; i < g.nx; i++ {
		for k := 0; k < g.nz; k++ {
			l := i*g.nz + k
			m.explicit(c[l*ny:(l+1)*ny], out[l*ny:(l+1)*ny], 0)
		}
		m.solveCols(out[i*np:(i+1)*np], g.nz)
	}
	g.c, g.buf = g.buf, g.c
}

// disperseZ: theta-scheme along z; for each x-plane the nz rows of ny values
// are solved with ny right-hand sides.
func (g *grid3) disperseZ() {
	m := g.dispZ
	ny, nz, np := g.ny, g.nz, g.np
	c, out := g.c, g.buf
	ex := m.ex
	for i := 0; i < g.nx; i++ {
		for k := 0; k < nz; k++ {
			base := i*np + k*ny
			cur := c[base : base+ny]
			o := out[base : base+ny]
			s := m.stor[k]
			var kl, kr float64
			var prev, next []float64
			if k > 0 {
				kl = ex * m.cond[k-1]
				prev = c[base-ny : base]
			}
			if k < nz-1 {
				kr = ex * m.cond[k]
				next = c[base+ny : base+2*ny]
			}
			switch {
			case nz == 1:
				for j, ci := range cur {
					o[j] = s * ci
				}
			case k == 0:
				for j, ci := range cur {
					o[j] = s*ci + kr*(next[j]-ci)
				}
			case k == nz-1:
				for j, ci := range cur {
					o[j] = s*ci + kl*(prev[j]-ci)
				}
			default:
				for j, ci := range cur {
					o[j] = s*ci + kl*(prev[j]-ci) + kr*(next[j]-ci)
				}
			}
		}
		m.solveRows(out[i*np:(i+1)*np], ny)
	}
	g.c, g.buf = g.buf, g.c
}

func (g *grid3) applyDecay() {
	if g.decay == 0 {
		return
	}
	f := 1 - g.decay
	g.acc.decayed.add(g.decay * g.storedMass())
	for i := range g.c {
		g.c[i] *= f
	}
}

// storedMass is sum R C dx dy dz over the half domain.
func (g *grid3) storedMass() float64 {
	np, ny := g.np, g.ny
	total := 0.0
	for i := 0; i < g.nx; i++ {
		si := 0.0
		for k := 0; k < g.nz; k++ {
			row := g.c[i*np+k*ny : i*np+(k+1)*ny]
			sk := 0.0
			for j, v := range row {
				sk += v * g.dy[j]
			}
			si += sk * g.dz[k]
		}
		total += si * g.dx[i]
	}
	return g.r * total
}
