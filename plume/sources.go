package plume

import (
	"context"
	"math"
)

// deriveSourceReport lists each source's initial mass discharge Q C0, with
// Q the Darcy flux through its face n_e v W D (canonical g/d), in
// Derived.Sources; with a source mass also its depletion rate Q C0/M0
// (1/d) and, on the scenario's clock (d), when the source concentration
// falls below the screening level and when the mass is gone (null when
// never); the depletion fields stay null without a source mass.
func (m *model) deriveSourceReport() {
	m.derived.Sources = make([]SourceDerived, m.sourceCount())
	for i := range m.sourceCount() {
		s := m.source(i)
		sd := SourceDerived{ID: s.id}
		if q := m.faceFlow(s); q > 0 {
			sd.MassDischarge = Ptr(q * s.c0)
		}
		if s.rate > 0 {
			h := s.history()
			sd.DepletionRate = Ptr(s.rate)
			if ex := h.Exhausted(); !math.IsInf(ex, 1) {
				sd.TimeMassExhausted = Ptr(s.start + ex)
			}
			if m.screening != nil {
				if tb := h.TimeBelow(*m.screening / s.c0); !math.IsInf(tb, 1) {
					sd.TimeBelowScreeningLevel = Ptr(s.start + tb)
				}
			}
		}
		m.derived.Sources[i] = sd
	}
}

// exhausted is the elapsed time, d, at which the source's dissolvable
// mass is gone (+Inf: never, or no source mass).
func (s *sourceParams) exhausted() float64 {
	if !(s.rate > 0) {
		return math.Inf(1)
	}
	return s.history().Exhausted()
}

// faceFlow is the water flux through a planar source's face, n_e v W D,
// m^3/d; 0 for a column, an instantaneous release or without porosity.
func (m *model) faceFlow(s *sourceParams) float64 {
	if s.kind != SourceKind3D || !(m.porosity > 0) {
		return 0
	}
	return m.porosity * m.v * s.width * s.depth
}

// primaryValues are the primary method's values of a receptor: at the
// requested times (canonical) and at steady state.
func primaryValues(rr *ReceptorResult, exact bool) (times []float64, steady float64) {
	pick := func(e, d *float64) float64 {
		v := d
		if exact {
			v = e
		}
		if v == nil {
			return 0
		}
		return *v
	}
	for _, sp := range rr.Series {
		times = append(times, pick(sp.Exact, sp.Domenico))
	}
	return times, pick(rr.SteadyState.Exact, rr.SteadyState.Domenico)
}

// allowances sets, for each receptor compared with a screening level, the
// allowable source concentration and the dilution attenuation factor (one
// source) or the allowable scale factor of every source (several), at
// steady state and within the requested times: the model is linear in the
// source concentrations, so the receptor just reaches the level at C0
// level / C. With a source mass the depletion rate Q C0/M0 grows with the
// concentration and the receptor's value is not proportional to it: the
// factor within the requested times is then the smallest that reaches the
// level at the given masses (massScale), and null (with the caveat
// allowable_not_reached_with_mass) when none does. The dilution
// attenuation factor is always the given source concentration over the
// receptor's. A member is null where the receptor's value is 0, the
// receptor is not modelled, or (steady state) the sources are not
// constant. It stops early, leaving the rest null, when ctx ends.
func (m *model) allowances(ctx context.Context, res *Result, pts []Point, sp screenPlan) {
	if m.screening == nil || m.kind == SourceKindInstantaneous {
		return
	}
	level := *m.screening
	several := len(m.extra) > 0
	byMass := m.depletesByMass()
	var worst Allowance
	for i := range res.Receptors {
		rr := &res.Receptors[i]
		if pts[i].upgradient() || ctx.Err() != nil {
			continue
		}
		times, steady := primaryValues(rr, sp.primaryExact)
		within := 0.0
		for _, c := range times {
			within = math.Max(within, c)
		}
		if !m.allContinuous() {
			steady = 0
		}
		scale := Allowance{SteadyState: m.opt.ratio(level, steady), WithinTimes: m.opt.ratio(level, within)}
		if byMass && scale.WithinTimes != nil {
			scale.WithinTimes = nil
			if f, ok := m.massScale(ctx, pts[i], sp, level); ok {
				scale.WithinTimes = m.opt.of(f)
			} else if ctx.Err() == nil {
				res.caveat(CaveatAllowableNotReached, SeverityNote, rr.ID,
					"With the source mass given, no source concentration brings this receptor to the screening level within the requested times (a higher concentration drains the mass faster): allowable_source_concentration.within_times (allowable_scale_factor with several sources) is null here.")
			}
		}
		if several {
			rr.AllowableScaleFactor = &scale
			worst.SteadyState = minPtr(worst.SteadyState, scale.SteadyState)
			worst.WithinTimes = minPtr(worst.WithinTimes, scale.WithinTimes)
			continue
		}
		pair := &[2]Allowance{ // one allocation for both
			{SteadyState: m.opt.times(scale.SteadyState, m.c0), WithinTimes: m.opt.times(scale.WithinTimes, m.c0)},
			{SteadyState: m.opt.ratio(m.c0, steady), WithinTimes: m.opt.ratio(m.c0, within)},
		}
		rr.AllowableSourceConcentration, rr.DilutionAttenuationFactor = &pair[0], &pair[1]
	}
	if several {
		res.AllowableScaleFactor = &worst
	}
}

// minPtr is the smaller of two optional values.
func minPtr(a, b *float64) *float64 {
	switch {
	case a == nil:
		return b
	case b == nil:
		return a
	}
	return Ptr(math.Min(*a, *b))
}

// contributions lists each source's part of every receptor's values, with
// the methods run (several sources, asked for with contributions: true).
func (m *model) contributions(res *Result, pts []Point, sp screenPlan) {
	inf := math.Inf(1)
	for r := range res.Receptors {
		rr := &res.Receptors[r]
		for i := range m.sourceCount() {
			c := Contribution{SourceID: m.source(i).id, Series: make([]SeriesPoint, len(sp.taus))}
			value := func(exact bool, tau float64) *float64 { return Ptr(m.contribution(exact, pts[r], tau, i)) }
			for j, tau := range sp.taus {
				c.Series[j] = SeriesPoint{Time: sp.reqTimes[j]}
				if sp.run.exact {
					c.Series[j].Exact = value(true, tau)
				}
				if sp.run.domenico {
					c.Series[j].Domenico = value(false, tau)
				}
			}
			if sp.run.exact {
				c.SteadyState.Exact = value(true, inf)
			}
			if sp.run.domenico {
				c.SteadyState.Domenico = value(false, inf)
			}
			rr.Contributions = append(rr.Contributions, c)
		}
	}
}
