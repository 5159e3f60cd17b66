package numeric

import "math"

// column is the discretized 1D problem: a line of cells along x with storage
// R*volume, a constant volumetric flow q = V A(0) through every face, face
// conductances A_f D_f / h_f, an inlet at x = 0 and a free outflow face at
// x = L (advection out, no dispersive flux).
//
// A time step is split into advection, dispersion and decay, the order
// reversed from one step to the next (advection, dispersion, decay, then
// decay, dispersion, advection) so that each pair of steps is a symmetric
// (Strang) composition, second order in dt. Decay must take part in the
// alternation: applied always last it would remove a share of the mass that
// entered during the step as if it had been there from the start, an error
// of order dt (q Mu dt t/2 of mass by time t).
//
// The third-type inlet is split between the sub-steps as the fluxes through
// the inlet face are: with the face value Cb from the Robin condition
// q cin = q Cb + g (Cb - c0) (g = A D/(dx/2)), advection carries q Cb in and
// dispersion g_eff (cin - c0), g_eff = g q/(g+q), both with c0 at the start
// of the step so that together they carry exactly q cin dt. (Letting
// advection carry all of q cin and dispersion nothing forces a zero gradient
// at the inlet in every dispersion sub-step, an error of order dt in the
// first cells.)
type column struct {
	n          int
	centers    []float64
	stor       []float64 // R * cell volume
	inv        []float64 // 1/stor
	parity     int
	half1mc    []float64 // (1 - Courant_i)/2 for the current dt
	q          float64
	disp       *dispersionMatrix // positivity-preserving theta
	dispCN     *dispersionMatrix // Crank-Nicolson, tried first when disp.theta > 1/2
	gIn        float64           // first-type: inlet conductance; third-type: g_eff
	robin      float64           // third-type: g_eff (cin - c0) for the current step
	mu, decay  float64           // decay rate and -expm1(-mu dt)
	dt         float64
	c, rhs     []float64
	hist       History
	inletFirst bool
	rec        []float64
	acc        budgetAcc
	srcApplied float64 // third-type inlet source of the last tried step
	cnSteps    int     // dispersion sub-steps done with Crank-Nicolson
	dispSteps  int     // all dispersion sub-steps
}

func (m *column) setStep(dt float64) {
	m.dt = dt
	m.disp.factor(dt)
	if m.disp.theta > 0.5 {
		m.dispCN.factor(dt)
	}
	for i, s := range m.stor {
		m.half1mc[i] = 0.5 * math.Max(0, 1-m.q*dt/s)
	}
	m.decay = -math.Expm1(-m.mu * dt)
}

func (m *column) advance(t0, t1 float64) {
	cb := m.hist.mean(t0, t1)
	if !m.inletFirst {
		m.robin = m.gIn * (cb - m.c[0])
	}
	m.parity ^= 1
	if m.parity == 1 {
		m.advect(cb)
		m.disperse(cb)
		m.applyDecay()
	} else {
		m.applyDecay()
		m.disperse(cb)
		m.advect(cb)
	}
}

func (m *column) applyDecay() {
	if m.decay > 0 {
		s := 0.0
		for i, v := range m.c {
			lost := m.decay * v
			s += m.stor[i] * lost
			m.c[i] = v - lost
		}
		m.acc.decayed.add(s)
	}
}

func (m *column) advect(cb float64) {
	cin := cb
	if !m.inletFirst {
		cin = cb - m.robin/m.q
	}
	out := advectColumn(m.c, m.rhs, m.inv, m.half1mc, m.q, m.dt, cin)
	m.acc.advIn.add(m.q * m.dt * cin)
	m.acc.out.add(out * m.dt)
	m.c, m.rhs = m.rhs, m.c
}

// disperse does the dispersion sub-step. Where the positivity-preserving
// theta exceeds 1/2 (cells small compared with the spreading length of a
// step, where it would otherwise cost an error of order dt), it first tries
// Crank-Nicolson and keeps that step when it is total-variation
// non-increasing (counting the jump to the inlet value) and stays within the
// range of the old values and the inlet value, the properties of the exact
// dispersion step that the positivity-preserving scheme guarantees; otherwise
// it redoes the step with that scheme. Smooth solutions thus keep second
// order in time, and sharp ones still get no new extrema.
func (m *column) disperse(cb float64) {
	m.dispSteps++
	if m.disp.theta > 0.5 {
		tv, lo, hi := variation(m.c, cb)
		if m.tryDisperse(m.dispCN, cb) {
			tv1, lo1, hi1 := variation(m.rhs, cb)
			if tv1 <= tv*(1+1e-12)+1e-300 && lo1 >= lo-1e-14 && hi1 <= hi+1e-14 {
				m.commit(m.dispCN, cb)
				m.cnSteps++
				return
			}
		}
	}
	m.tryDisperse(m.disp, cb)
	m.commit(m.disp, cb)
}

// tryDisperse writes the result of one dispersion step with matrix d into
// m.rhs (m.c unchanged). It reports false when the third-type inlet source
// had to be limited to keep cell 0 within [0, 1], in which case the result
// is still valid but the caller should not prefer it.
func (m *column) tryDisperse(d *dispersionMatrix, cb float64) bool {
	d.explicit(m.c, m.rhs, cb)
	ok := true
	if !m.inletFirst {
		s := m.dt * m.robin
		r0 := m.rhs[0]
		// Clamp the explicit inlet source so that the right-hand side of
		// cell 0 stays in [0, S0]: the implicit matrix is an M-matrix with
		// zero row sums apart from storage, so the result stays in [0, 1].
		if r0+s < 0 {
			s, ok = -r0, false
		} else if r0+s > m.stor[0] {
			s, ok = m.stor[0]-r0, false
		}
		m.rhs[0] += s
		m.srcApplied = s
	}
	d.solveRows(m.rhs, 1) // Dpttrs substitutions (see TestHandSolvesAgainstLAPACK)
	return ok
}

func (m *column) commit(d *dispersionMatrix, cb float64) {
	c0 := m.c[0]
	m.c, m.rhs = m.rhs, m.c
	if m.inletFirst {
		m.acc.dispIn.add(d.inletFlux(cb, c0, m.c[0]))
	} else {
		m.acc.dispIn.add(m.srcApplied)
	}
}

// variation returns the total variation of c including the jump from the
// inlet value cb, and the range of c and cb.
func variation(c []float64, cb float64) (tv, lo, hi float64) {
	lo, hi = cb, cb
	prev := cb
	for _, v := range c {
		d := v - prev
		if d < 0 {
			d = -d
		}
		tv += d
		if v < lo {
			lo = v
		}
		if v > hi {
			hi = v
		}
		prev = v
	}
	return tv, lo, hi
}

func (m *column) storedMass() float64 {
	s := 0.0
	for i, v := range m.c {
		s += m.stor[i] * v
	}
	return s
}

func (m *column) sample(t float64, out []float64) {
	for r, x := range m.rec {
		out[r] = clamp01(m.valueAt(x, t))
	}
}

// valueAt interpolates between cell centres (geometrically where positive,
// see mix); between the inlet and the first centre it uses the inlet
// concentration (first-type) or the linear extrapolation of the first two
// cells (flux inlet), clipped to [0, 1].
func (m *column) valueAt(x, t float64) float64 {
	i, w := locate(m.centers, x)
	if i >= 0 {
		return mix(m.c[i], m.c[min(i+1, m.n-1)], w)
	}
	var c0 float64
	if m.inletFirst || m.n == 1 {
		if m.inletFirst {
			c0 = m.hist.value(t)
		} else {
			c0 = m.c[0]
		}
	} else {
		x0, x1 := m.centers[0], m.centers[1]
		c0 = m.c[0] - (m.c[1]-m.c[0])*x0/(x1-x0)
		c0 = math.Min(1, math.Max(0, c0))
	}
	return mix(c0, m.c[0], x/m.centers[0])
}

// newColumn discretizes the column problem p on axis: storage R times the
// cell volume (Simpson's rule on A(x)), face conductances A D / h, the inlet
// conductance and the two dispersion matrices. It also returns the largest
// grid Peclet number. A(x) is checked to be finite and > 0 at every face and
// centre.
func newColumn(p *Problem1D, axis Axis) (*column, float64, error) {
	area := p.Area
	if area == nil {
		area = func(float64) float64 { return 1 }
	}
	n := axis.N()
	a0 := area(0)
	if !(a0 > 0) || math.IsInf(a0, 0) {
		return nil, 0, invalid("Problem1D.Area", "A(0) must be finite and > 0, got %g", a0)
	}
	q := p.V * a0
	dispAt := func(af float64) float64 { return p.Dm + (p.Dx-p.Dm)*a0/af }
	centers := axis.centers()
	stor := make([]float64, n)
	cond := make([]float64, max(n-1, 0))
	pe := 0.0
	for i := 0; i < n; i++ {
		xl, xr := axis.Faces[i], axis.Faces[i+1]
		al, ac, ar := area(xl), area(centers[i]), area(xr)
		for _, v := range [...]float64{al, ac, ar} {
			if !(v > 0) || math.IsInf(v, 0) {
				return nil, 0, invalid("Problem1D.Area", "A(x) must be finite and > 0 on [0, %g], got %g near x = %g", axis.Length(), v, centers[i])
			}
		}
		// Simpson's rule for the cell volume.
		stor[i] = p.R * (xr - xl) * (al + 4*ac + ar) / 6
		if i < n-1 {
			h := centers[i+1] - centers[i]
			cond[i] = ar * dispAt(ar) / h
			pe = math.Max(pe, (q/ar)*h/dispAt(ar))
		}
	}
	pe = math.Max(pe, p.V*axis.Width(0)/p.Dx)
	gIn := a0 * p.Dx / (0.5 * axis.Width(0))
	gFirst := gIn
	if p.Inlet == InletFlux {
		gIn = gIn * q / (gIn + q)
		gFirst = 0
	}
	m := &column{
		n: n, centers: centers, stor: stor, half1mc: make([]float64, n), q: q,
		disp: newDispersionMatrix(stor, cond, gFirst), inv: invert(stor), gIn: gIn, mu: p.Mu,
		c: make([]float64, n), rhs: make([]float64, n), hist: p.History,
		inletFirst: p.Inlet == InletConcentration, rec: p.Receptors,
	}
	m.dispCN = newDispersionMatrix(stor, cond, gFirst)
	m.dispCN.fixedTheta = 0.5
	return m, pe, nil
}

// invert is the element-wise reciprocal of s.
func invert(s []float64) []float64 {
	v := make([]float64, len(s))
	for i, x := range s {
		v[i] = 1 / x
	}
	return v
}

// minSlice is the smallest element of s (+Inf when empty).
func minSlice(s []float64) float64 {
	v := math.Inf(1)
	for _, x := range s {
		v = math.Min(v, x)
	}
	return v
}
