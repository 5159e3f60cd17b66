package plume

import (
	"context"
	"math"
)

// closedFormAvailable reports whether the closed forms give compound i:
// always for a compound released only at the source and in the 1D column
// (exact), and for a compound formed by decay when the chain's
// retardation factors are equal.
func (m *model) closedFormAvailable(i int, exact bool) bool {
	if !m.hasParent(i) || m.chain.EqualRetardation() {
		return true
	}
	return m.kind == SourceKind1D && exact
}

// compoundSeries holds the closed-form values of every compound at the
// requested times and at steady state, mg/L (NaN: no closed form).
type compoundSeries struct {
	exact, domenico             [][]float64 // [time][compound]
	steadyExact, steadyDomenico []float64
}

// evaluateCompounds computes the closed forms of every compound at p for
// the methods run; ok is false when ctx ended first.
func (m *model) evaluateCompounds(ctx context.Context, p Point, sp screenPlan) (compoundSeries, bool) {
	n := len(m.compounds)
	var cs compoundSeries
	eval := func(exact bool, tau float64) []float64 {
		out := make([]float64, n)
		m.compoundValues(exact, p, tau, out)
		return out
	}
	for _, tau := range sp.taus {
		if ctx.Err() != nil {
			return cs, false
		}
		if sp.run.exact {
			cs.exact = append(cs.exact, eval(true, tau))
		}
		if sp.run.domenico {
			cs.domenico = append(cs.domenico, eval(false, tau))
		}
	}
	inf := math.Inf(1)
	if sp.run.exact {
		cs.steadyExact = eval(true, inf)
	}
	if sp.run.domenico {
		cs.steadyDomenico = eval(false, inf)
	}
	return cs, true
}

// valuePtr is a pointer to v, nil for NaN (no value).
func valuePtr(v float64) *float64 {
	if math.IsNaN(v) {
		return nil
	}
	return Ptr(v)
}

// screenReceptorCompounds is screenReceptor for several compounds: each
// compound's series, steady state, peak, first exceedance and verdict.
func (m *model) screenReceptorCompounds(ctx context.Context, p Point, sp screenPlan) ReceptorResult {
	rr := m.receptorHeader(p, len(sp.taus))
	rr.Series = nil
	cs, ok := m.evaluateCompounds(ctx, p, sp)
	if !ok {
		return rr
	}
	memo := compoundMemo{m: m, p: p, exact: sp.primaryExact, vals: map[float64][]float64{}}
	for i := range m.compounds {
		rr.Compounds = append(rr.Compounds, m.screenCompound(ctx, p, sp, cs, i, &memo))
	}
	rr.ExceedsScreeningLevel = aggregateExceeds(rr.Compounds)
	return rr
}

// screenCompound is compound i's answer at p.
func (m *model) screenCompound(ctx context.Context, p Point, sp screenPlan, cs compoundSeries, i int, memo *compoundMemo) CompoundResult {
	cp := &m.compounds[i]
	cr := CompoundResult{Name: cp.name, Status: p.Status, Series: make([]SeriesPoint, len(sp.taus)), ScreeningLevel: copyPtr(cp.screening)}
	for j := range sp.taus {
		cr.Series[j] = SeriesPoint{Time: sp.reqTimes[j]}
		if sp.run.exact {
			cr.Series[j].Exact = valuePtr(cs.exact[j][i])
		}
		if sp.run.domenico {
			cr.Series[j].Domenico = valuePtr(cs.domenico[j][i])
		}
	}
	var steady float64
	exact := sp.primaryExact
	if sp.run.exact {
		cr.SteadyState.Exact = valuePtr(cs.steadyExact[i])
		steady = cs.steadyExact[i]
	}
	if sp.run.domenico {
		cr.SteadyState.Domenico = valuePtr(cs.steadyDomenico[i])
		if !exact {
			steady = cs.steadyDomenico[i]
		}
	}
	if !(sp.run.exact || sp.run.domenico) || !m.closedFormAvailable(i, exact) {
		return cr // no closed form: the numeric values decide (attachNumericCompounds)
	}
	f := func(tau float64) float64 {
		if ctx.Err() != nil {
			return 0
		}
		return memo.at(tau)[i]
	}
	var known timeline
	for j, tau := range sp.taus {
		v := cs.domenico
		if exact {
			v = cs.exact
		}
		known.tau, known.c = append(known.tau, tau), append(known.c, v[j][i])
	}
	var pk peakResult
	if p.inside() {
		pk = peakResult{tau: 0, c: cp.srcConc}
	} else {
		pk = m.findPeak(f, p, steady, sp.taus)
	}
	method := MethodDomenico
	if exact {
		method = MethodExact
	}
	cr.Peak = &Peak{Concentration: pk.c, Method: method}
	if !math.IsInf(pk.tau, 1) {
		cr.Peak.Time = Ptr(m.start + pk.tau)
	}
	if cp.screening != nil && !p.upgradient() {
		cr.ExceedsScreeningLevel = new(pk.c >= *cp.screening && pk.c > 0)
		if tau, ok := m.firstExceedance(f, exact, p, pk, known, *cp.screening); ok {
			cr.FirstExceedanceTime = Ptr(m.start + tau)
		}
	}
	return cr
}

// aggregateExceeds is a receptor's verdict over its compounds: true if any
// compound's is, else null if any compound's is null, else false.
func aggregateExceeds(cs []CompoundResult) *bool {
	anyNull := false
	for _, c := range cs {
		switch {
		case c.ExceedsScreeningLevel == nil:
			anyNull = true
		case *c.ExceedsScreeningLevel:
			return new(true)
		}
	}
	if anyNull {
		return nil
	}
	return new(false)
}

// compoundMemo remembers every compound's primary closed-form values at a
// receptor by elapsed time: the peak and first-exceedance searches of the
// compounds share the times they start from (the requested times, the
// characteristic time and its doublings and halvings), and one evaluation
// gives all compounds.
type compoundMemo struct {
	m     *model
	p     Point
	exact bool
	vals  map[float64][]float64
}

// at returns the compounds' values at elapsed time tau, d.
func (c *compoundMemo) at(tau float64) []float64 {
	if v, ok := c.vals[tau]; ok {
		return v
	}
	v := make([]float64, len(c.m.compounds))
	c.m.compoundValues(c.exact, c.p, tau, v)
	c.vals[tau] = v
	return v
}
