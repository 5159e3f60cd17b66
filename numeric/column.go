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
	dt := m.dt
	cb := m.hist.mean(t0, t1)
	out := advectColumn(m.c, m.rhs, m.stor, m.half1mc, m.q, dt, cb)
	m.acc.advIn.add(m.q * dt * cb)
	m.acc.out.add(out * dt)
	m.rhs[0] += dt * m.gIn * cb
	m.disp.solve(m.rhs, 1, 1)
	m.c, m.rhs = m.rhs, m.c
	m.acc.dispIn.add(dt * m.gIn * (cb - m.c[0]))
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

func (m *column) storedMass() float64 {
	s := 0.0
	for i, v := range m.c {
		s += m.stor[i] * v
	}
	return s
}

func (m *column) sample(t float64, out []float64) {
	for r, x := range m.rec {
		out[r] = m.valueAt(x, t)
	}
}

// valueAt interpolates linearly between cell centres; between the inlet and
// the first centre it uses the inlet concentration (first-type) or the linear
// extrapolation of the first two cells (flux inlet), clipped to [0, 1].
func (m *column) valueAt(x, t float64) float64 {
	i, w := locate(m.centers, x)
	if i >= 0 {
		if w == 0 {
			return m.c[i]
		}
		return (1-w)*m.c[i] + w*m.c[i+1]
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
	w = x / m.centers[0]
	return (1-w)*c0 + w*m.c[0]
}
