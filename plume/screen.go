package plume

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"math"
)

// Screen validates sc, derives the transport parameters and runs the
// requested methods (default: exact, domenico, numeric) at every receptor
// and time, plus the steady state, the peak, the first exceedance of the
// screening level and the caveats. Values come back in the request's units.
//
// A validation failure is returned as an *Error of kind KindInvalid naming
// every bad field at once; a cancelled or expired ctx as ctx.Err() (checked
// between receptors and passed to the numeric solver).
func Screen(ctx context.Context, sc Scenario, opt Options) (*Result, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	md, err := Prepare(sc)
	if err != nil {
		return nil, err
	}
	return md.Screen(ctx, opt)
}

// Screen runs the scenario's methods at its receptors and times (see the
// function Screen).
func (md *Model) Screen(ctx context.Context, opt Options) (*Result, error) {
	opt = opt.WithDefaults()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	m, pts, c := md.m.building(), md.pts, md.canon
	run := methodSet(c.Methods)
	if m.kind == SourceKindInstantaneous {
		run.domenicoSkipped = run.domenico
		run.domenico = false
	}

	res := &Result{
		Engine:    Engine{Version: opt.EngineVersion, InputSHA256: InputSHA256(md.given)},
		CRS:       md.sc.CRS,
		Units:     md.units,
		Derived:   m.derived,
		Receptors: make([]ReceptorResult, len(pts)),
		Caveats:   []Caveat{},
	}
	res.Derived.PeakMethod = PeakMethod
	res.Derived.ConcentrationFloor = m.concentrationFloor()
	res.Derived.InputUnits = inputUnits(md.units)

	sp := md.plan(run)

	for i, p := range pts {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		res.Receptors[i] = m.screenReceptor(ctx, p, sp)
		r := md.sc.Receptors[i]
		res.Receptors[i].X, res.Receptors[i].Y = *r.X, *r.Y
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}

	if run.numeric {
		if err := m.screenNumeric(ctx, res, pts, sp, opt); err != nil {
			return nil, err
		}
	}

	if len(m.extra) > 0 && c.Contributions {
		m.contributions(res, pts, sp)
	}
	if len(m.compounds) == 0 {
		m.allowances(ctx, res, pts, sp)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	res.Transects = m.screenTransects(c, sp)
	m.sourceMassCaveats(res, sp.taus, fmtr{u: md.units, f: md.uf})
	m.addCaveats(res, pts, run, opt, md.units, md.uf)
	crsCaveat(res, md.sc)
	res.fromCanonical(md.uf)
	res.sanitize()
	res.summarize(res.Derived.ScreeningLevel)
	return res, nil
}

// plan is what every receptor of a screening of md with the methods run
// shares (see screenPlan).
func (md *Model) plan(run methods) screenPlan {
	m, c := md.m, md.canon
	taus := make([]float64, len(c.Times))
	for i, t := range c.Times {
		taus[i] = t - m.start
	}
	sp := screenPlan{reqTimes: md.sc.Times, taus: taus, run: run, floor: m.comparisonFloor()}
	sp.primaryExact = run.exact || !run.domenico
	sp.primary = MethodExact
	if !sp.primaryExact {
		sp.primary = MethodDomenico
	}
	return sp
}

// methods is the set of methods to run.
type methods struct {
	exact, domenico, numeric bool
	domenicoSkipped          bool // requested but not applicable
}

// methodSet reads the requested method names; none means all three.
func methodSet(names []string) methods {
	if len(names) == 0 {
		return methods{exact: true, domenico: true, numeric: true}
	}
	var ms methods
	for _, n := range names {
		switch n {
		case MethodExact:
			ms.exact = true
		case MethodDomenico:
			ms.domenico = true
		case MethodNumeric:
			ms.numeric = true
		}
	}
	return ms
}

// Thresholds of the disagreement caveats (our choice: a difference between
// methods matters only where a value is near enough to the level of concern
// to change a screening decision).
const (
	// ComparisonLevelFraction: differences count where either value is at
	// least this fraction of the screening level.
	ComparisonLevelFraction = 0.1
	// ComparisonSourceFraction: without a screening level, this fraction
	// of the source concentration.
	ComparisonSourceFraction = 1e-3
)

// comparisonFloor is the concentration, mg/L, below which differences
// between methods are not counted: where both values are under it, and
// relative to max(exact, floor) elsewhere (see ComparisonLevelFraction).
func (m *model) comparisonFloor() float64 {
	if m.screening != nil {
		return ComparisonLevelFraction * *m.screening
	}
	if c := m.referenceConcentration(); c > 0 && m.kind != SourceKindInstantaneous {
		return ComparisonSourceFraction * c
	}
	return 1e-12
}

// screenPlan is what every receptor of a screening shares: the requested
// times (as given, and as elapsed days since the source start), the methods
// and the comparison floor, mg/L.
type screenPlan struct {
	reqTimes, taus []float64
	run            methods
	primaryExact   bool   // the peak and exceedance use exact (else Domenico)
	primary        string // the primary method's name
	floor          float64
}

// screenReceptor computes everything but the numeric values at one receptor,
// in canonical units except the series times, which echo the request's.
func (m *model) screenReceptor(ctx context.Context, p Point, sp screenPlan) ReceptorResult {
	if len(m.compounds) > 0 {
		return m.screenReceptorCompounds(ctx, p, sp)
	}
	rr := m.receptorHeader(p, len(sp.taus))
	dev := deviation{floor: sp.floor, max: math.Inf(-1)}
	known, ok := m.receptorSeries(ctx, p, sp, rr.Series, &dev)
	if !ok {
		return rr // Screen discards it and returns ctx.Err()
	}
	steadyPrimary := m.receptorSteady(p, sp, &rr, &dev)
	if dev.max > math.Inf(-1) && (sp.run.exact && sp.run.domenico) {
		rr.DomenicoDeviation = m.opt.of(dev.max)
	}
	m.receptorPeak(ctx, p, sp, &rr, steadyPrimary, known)
	return rr
}

// deviation tracks the largest relative Domenico-vs-exact difference where
// either value is at or above floor, mg/L.
type deviation struct{ floor, max float64 }

// compare counts one pair of exact (e) and Domenico (d) values where
// either reaches the floor, relative to max(e, floor).
func (dv *deviation) compare(e, d float64) {
	if math.Max(e, d) >= dv.floor {
		r := math.Abs(d-e) / math.Max(e, dv.floor)
		if !(r <= math.MaxFloat64) {
			// A floor near the smallest float64 (a screening level of
			// 1e-300 mg/L) leaves no finite ratio: the largest one.
			r = math.MaxFloat64
		}
		dv.max = math.Max(dv.max, r)
	}
}

// receptorHeader is a receptor's place, status and own dispersivities,
// with room for n series points.
func (m *model) receptorHeader(p Point, n int) ReceptorResult {
	rr := ReceptorResult{ID: p.ID, PlumeX: p.X, PlumeY: p.Y, Z: p.mid(), Status: p.Status, Series: make([]SeriesPoint, n)}
	if p.Screen {
		rr.ScreenTop, rr.ScreenBottom = m.opt.of(p.Top), m.opt.of(p.Bottom)
	}
	if m.basis == BasisReceptorDistance && p.Status == StatusModelled {
		a := m.aquiferFor(p)
		rr.Dispersivity = &ReceptorDispersivity{a.alpha[0], a.alpha[1], a.alpha[2], *a.travel}
	}
	return rr
}

// receptorSeries fills the series at the requested times and returns the
// primary method's values there; ok is false when ctx ended first.
func (m *model) receptorSeries(ctx context.Context, p Point, sp screenPlan, series []SeriesPoint, dev *deviation) (known timeline, ok bool) {
	run := sp.run
	// One block holds the receptor's values (one allocation, not one per
	// value; each SeriesPoint points into it) and the timeline's times and
	// values (full slices: appends never reach the values).
	n := len(sp.taus)
	block := make([]float64, 4*n)
	vals := block[: 2*n : 2*n]
	known.tau, known.c = block[2*n:2*n:3*n], block[3*n:3*n:4*n]
	for j, tau := range sp.taus {
		if ctx.Err() != nil {
			return known, false
		}
		pt := SeriesPoint{Time: sp.reqTimes[j]} // echoed in the request's unit
		var e, d float64
		if run.exact {
			e = m.closedForm(true, p, tau)
			vals[2*j] = e
			pt.Exact = &vals[2*j]
		}
		if run.domenico {
			d = m.closedForm(false, p, tau)
			vals[2*j+1] = d
			pt.Domenico = &vals[2*j+1]
		}
		if run.exact && run.domenico {
			dev.compare(e, d)
		}
		if sp.primaryExact && run.exact {
			known.tau, known.c = append(known.tau, tau), append(known.c, e)
		} else if !sp.primaryExact {
			known.tau, known.c = append(known.tau, tau), append(known.c, d)
		}
		series[j] = pt
	}
	return known, true
}

// receptorSteady fills the steady state of the methods run and returns the
// primary method's.
func (m *model) receptorSteady(p Point, sp screenPlan, rr *ReceptorResult, dev *deviation) float64 {
	run := sp.run
	inf := math.Inf(1)
	if run.exact {
		rr.SteadyState.Exact = m.opt.of(m.closedForm(true, p, inf))
	}
	if run.domenico {
		rr.SteadyState.Domenico = m.opt.of(m.closedForm(false, p, inf))
	}
	if run.exact && run.domenico {
		dev.compare(*rr.SteadyState.Exact, *rr.SteadyState.Domenico)
	}
	switch {
	case !run.exact && !run.domenico:
		return m.closedForm(true, p, inf)
	case !sp.primaryExact:
		return *rr.SteadyState.Domenico
	case rr.SteadyState.Exact != nil:
		return *rr.SteadyState.Exact
	}
	return m.closedForm(true, p, inf)
}

// receptorPeak finds the peak and the first exceedance of the screening
// level. The searches stop early (values then discarded) when ctx is done.
func (m *model) receptorPeak(ctx context.Context, p Point, sp screenPlan, rr *ReceptorResult, steadyPrimary float64, known timeline) {
	f := func(tau float64) float64 {
		if ctx.Err() != nil {
			return 0
		}
		return m.closedForm(sp.primaryExact, p, tau)
	}
	pk := m.findPeak(f, p, steadyPrimary, sp.taus)
	rr.Peak = Peak{Concentration: pk.c, Method: sp.primary}
	if !math.IsInf(pk.tau, 1) {
		rr.Peak.Time = m.opt.of(m.start + pk.tau)
	}
	if m.screening != nil && !p.upgradient() {
		// Compared: a modelled value (or, inside the source zone, the
		// source's own concentration) against a known level.
		rr.ExceedsScreeningLevel = new(pk.c >= *m.screening && pk.c > 0)
		if tau, ok := m.firstExceedance(f, sp.primaryExact, p, pk, known, *m.screening); ok {
			rr.FirstExceedanceTime = m.opt.of(m.start + tau)
		}
	}
}

// InputSHA256 is the hex SHA-256 of the canonical JSON of a scenario: the
// Scenario re-encoded by encoding/json (fields in declaration order, shortest
// round-trip numbers, no insignificant whitespace). The scenario must hold
// no NaN or Inf (Validate rejects them); if it does, the hash is of the
// error text.
func InputSHA256(sc Scenario) string {
	b, err := json.Marshal(sc)
	if err != nil {
		b = []byte(err.Error())
	}
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

// screenNumeric runs the numeric cross-check (one grid for every source,
// or the coupled chain of several compounds) and attaches its values, or
// says in a caveat why it was not run. The error is ctx's or the solver's.
func (m *model) screenNumeric(ctx context.Context, res *Result, pts []Point, sp screenPlan, opt Options) error {
	fail := func(err error) error {
		if ctxErr := ctx.Err(); ctxErr != nil {
			return ctxErr
		}
		return err
	}
	if len(m.compounds) > 0 {
		values, rep, reason, err := m.runNumericChain(ctx, pts, sp.taus, opt.CellBudget)
		if err != nil {
			return fail(err)
		}
		if rep == nil {
			res.caveat(CaveatNumericNotRun, SeverityCaution, "", "The numeric cross-check was not run: %s.", reason)
			return nil
		}
		res.Numeric = rep
		m.attachNumericCompounds(res, values, pts, sp, opt.NumericTolerance)
		return nil
	}
	nr, reason, err := m.runNumeric(ctx, pts, sp.taus, opt.CellBudget)
	if err != nil {
		return fail(err)
	}
	if nr == nil {
		res.caveat(CaveatNumericNotRun, SeverityCaution, "", "The numeric cross-check was not run: %s.", reason)
		return nil
	}
	res.Numeric = nr.report
	m.attachNumeric(res, nr, pts, sp.reqTimes, sp.taus, sp.floor, opt.NumericTolerance)
	return nil
}
