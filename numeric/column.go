package numeric

import "math"

// column is the discretized 1D problem: a line of cells along x with storage
// R*volume, a constant volumetric flow q = V A(0) through every face, face
// conductances A_f D_f / h_f, an inlet at x = 0 and a free outflow face at
// x = L (advection out, no dispersive flux).
type column struct {
	n          int
	centers    []float64
	stor       []float64 // R * cell volume
	inv        []float64 // 1/stor
	parity     int
	half1mc    []float64 // (1 - Courant_i)/2 for the current dt
	q          float64
	disp       *dispersionMatrix
	gIn        float64 // inlet conductance (first-type); 0 for the flux inlet
	mu, decay  float64 // decay rate and -expm1(-mu dt)
	dt         float64
	c, rhs     []float64
	hist       History
	inletFirst bool
	rec        []float64
	acc        budgetAcc
}

func (m *column) setStep(dt float64) {
	m.dt = dt
	m.disp.factor(dt)
	for i, s := range m.stor {
		m.half1mc[i] = 0.5 * math.Max(0, 1-m.q*dt/s)
	}
	m.decay = -math.Expm1(-m.mu * dt)
}

func (m *column) advance(t0, t1 float64) {
	cb := m.hist.mean(t0, t1)
	// Alternate the order of the split operators (advection-dispersion,
	// then dispersion-advection) so that each pair of steps is a symmetric
	// (Strang) composition, second order in dt.
	m.parity ^= 1
	if m.parity == 1 {
		m.advect(cb)
		m.disperse(cb)
	} else {
		m.disperse(cb)
		m.advect(cb)
	}
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
	out := advectColumn(m.c, m.rhs, m.inv, m.half1mc, m.q, m.dt, cb)
	m.acc.advIn.add(m.q * m.dt * cb)
	m.acc.out.add(out * m.dt)
	m.c, m.rhs = m.rhs, m.c
}

func (m *column) disperse(cb float64) {
	c0 := m.c[0]
	m.disp.explicit(m.c, m.rhs, cb)
	m.disp.solve(m.rhs, 1, 1)
	m.c, m.rhs = m.rhs, m.c
	m.acc.dispIn.add(m.disp.inletFlux(cb, c0, m.c[0]))
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
// see mix); between the inlet and
// the first centre it uses the inlet concentration (first-type) or the linear
// extrapolation of the first two cells (flux inlet), clipped to [0, 1].
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
