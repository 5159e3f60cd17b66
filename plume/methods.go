package plume

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"

	"downgradient/analytic"
)

// classify marks receptors upgradient of or inside a continuous source: the
// planar-source model covers only px > 0. Inside the source zone the value
// reported is the source concentration; elsewhere upgradient it is 0. The
// planar source has no length along flow, so this service takes the source
// zone to be its footprint (|py| <= W/2, top <= source depth) from the
// downgradient face back one source width upgradient (our convention, stated
// in the caveat); for a 1D column every px <= 0 is the inlet.
//
// With several sources a place is inside the source zone when it is inside
// any source's, modelled when it is downgradient of any source, and not
// modelled only when it is upgradient of them all.
func (m *model) classify(p *Point) {
	p.aq = nil
	if m.basis == BasisReceptorDistance {
		p.aq = m.pointAquifer(*p)
	}
	p.Status = m.sourceParams.status(*p)
	for i := range m.extra {
		switch st := m.extra[i].status(m.localPoint(*p, i+1)); {
		case st == StatusInsideSource:
			p.Status = st
		case st == StatusModelled && p.Status == StatusUpgradient:
			p.Status = st
		}
	}
}

// status classifies a place given in this source's own plume frame.
func (s *sourceParams) status(p Point) Status {
	if s.kind == SourceKindInstantaneous || p.X > 0 {
		return StatusModelled
	}
	if s.kind == SourceKind1D || (math.Abs(p.Y) <= s.width/2 && p.Top <= s.depth && p.X >= -s.width) {
		return StatusInsideSource
	}
	return StatusUpgradient
}

// source returns source i (0: the first).
func (m *model) source(i int) *sourceParams {
	if i == 0 {
		return &m.sourceParams
	}
	return &m.extra[i-1]
}

// sourceCount is the number of sources.
func (m *model) sourceCount() int { return 1 + len(m.extra) }

// localPoint is p in the plume frame of source i, classified for that
// source alone (with its own dispersion for BasisReceptorDistance).
func (m *model) localPoint(p Point, i int) Point {
	if i == 0 {
		return p
	}
	s := &m.extra[i-1]
	site := p.site
	if !p.hasSite {
		site[0], site[1] = m.frame.ToSite(p.X, p.Y)
	}
	q := p
	q.X, q.Y = s.frame.ToPlume(site[0], site[1])
	q.aq = nil
	q.Status = s.status(q)
	return q
}

// params are the closed forms' transport parameters of compound c in aquifer a.
func params(a *aquiferParams, c *compoundParams) analytic.Params {
	return analytic.Params{V: a.v, Dx: a.disp[0], Dy: a.disp[1], Dz: a.disp[2], R: c.r, Mu: c.mu}
}

// travelDistance is a point's travel distance from the source, m: along
// the flow from the source face, or from the release point of a spill.
func (m *model) travelDistance(p Point) float64 {
	if m.kind == SourceKindInstantaneous {
		return math.Hypot(p.X, p.Y)
	}
	return math.Max(p.X, 0)
}

// pointAquifer is the aquifer with the dispersion estimated at p's own
// travel distance (BasisReceptorDistance).
func (m *model) pointAquifer(p Point) *aquiferParams {
	a := m.aquiferParams
	a.travelRaw = m.travelDistance(p)
	a.travel = Ptr(math.Max(a.travelRaw, MinTravelDistance))
	a.alpha, a.disp = a.dispersionAt(a.travelRaw)
	return &a
}

// aquiferFor is the aquifer a point is evaluated in: its own for
// BasisReceptorDistance, else the model's.
func (m *model) aquiferFor(p Point) *aquiferParams {
	switch {
	case p.aq != nil:
		return p.aq
	case m.basis == BasisReceptorDistance:
		return m.pointAquifer(p)
	}
	return &m.aquiferParams
}

// history is the source's history for the closed forms: a duration, an
// exponential depletion, or (with a source mass) the power-law depletion
// at the rate Q C0/M0.
func (s *sourceParams) history() analytic.History {
	return analytic.History{Duration: s.duration, Depletion: s.depletion, Rate: s.rate, Exponent: s.gamma}
}

func (s *sourceParams) plumeSource() analytic.Source {
	return analytic.Source{Width: s.width, Depth: s.depth}
}

// strength is the source concentration at elapsed time tau, mg/L.
func (s *sourceParams) strength(tau float64) float64 {
	if !(tau > 0) || tau >= s.duration {
		return 0
	}
	if s.rate > 0 {
		return s.c0 * s.history().Fraction(tau)
	}
	if s.depletion == 0 {
		return s.c0
	}
	return s.c0 * math.Exp(-s.depletion*tau)
}

// closedForm evaluates the exact (exact == true) or Domenico value at the
// receptor at elapsed time tau since the source started, d (+Inf for the
// steady state), in mg/L. Domenico is not defined for an instantaneous
// release (returns 0).
//
// With several sources the value is the sum of each source's, in source
// order, each in its own plume frame and on its own clock (tau minus the
// source's lag behind the first).
func (m *model) closedForm(exact bool, p Point, tau float64) float64 {
	if len(m.compounds) > 0 {
		// Several compounds: the focused one's value (Value of capability
		// packages, see Model.Focus); the screening evaluates all of them
		// at once.
		out := make([]float64, len(m.compounds))
		m.compoundValues(exact, p, tau, out)
		if math.IsNaN(out[m.focus]) {
			return 0
		}
		return out[m.focus]
	}
	if len(m.extra) == 0 {
		return closedFormOf(m.aquiferFor(p), &m.compoundParams, &m.sourceParams, exact, p, tau)
	}
	c := 0.0
	for i := range m.sourceCount() {
		c += m.contribution(exact, p, tau, i)
	}
	return c
}

// contribution is source i's part of the value at p and tau (the first
// source's clock), mg/L.
func (m *model) contribution(exact bool, p Point, tau float64, i int) float64 {
	s := m.source(i)
	q := m.localPoint(p, i)
	if i == 0 {
		q.Status = s.status(p)
	}
	return closedFormOf(m.aquiferFor(q), &m.compoundParams, s, exact, q, tau-s.lag)
}

// closedFormOf is closedForm for compound c released by source s in aquifer a.
func closedFormOf(a *aquiferParams, c *compoundParams, s *sourceParams, exact bool, p Point, tau float64) float64 {
	if math.IsInf(tau, 1) && !s.continuous() {
		return 0 // the source is spent; everything leaves or decays
	}
	if !(tau > 0) {
		return 0
	}
	if p.upgradient() {
		return 0
	}
	if p.inside() {
		if math.IsInf(tau, 1) {
			return s.c0
		}
		return s.strength(tau)
	}
	pr := params(a, c)
	var v float64
	switch s.kind {
	case SourceKindInstantaneous:
		if !exact {
			return 0
		}
		v = puff(a, s, pr, p, tau)
	case SourceKind1D:
		if exact {
			inlet := analytic.FirstType
			if s.inlet == InletFlux {
				inlet = analytic.ThirdType
			}
			v = s.c0 * analytic.OgataBanksAt(p.X, tau, pr, inlet, s.history())
		} else {
			v = s.c0 * analytic.DomenicoAt(analytic.Point{X: p.X, Y: 0, Top: 0, Bottom: 0}, tau, pr, s.plumeSource(), s.history())
		}
	default:
		pt := analytic.Point{X: p.X, Y: p.Y, Top: p.Top, Bottom: p.Bottom}
		if exact && negligible3D(pr, p.X, tau) {
			return 0
		}
		if exact {
			v = s.c0 * analytic.Exact3DAt(pt, tau, pr, s.plumeSource(), s.history())
		} else {
			v = s.c0 * analytic.DomenicoAt(pt, tau, pr, s.plumeSource(), s.history())
		}
	}
	if !(v > 0) || !Finite(v) {
		if math.IsInf(v, 1) {
			return math.MaxFloat64
		}
		return 0
	}
	return v
}

// puffScreenNodes is the Gauss-Legendre order of the depth average of a puff
// over a well screen.
const puffScreenNodes = 24

// puff is the dissolved concentration, mg/L, of the instantaneous release s
// at elapsed time tau, d: mass in g over lengths in m gives g/m^3 = mg/L.
func puff(a *aquiferParams, s *sourceParams, pr analytic.Params, p Point, tau float64) float64 {
	grams := s.massKg * 1000
	f := func(z float64) float64 {
		return analytic.Puff3D(p.X, p.Y, z, tau, pr, grams, a.porosity, s.relDepth)
	}
	if p.Bottom <= p.Top {
		return f(p.Top)
	}
	return quad.Fixed(f, p.Top, p.Bottom, puffScreenNodes, quad.Legendre{}, 0) / (p.Bottom - p.Top)
}

// NegligibleFraction is the fraction of a source's concentration below
// which its exact 3D contribution is not computed but taken as 0: a
// millionth of the reporting floor (ConcentrationFloorFraction), so that
// no reported value changes by more than 1e-6 of the floor per source.
const NegligibleFraction = 1e-6 * ConcentrationFloorFraction

// negligible3D reports whether the exact 3D value of a planar source at
// plume distance x and elapsed time tau is certainly below
// NegligibleFraction of its concentration. The bound is the 1D first-type
// column (Ogata-Banks) of a constant source that never stops: the exact
// 3D value is the time integral of that column's pulse response times
// the transverse and vertical factors (each at most 1) and the source's
// relative strength (at most 1), so it cannot exceed it. The column costs
// a few erfc calls against the thousands of the 3D integral, which far
// downstream at early times, or far across the flow, is spent on values
// of 1e-50.
// Outside ordinary magnitudes (a transport parameter, the Peclet number
// x V / Dx, the distance V tau or the spread Dx tau not finite, as fuzzed
// extremes give, and at steady state) the bound is not used.
func negligible3D(pr analytic.Params, x, tau float64) bool {
	for _, v := range []float64{pr.V, pr.Dx, pr.Dy, pr.Dz, pr.R, x * pr.V / pr.Dx, pr.V * tau, pr.Dx * tau} {
		if !(v > 0) || math.IsInf(v, 1) {
			return false
		}
	}
	return analytic.OgataBanksAt(x, tau, pr, analytic.FirstType, analytic.History{}) < NegligibleFraction
}
