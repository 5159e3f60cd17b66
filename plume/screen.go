package plume

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"math"
)

// Screen validates sc, derives the transport parameters and runs the
// requested methods (default: exact, domenico, numeric) at every receptor
// and time, plus the steady state, the peak, the first exceedance of the
// screening level and the caveats. Values come back in the request's units.
//
// A validation failure is returned as FieldErrors (every bad field at once);
// a cancelled or expired ctx as ctx.Err() (checked between receptors and
// passed to the numeric solver).
func Screen(ctx context.Context, sc Scenario, opt Options) (*Result, error) {
	opt = opt.withDefaults()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := Validate(sc); err != nil {
		return nil, err
	}
	units := sc.Units.withDefaults()
	uf, _ := units.factors()
	c := toCanonical(sc)

	// Frames and receptors.
	frame := frameOf(c.Source)
	pts := make([]point, len(c.Receptors))
	maxX := math.Inf(-1)
	for i, r := range c.Receptors {
		p := point{id: r.ID}
		if p.id == "" {
			p.id = fmt.Sprintf("R%d", i+1)
		}
		p.px, p.py = frame.ToPlume(*r.X, *r.Y)
		switch {
		case r.ScreenTop != nil:
			p.top, p.bot, p.screen = *r.ScreenTop, *r.ScreenBottom, true
		case r.Z != nil:
			p.top, p.bot = *r.Z, *r.Z
		}
		maxX = math.Max(maxX, p.px)
		pts[i] = p
	}
	m := derive(c, maxX)
	for i := range pts {
		m.classify(&pts[i])
	}
	run := methodSet(c.Methods)
	if m.kind == SourceKindInstantaneous {
		run.domenicoSkipped = run.domenico
		run.domenico = false
	}

	res := &Result{
		Engine:    Engine{Version: opt.EngineVersion, InputSHA256: InputSHA256(sc)},
		Units:     units,
		Derived:   m.derived,
		Receptors: make([]ReceptorResult, len(pts)),
		Caveats:   []Caveat{},
	}
	res.Derived.PeakMethod = PeakMethod

	taus := make([]float64, len(c.Times))
	for i, t := range c.Times {
		taus[i] = t - m.start
	}
	floor := m.comparisonFloor()
	primaryExact := run.exact || !run.domenico
	primary := MethodExact
	if !primaryExact {
		primary = MethodDomenico
	}

	for i, p := range pts {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		res.Receptors[i] = m.screenReceptor(ctx, p, sc.Times, taus, run, primaryExact, primary, floor)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}

	if run.numeric {
		nr, reason, err := m.runNumeric(ctx, pts, taus, opt.CellBudget)
		if err != nil {
			if ctxErr := ctx.Err(); ctxErr != nil {
				return nil, ctxErr
			}
			return nil, err
		}
		if nr == nil {
			res.caveat(CaveatNumericNotRun, SeverityCaution, "", "The numeric cross-check was not run: %s.", reason)
		} else {
			res.Numeric = nr.report
			m.attachNumeric(res, nr, pts, sc.Times, taus, floor, opt.NumericTolerance)
		}
	}

	m.addCaveats(res, pts, run, opt, units, uf)
	res.fromCanonical(uf)
	res.sanitize()
	return res, nil
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

// comparisonFloor is the concentration, mg/L, below which relative
// differences between methods are not counted: 1 % of the screening level,
// or 1e-6 of the source concentration without one (our choice: differences
// far below any level of concern do not change a screening decision).
func (m *model) comparisonFloor() float64 {
	if m.screening != nil {
		return 0.01 * *m.screening
	}
	if m.c0 > 0 {
		return 1e-6 * m.c0
	}
	return 1e-12
}

// screenReceptor computes everything but the numeric values at one receptor,
// in canonical units except the series times, which echo the request's
// (reqTimes); taus are the same times as elapsed days since the source start.
func (m *model) screenReceptor(ctx context.Context, p point, reqTimes, taus []float64, run methods, primaryExact bool, primary string, floor float64) ReceptorResult {
	rr := ReceptorResult{ID: p.id, PlumeX: p.px, PlumeY: p.py, Z: p.mid(), Series: make([]SeriesPoint, len(taus))}
	if p.screen {
		rr.ScreenTop, rr.ScreenBottom = ptr(p.top), ptr(p.bot)
	}
	dev := math.Inf(-1)
	compare := func(e, d float64) {
		if e >= floor && e > 0 {
			dev = math.Max(dev, math.Abs(d-e)/e)
		}
	}
	var known timeline // primary-method values at the requested times
	for j, tau := range taus {
		if ctx.Err() != nil {
			return rr // Screen discards it and returns ctx.Err()
		}
		sp := SeriesPoint{Time: reqTimes[j]} // echoed in the request's unit
		var e, d float64
		if run.exact {
			e = m.closedForm(true, p, tau)
			sp.Exact = ptr(e)
		}
		if run.domenico {
			d = m.closedForm(false, p, tau)
			sp.Domenico = ptr(d)
		}
		if run.exact && run.domenico {
			compare(e, d)
		}
		if primaryExact && run.exact {
			known.tau, known.c = append(known.tau, tau), append(known.c, e)
		} else if !primaryExact {
			known.tau, known.c = append(known.tau, tau), append(known.c, d)
		}
		rr.Series[j] = sp
	}
	inf := math.Inf(1)
	var steadyPrimary float64
	if run.exact {
		e := m.closedForm(true, p, inf)
		rr.SteadyState.Exact = ptr(e)
	}
	if run.domenico {
		d := m.closedForm(false, p, inf)
		rr.SteadyState.Domenico = ptr(d)
	}
	if run.exact && run.domenico {
		compare(*rr.SteadyState.Exact, *rr.SteadyState.Domenico)
	}
	if run.exact || run.domenico {
		if primaryExact {
			if rr.SteadyState.Exact != nil {
				steadyPrimary = *rr.SteadyState.Exact
			} else {
				steadyPrimary = m.closedForm(true, p, inf)
			}
		} else {
			steadyPrimary = *rr.SteadyState.Domenico
		}
	} else {
		steadyPrimary = m.closedForm(true, p, inf)
	}
	if dev > math.Inf(-1) && (run.exact && run.domenico) {
		rr.DomenicoDeviation = ptr(dev)
	}

	// The peak and exceedance searches stop early (values then discarded)
	// when ctx is done.
	f := func(tau float64) float64 {
		if ctx.Err() != nil {
			return 0
		}
		return m.closedForm(primaryExact, p, tau)
	}
	pk := m.findPeak(f, p, steadyPrimary, taus)
	rr.Peak = Peak{Concentration: pk.c, Method: primary}
	if !math.IsInf(pk.tau, 1) {
		rr.Peak.Time = ptr(m.start + pk.tau)
	}
	if m.screening != nil {
		rr.ExceedsScreeningLevel = pk.c >= *m.screening && pk.c > 0
		if tau, ok := m.firstExceedance(f, p, pk, known, *m.screening); ok {
			rr.FirstExceedanceTime = ptr(m.start + tau)
		}
	}
	return rr
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
