package plume

import (
	"math"

	"downgradient/analytic"
)

// exactRate returns d/dtau of the exact value at p, mg/L per day, where it
// is known in closed form (analytic.Exact3DRate): one compound, and every
// source continuous and constant (the breakthrough then rises
// monotonically and is the time integral of the rate), in 3D or a 1D
// column with a first-type inlet. With several sources the rate is the
// sum of each source's rate at p in its own frame, on its own clock (as
// the value is the sum of the contributions). ok is false otherwise, and
// where p lies inside a source's zone.
func (m *model) exactRate(p Point) (rate func(tau float64) float64, ok bool) {
	if len(m.compounds) > 0 || p.upgradient() || p.inside() {
		return nil, false
	}
	parts := make([]sourceRate, 0, m.sourceCount())
	for i := range m.sourceCount() {
		s := m.source(i)
		if !s.continuous() || s.kind == SourceKindInstantaneous || (s.kind == SourceKind1D && s.inlet == InletFlux) {
			return nil, false
		}
		q := m.localPoint(p, i)
		if i == 0 {
			q.Status = s.status(p) // as contribution classifies it
		}
		if q.inside() {
			return nil, false
		}
		if q.upgradient() {
			continue // contributes nothing at any time
		}
		part := sourceRate{pr: params(m.aquiferFor(q), &m.compoundParams), c0: s.c0, lag: s.lag,
			pt: analytic.Point{X: q.X, Y: q.Y, Top: q.Top, Bottom: q.Bottom}, src: s.plumeSource()}
		if s.kind == SourceKind1D {
			part.pt = analytic.Point{X: q.X}
			part.src = analytic.Source{Width: math.Inf(1), Depth: math.Inf(1)}
		}
		parts = append(parts, part)
	}
	return func(tau float64) float64 {
		sum := 0.0
		for i := range parts {
			sum += parts[i].at(tau)
		}
		return sum
	}, true
}

// sourceRate is one constant continuous source's part of exactRate.
type sourceRate struct {
	pt      analytic.Point
	pr      analytic.Params
	src     analytic.Source
	c0, lag float64
}

// at is the source's rate at tau on the first source's clock (0 before
// the source starts).
func (r *sourceRate) at(tau float64) float64 {
	t := tau - r.lag
	if !(t > 0) {
		return 0
	}
	return r.c0 * analytic.Exact3DRate(r.pt, t, r.pr, r.src)
}
