package plume

import (
	"context"
	"fmt"
	"math"
	"slices"

	"downgradient/internal/roots"
)

// A continuous source with a dissolvable mass (source.mass together with
// source.concentration) depletes by the water flowing through its face:
// Q = n_e v W D, dM/dt = -Q Cs, Cs/C0 = (M/M0)^Gamma (the power-law source
// function of Falta, Rao & Basu 2005, J. Contam. Hydrol. 78:259-280; the
// closed forms are in analytic/history_power.go). The depletion rate
// Q C0/M0 grows with C0, so a receptor's value is not proportional to the
// source concentration: the allowable concentration at the given mass is
// found by a root search (massScale).

// SourceSustainFraction is the fraction of its initial concentration
// below which a source is said not to sustain it: when a source with a
// mass falls below it (or its mass runs out) before the last requested
// time, the caveat source_mass_insufficient says so. One order of
// magnitude (our choice): a source that has lost that much no longer
// resembles the concentration given for it.
const SourceSustainFraction = 0.1

// SeparatePhaseFraction is the fraction of the aqueous solubility at or
// above which a source concentration suggests a separate (non-aqueous)
// phase in the source zone (common practice: rules of thumb put it between
// 1 % and 10 % of the solubility; the upper end is used here); with a
// source mass the caveat source_mass_separate_phase_likely says so.
const SeparatePhaseFraction = 0.1

// depletesByMass reports whether any source has a dissolvable mass.
func (m *model) depletesByMass() bool {
	for i := range m.sourceCount() {
		if m.source(i).rate > 0 {
			return true
		}
	}
	return false
}

// scaled is a copy of m with every source concentration multiplied by f
// and the depletion rates Q C0/M0 of the sources with a mass set for the
// new concentrations (depleting), or set to 0 (not depleting: a constant
// source of the new strength, an upper bound of the depleting one).
func (m *model) scaled(f float64, depleting bool) *model {
	c := *m
	c.extra = slices.Clone(m.extra)
	for i := range c.sourceCount() {
		s := c.source(i)
		s.c0 *= f
		if !depleting {
			s.rate = 0
			continue
		}
		c.setDepletionRate(s)
	}
	return &c
}

// withinTimes is the primary method's largest value at p over the
// requested elapsed times, mg/L.
func (m *model) withinTimes(p Point, sp screenPlan) float64 {
	v := 0.0
	for _, tau := range sp.taus {
		v = math.Max(v, m.closedForm(sp.primaryExact, p, tau))
	}
	return v
}

// Search of massScale: the geometric step of the scan for the first
// bracket, the most steps, the relative accuracy of the factor, and the
// product of the depletion rate and the earliest requested time beyond
// which every source has released its mass (the values then no longer
// grow with the concentration).
const (
	massScaleStep    = 1.5
	massScaleSteps   = 90
	massScaleRelTol  = 1e-14
	massScaleDrained = 1e6
)

// massScale is the smallest factor f of every source concentration, the
// source masses held fixed, at which the primary method's largest value
// at p over the requested times reaches level (mg/L); ok is false when no
// factor does (the masses are too small to bring the receptor to the
// level, whatever the concentration) or ctx ended.
//
// A larger concentration drains a mass faster, so the value is not
// proportional to f and may even fall as f grows; it never exceeds f
// times the value of the same sources without depletion (every history
// Cs(k s)/C0 falls as k grows). The search therefore starts where that
// bound equals the level, scans up by massScaleStep to the first factor
// that reaches it, and refines the bracket by Brent's method to
// massScaleRelTol, so that screening with the concentrations so scaled
// gives the level at the receptor to far better than 1e-9.
func (m *model) massScale(ctx context.Context, p Point, sp screenPlan, level float64) (float64, bool) {
	bound := m.scaled(1, false).withinTimes(p, sp)
	if !(bound > 0) {
		return 0, false
	}
	g := func(f float64) float64 {
		if ctx.Err() != nil {
			return 0
		}
		return m.scaled(f, true).withinTimes(p, sp) - level
	}
	f := level / bound
	gf := g(f)
	if gf >= 0 {
		// Depletion negligible over the times: the bound is reached to
		// within the closed forms' accuracy. The root lies just below.
		lo := f / massScaleStep
		glo := g(lo)
		if glo >= 0 || ctx.Err() != nil {
			return lo, ctx.Err() == nil
		}
		return roots.Brent(g, lo, f, glo, gf, massScaleRelTol*f, 200), ctx.Err() == nil
	}
	drained := m.drainedFactor(sp)
	for range massScaleSteps {
		fn := f * massScaleStep
		gn := g(fn)
		if ctx.Err() != nil {
			return 0, false
		}
		if gn >= 0 {
			r := roots.Brent(g, f, fn, gf, gn, massScaleRelTol*fn, 200)
			return r, ctx.Err() == nil
		}
		f, gf = fn, gn
		if f > drained {
			break
		}
	}
	return 0, false
}

// drainedFactor is the scale factor beyond which every source has a mass
// and has drained it before the earliest requested time after the last
// source start (rate times elapsed time above massScaleDrained); +Inf when
// some source has no mass (its part grows with the factor without bound)
// or no requested time follows every start.
func (m *model) drainedFactor(sp screenPlan) float64 {
	lag, kmin := 0.0, math.Inf(1)
	for i := range m.sourceCount() {
		s := m.source(i)
		if !(s.rate > 0) {
			return math.Inf(1)
		}
		lag = math.Max(lag, s.lag)
		kmin = math.Min(kmin, s.rate)
	}
	tmin := math.Inf(1)
	for _, tau := range sp.taus {
		if tau-lag > 0 {
			tmin = math.Min(tmin, tau-lag)
		}
	}
	return massScaleDrained / (kmin * tmin)
}

// sourceMassCaveats warns, for each source with a mass, when it cannot
// sustain its concentration over the requested times (taus, elapsed d)
// and when its concentration suggests a separate phase.
func (m *model) sourceMassCaveats(res *Result, taus []float64, fm fmtr) {
	last := math.Inf(-1)
	for _, t := range taus {
		last = math.Max(last, t)
	}
	for i := range m.sourceCount() {
		s := m.source(i)
		if !(s.rate > 0) {
			continue
		}
		h := s.history()
		if below := h.TimeBelow(SourceSustainFraction); below < last-s.lag {
			what := fmt.Sprintf("falls below %s (%g %% of it)", fm.conc(SourceSustainFraction*s.c0), 100*SourceSustainFraction)
			if ex := h.Exhausted(); ex <= below {
				what = "is exhausted"
			}
			res.caveat(CaveatSourceMassInsufficient, SeverityCaution, "",
				"The source mass%s (%.4g kg) cannot sustain the source concentration %s over the requested times: the water flowing through the source face drains it at the rate Q C0/M0 = %s, and the source %s at %s, before the last requested time %s. The values account for this depletion; if the source is known to have held its concentration for longer, more mass feeds it than was given (a separate phase, or mass sorbed in the source zone).",
				sourceLabel(s), s.massKg, fm.conc(s.c0), fm.rate(s.rate), what, fm.timeOf(s.start+below), fm.timeOf(m.start+last))
		}
		if m.solubility != nil && s.c0 >= SeparatePhaseFraction**m.solubility {
			res.caveat(CaveatSeparatePhaseLikely, SeverityCaution, "",
				"The source concentration%s %s is %.3g %% of the aqueous solubility %s (at or above %g %%, common practice): a separate (non-aqueous) phase is likely in the source zone. The mass given is treated as dissolvable; a separate phase holds more, so the given mass is a lower bound of what feeds the source, which may last longer than modelled: the depletion times reported are lower bounds, and late values may be underestimated.",
				sourceLabel(s), fm.conc(s.c0), 100*s.c0/(*m.solubility), fm.conc(*m.solubility), 100*SeparatePhaseFraction)
		}
	}
}
