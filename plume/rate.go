package plume

import (
	"math"

	"downgradient/analytic"
)

// exactRate returns d/dtau of the exact value at p, mg/L per day, where it
// is known in closed form (analytic.Exact3DRate): one compound, one source
// that is continuous and constant (its breakthrough then rises
// monotonically and is the time integral of the rate), in 3D or a 1D
// column with a first-type inlet. ok is false otherwise.
func (m *model) exactRate(p Point) (rate func(tau float64) float64, ok bool) {
	s := &m.sourceParams
	if len(m.extra) > 0 || len(m.compounds) > 0 || !s.continuous() || p.upgradient() || p.inside() {
		return nil, false
	}
	if s.kind == SourceKind1D && s.inlet == InletFlux {
		return nil, false
	}
	pr := params(m.aquiferFor(p), &m.compoundParams)
	pt := analytic.Point{X: p.X, Y: p.Y, Top: p.Top, Bottom: p.Bottom}
	src := s.plumeSource()
	if s.kind == SourceKind1D {
		pt = analytic.Point{X: p.X}
		src = analytic.Source{Width: math.Inf(1), Depth: math.Inf(1)}
	}
	return func(tau float64) float64 { return s.c0 * analytic.Exact3DRate(pt, tau, pr, src) }, true
}
