package plume

import (
	"context"
	"fmt"
	"sort"

	"downgradient/internal/crs"
)

// Layer screens the receptors of one scenario that arrive in parts (a
// receptor layer read and screened in chunks, as a streaming caller does)
// against one prepared model. Every receptor is screened independently
// (the same per-receptor computation as Screen: series, steady state,
// peak, first exceedance, allowances, contributions and its own caveats),
// so that a receptor's answer does not depend on the chunk it arrives in:
// Screen on every chunk gives the receptors of Model.Screen, and a Tally
// of the chunks gives its summary.
//
// What is computed once, for the whole layer, is in Head: the engine
// version, units, derived parameters, transects and the result-wide
// caveats. The differences from Model.Screen:
//   - the numeric cross-check is not run (it is one finite-volume grid
//     for all the receptors, seconds to minutes of work): PrepareLayer
//     refuses "numeric" in methods, and with no methods named a layer runs
//     exact and domenico (LayerMethods);
//   - the caveat one_dimensional_column (a 1D column ignores the
//     receptors' offsets and depths) is stated for every 1D column source,
//     since the receptors are not known in advance;
//   - engine.input_sha256 is the caller's to compute (it covers every
//     receptor; Head leaves it empty).
//
// A Layer is immutable after PrepareLayer and safe for concurrent use:
// several chunks may be screened at once.
type Layer struct {
	md     *Model
	opt    Options
	sp     screenPlan
	fr     *crs.Frame // the scenario's crs, nil without one
	fm     fmtr
	head   Result // request units; no receptors
	before int    // head.Caveats[:before] come before a receptor's own caveats, the rest after
	evals  int    // closed-form evaluations per receptor, as CheckWorkload counts them
}

// LayerMethods are the methods a Layer runs when the scenario names none.
var LayerMethods = []string{MethodExact, MethodDomenico}

// PrepareLayer validates sc except its receptors (ignored: they are given
// to CheckReceptor and Screen as they arrive) and prepares the model. Every
// bad field is reported at once as an *Error of kind KindInvalid, "numeric"
// in methods included.
func PrepareLayer(sc Scenario, opt Options) (*Layer, error) {
	var fe FieldErrors
	for i, m := range sc.Methods {
		if m == MethodNumeric {
			fe.Add(fmt.Sprintf("methods[%d]", i),
				`the numeric cross-check is not run on a streamed layer (it solves one finite-volume grid for all the receptors, seconds to minutes of work); ask for "exact" and "domenico", and cross-check a few receptors with "numeric" in a request that is not streamed`)
		}
	}
	sc.Receptors = nil
	md, err := prepare(sc, false)
	if err != nil || len(fe) > 0 {
		return nil, append(fe, FieldsOf(err)...).Err()
	}
	methods := sc.Methods
	if len(methods) == 0 {
		methods = LayerMethods
	}
	md = md.With(methods, sc.Times)
	fr, _ := siteCRS(sc) // validated above
	opt = opt.WithDefaults()
	run := methodSet(md.canon.Methods)
	if md.m.kind == SourceKindInstantaneous {
		run.domenicoSkipped, run.domenico = run.domenico, false
	}
	l := &Layer{md: md, opt: opt, sp: md.plan(run), fr: fr, fm: fmtr{u: md.units, f: md.uf}}
	closed := 0
	for _, m := range methods {
		if m == MethodExact || m == MethodDomenico {
			closed++
		}
	}
	l.evals = (len(sc.Times) + 1) * closed
	l.head = l.newHead(run)
	return l, nil
}

// newHead is the part of a layer's result that does not depend on its
// receptors, in request units: as Model.Screen builds it, with the
// caveats of the model as a whole.
func (l *Layer) newHead(run methods) Result {
	md, m := l.md, l.md.m
	res := Result{
		Engine:  Engine{Version: l.opt.EngineVersion},
		CRS:     md.sc.CRS,
		Units:   md.units,
		Derived: m.derived,
		Caveats: []Caveat{{Code: CaveatScreeningEstimate, Severity: SeverityCaution, Message: ScreeningCaution}},
	}
	// fromCanonical converts these in place: copies, so that the model
	// stays as prepared.
	res.Derived.Sources = append([]SourceDerived(nil), m.derived.Sources...)
	res.Derived.Compounds = append([]CompoundDerived(nil), m.derived.Compounds...)
	res.Derived.PeakMethod = PeakMethod
	res.Derived.ConcentrationFloor = m.concentrationFloor()
	res.Derived.InputUnits = inputUnits(md.units)
	res.Transects = m.screenTransects(md.canon, l.sp)
	m.modelCaveats(&res, nil, run, l.fm)
	if m.kind == SourceKind1D {
		res.caveat(CaveatOneDimensional, SeverityNote, "", "%s", oneDimensionalMessage)
	}
	l.before = len(res.Caveats)
	// After the receptors' own caveats, as Model.Screen orders them: the
	// source mass's, then the CRS's.
	m.sourceMassCaveats(&res, l.sp.taus, l.fm)
	crsCaveat(&res, md.sc)
	res.fromCanonical(md.uf)
	res.sanitize()
	return res
}

// Head returns the layer's result without receptors: engine version (no
// input hash), units, crs, derived parameters, transects and the
// result-wide caveats. Its Summary is empty (see Tail).
func (l *Layer) Head() Result {
	h := l.head
	h.Caveats = append([]Caveat(nil), l.head.Caveats...)
	return h
}

// EvaluationsPerReceptor is the number of closed-form evaluations a
// receptor costs, as CheckWorkload counts them: (times + 1) x closed-form
// methods.
func (l *Layer) EvaluationsPerReceptor() int { return l.evals }

// CheckReceptor checks receptors[i] as Validate would (its uniqueness
// among the layer's ids is the caller's): site x and y or lon and lat
// (with the crs, inside its projection), depths, the screen, the id's
// characters, and a distance from the source that does not overflow. The
// error is an *Error of kind KindInvalid naming receptors[i]'s fields.
func (l *Layer) CheckReceptor(i int, r Receptor) error {
	var fe FieldErrors
	validateReceptor(&fe, i, r)
	validateLonLat(&fe, i, r, l.md.sc.CRS, l.fr)
	if len(fe) == 0 {
		p := l.point(i, l.resolve(r))
		if !Finite(p.X) || !Finite(p.Y) || !Finite(p.X-p.Y) {
			fe.Add(fmt.Sprintf("receptors[%d].x", i), "out of range: the receptor's distance from the source overflows")
		}
	}
	return fe.Err()
}

// resolve places a receptor given by lon/lat in the site frame.
func (l *Layer) resolve(r Receptor) Receptor {
	if !r.hasLonLat() || l.fr == nil {
		return r
	}
	if x, y, err := l.fr.FromLonLat(*r.Lon, *r.Lat); err == nil {
		r.X, r.Y = Ptr(x), Ptr(y)
	}
	return r
}

// point is receptors[i] (resolved) located and classified in the plume frame.
func (l *Layer) point(i int, r Receptor) Point {
	L := l.md.uf.L
	c := Receptor{ID: r.ID, X: scaled(r.X, L), Y: scaled(r.Y, L), Z: scaled(r.Z, L),
		ScreenTop: scaled(r.ScreenTop, L), ScreenBottom: scaled(r.ScreenBottom, L)}
	p := l.md.receptorPoint(c, i)
	l.md.m.classify(&p)
	return p
}

// Screen screens receptors first, first+1, ... (rs, each passed by
// CheckReceptor) and returns them as a Result in request units: Receptors
// as Model.Screen gives them, Caveats the result-wide ones with the
// receptors' own between them where Model.Screen has them (so that
// CaveatCodes and Focus work on it), receptor by receptor (Model.Screen
// lists the caveats of the allowances after every receptor's own: the
// same caveats, each receptor's together here), Derived the layer's, AllowableScaleFactor the
// worst of these receptors (several sources). Summary is left empty: add
// the part to a Tally. The error is ctx's when it ended.
func (l *Layer) Screen(ctx context.Context, first int, rs []Receptor) (*Result, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	m, sp := l.md.m.building(), l.sp
	res := &Result{Engine: l.head.Engine, Units: l.head.Units, CRS: l.head.CRS, Derived: l.head.Derived,
		Receptors: make([]ReceptorResult, len(rs))}
	pts := make([]Point, len(rs))
	for k, r := range rs {
		r = l.resolve(r)
		pts[k] = l.point(first+k, r)
		res.Receptors[k] = m.screenReceptor(ctx, pts[k], sp)
		res.Receptors[k].X, res.Receptors[k].Y = *r.X, *r.Y
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	if len(m.extra) > 0 && l.md.canon.Contributions {
		m.contributions(res, pts, sp)
	}
	if len(m.compounds) == 0 {
		m.allowances(ctx, res, pts, sp)
		if err := ctx.Err(); err != nil {
			return nil, err
		}
	}
	computed := res.Caveats // the allowances' caveats, each a receptor's
	res.Caveats = nil
	for k := range res.Receptors {
		m.receptorCaveats(res, &res.Receptors[k], pts[k], l.opt, l.fm)
	}
	own := byReceptor(append(res.Caveats, computed...), res.Receptors)
	res.Caveats = make([]Caveat, 0, len(l.head.Caveats)+len(own))
	res.Caveats = append(append(append(res.Caveats, l.head.Caveats[:l.before]...), own...), l.head.Caveats[l.before:]...)
	floor := l.head.Derived.ConcentrationFloor
	for k := range res.Receptors {
		res.Receptors[k].fromCanonical(l.md.uf)
		res.Receptors[k].sanitize(floor)
	}
	if a := res.AllowableScaleFactor; a != nil {
		a.SteadyState, a.WithinTimes = cleanPtr(a.SteadyState), cleanPtr(a.WithinTimes)
	}
	return res, nil
}

// byReceptor orders caveats of receptors receptor by receptor, in the
// order of rrs, each receptor's in the order given (a stable sort; a
// caveat of no receptor of rrs goes last). It sorts cs in place.
func byReceptor(cs []Caveat, rrs []ReceptorResult) []Caveat {
	at := make(map[string]int, len(rrs))
	for k, rr := range rrs {
		at[rr.ID] = k
	}
	pos := func(c Caveat) int {
		if k, ok := at[c.ReceptorID]; ok {
			return k
		}
		return len(rrs)
	}
	sort.SliceStable(cs, func(a, b int) bool { return pos(cs[a]) < pos(cs[b]) })
	return cs
}

// OwnCaveats are the caveats of the receptors of a part that Screen
// returned (without the result-wide ones), receptor by receptor in input
// order.
func (l *Layer) OwnCaveats(part *Result) []Caveat {
	after := len(l.head.Caveats) - l.before
	return part.Caveats[l.before : len(part.Caveats)-after]
}

// Tail returns the layer's result without receptors once every part has
// been added to t: Head with the summary of t and, with several sources,
// the worst allowable scale factor.
func (l *Layer) Tail(t *Tally) Result {
	r := l.Head()
	r.Summary = t.summary(&r, r.Derived.ScreeningLevel)
	if len(l.md.m.extra) > 0 && t.scale != nil {
		r.AllowableScaleFactor = &Allowance{cleanPtr(t.scale.SteadyState), cleanPtr(t.scale.WithinTimes)}
	}
	return r
}

// cleanPtr is a copy of *p made finite (see Clean); nil stays nil.
func cleanPtr(p *float64) *float64 {
	if p == nil {
		return nil
	}
	return Ptr(Clean(*p))
}
