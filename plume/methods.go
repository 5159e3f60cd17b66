package plume

import (
	"math"

	"downgradient/analytic"
	"gonum.org/v1/gonum/integrate/quad"
)

// point is a receptor in the plume frame, canonical units (m).
type point struct {
	id         string
	px, py     float64 // plume frame, m
	top, bot   float64 // depth interval, m (equal for a point)
	screen     bool    // a well screen rather than a point
	upgradient bool    // px <= 0 and outside the source's footprint (continuous sources)
	inside     bool    // px <= 0 within the source's footprint (continuous sources)
}

// mid is the reported depth: the point depth or the screen's mid-depth.
func (p point) mid() float64 { return 0.5 * (p.top + p.bot) }

// classify marks receptors upgradient of or inside a continuous source: the
// planar-source model covers only px > 0. Inside the source zone the value
// reported is the source concentration; elsewhere upgradient it is 0. The
// planar source has no length along flow, so this service takes the source
// zone to be its footprint (|py| <= W/2, top <= source depth) from the
// downgradient face back one source width upgradient (our convention, stated
// in the caveat); for a 1D column every px <= 0 is the inlet.
func (m *model) classify(p *point) {
	if m.kind == SourceKindInstantaneous || p.px > 0 {
		return
	}
	if m.kind == SourceKind1D || (math.Abs(p.py) <= m.width/2 && p.top <= m.depth && p.px >= -m.width) {
		p.inside = true
	} else {
		p.upgradient = true
	}
}

func (m *model) params() analytic.Params {
	return analytic.Params{V: m.v, Dx: m.disp[0], Dy: m.disp[1], Dz: m.disp[2], R: m.r, Mu: m.mu}
}

func (m *model) history() analytic.History {
	return analytic.History{Duration: m.duration, Depletion: m.depletion}
}

func (m *model) plumeSource() analytic.Source {
	return analytic.Source{Width: m.width, Depth: m.depth}
}

// strength is the source concentration at elapsed time tau, mg/L.
func (m *model) strength(tau float64) float64 {
	if !(tau > 0) || tau >= m.duration {
		return 0
	}
	if m.depletion == 0 {
		return m.c0
	}
	return m.c0 * math.Exp(-m.depletion*tau)
}

// closedForm evaluates the exact (exact == true) or Domenico value at the
// receptor at elapsed time tau since the source started, d (+Inf for the
// steady state), in mg/L. Domenico is not defined for an instantaneous
// release (returns 0).
func (m *model) closedForm(exact bool, p point, tau float64) float64 {
	if math.IsInf(tau, 1) && !m.continuous() {
		return 0 // the source is spent; everything leaves or decays
	}
	if !(tau > 0) {
		return 0
	}
	if p.upgradient {
		return 0
	}
	if p.inside {
		if math.IsInf(tau, 1) {
			return m.c0
		}
		return m.strength(tau)
	}
	var c float64
	switch m.kind {
	case SourceKindInstantaneous:
		if !exact {
			return 0
		}
		c = m.puff(p, tau)
	case SourceKind1D:
		if exact {
			inlet := analytic.FirstType
			if m.inlet == InletFlux {
				inlet = analytic.ThirdType
			}
			c = m.c0 * analytic.OgataBanksAt(p.px, tau, m.params(), inlet, m.history())
		} else {
			c = m.c0 * analytic.DomenicoAt(analytic.Point{X: p.px, Y: 0, Top: 0, Bottom: 0}, tau, m.params(), m.plumeSource(), m.history())
		}
	default:
		pt := analytic.Point{X: p.px, Y: p.py, Top: p.top, Bottom: p.bot}
		if exact {
			c = m.c0 * analytic.Exact3DAt(pt, tau, m.params(), m.plumeSource(), m.history())
		} else {
			c = m.c0 * analytic.DomenicoAt(pt, tau, m.params(), m.plumeSource(), m.history())
		}
	}
	if !(c > 0) || !finite(c) {
		if math.IsInf(c, 1) {
			return math.MaxFloat64
		}
		return 0
	}
	return c
}

// puffScreenNodes is the Gauss-Legendre order of the depth average of a puff
// over a well screen.
const puffScreenNodes = 24

// puff is the dissolved concentration, mg/L, of the instantaneous release at
// elapsed time tau, d: mass in g over lengths in m gives g/m^3 = mg/L.
func (m *model) puff(p point, tau float64) float64 {
	grams := m.massKg * 1000
	f := func(z float64) float64 {
		return analytic.Puff3D(p.px, p.py, z, tau, m.params(), grams, m.porosity, m.relDepth)
	}
	if p.bot <= p.top {
		return f(p.top)
	}
	return quad.Fixed(f, p.top, p.bot, puffScreenNodes, quad.Legendre{}, 0) / (p.bot - p.top)
}
