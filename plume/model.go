package plume

import (
	"fmt"
)

// Model is a validated scenario prepared for evaluation: the request's units
// and their factors, the site-to-plume frame, the derived transport
// parameters and the receptors located and classified in the plume frame.
// It is the one path from a Scenario to numbers: Screen, the maps, the
// uncertainty and the fitting packages all evaluate through it, and nothing
// else derives parameters.
//
// Unless a method says otherwise, a Model takes and returns canonical units
// (m, d, mg/L); Factors converts to and from the request's units. Times
// passed to Value are elapsed times since the source started (tau, d); the
// request's clock is tau + SourceStart.
//
// A Model is immutable after Prepare and safe for concurrent use.
type Model struct {
	given Scenario    // as given (hashed as the input)
	sc    Scenario    // as given, receptors given by lon/lat placed in the site frame; request units
	units Units       // the request's units, defaults filled in
	uf    unitFactors // request unit -> canonical
	canon Scenario    // sc in canonical units
	frame Frame       // canonical site frame -> plume frame
	m     *model
	pts   []Point
}

// Prepare validates sc (every bad field at once, as an *Error of kind
// KindInvalid), derives its model and checks that every converted and
// derived value is finite (checkFinite).
func Prepare(sc Scenario) (*Model, error) { return prepare(sc, true) }

// prepare is Prepare; without receptors the scenario's receptors are not
// checked (a layer's are checked one by one as they arrive: see Layer).
func prepare(sc Scenario, receptors bool) (*Model, error) {
	if err := validate(sc, receptors); err != nil {
		return nil, err
	}
	given := sc
	sc = resolveLonLat(sc)
	units := sc.Units.withDefaults()
	uf, _ := units.factors()
	c := toCanonical(sc)
	md := &Model{sc: sc, given: given, units: units, uf: uf, canon: c, pts: make([]Point, len(c.Receptors))}
	md.m = derive(c)
	md.frame = md.m.frame
	for i, r := range c.Receptors {
		md.pts[i] = md.receptorPoint(r, i)
		md.m.classify(&md.pts[i])
	}
	if err := md.checkFinite(); err != nil {
		return nil, err
	}
	return md, nil
}

// receptorPoint places a canonical receptor in the plume frame (not yet classified).
func (md *Model) receptorPoint(r Receptor, i int) Point {
	p := Point{ID: r.ID, site: [2]float64{*r.X, *r.Y}, hasSite: true}
	if p.ID == "" {
		p.ID = fmt.Sprintf("R%d", i+1)
	}
	p.X, p.Y = md.frame.ToPlume(*r.X, *r.Y)
	switch {
	case r.ScreenTop != nil:
		p.Top, p.Bottom, p.Screen = *r.ScreenTop, *r.ScreenBottom, true
	case r.Z != nil:
		p.Top, p.Bottom = *r.Z, *r.Z
	}
	return p
}

// Scenario returns the scenario in request units, receptors given by
// lon/lat placed in the site frame.
func (md *Model) Scenario() Scenario { return md.sc }

// Canonical returns the scenario in canonical units (m, d, mg/L).
func (md *Model) Canonical() Scenario { return md.canon }

// Units returns the request's units with the defaults filled in.
func (md *Model) Units() Units { return md.units }

// Factors returns the multipliers from the request's units to canonical ones.
func (md *Model) Factors() UnitFactors { return UnitFactors(md.uf) }

// Frame is the site-to-plume frame in canonical units (m).
func (md *Model) Frame() Frame { return md.frame }

// SiteFrame is the site-to-plume frame in the request's length unit (of
// the first source when there are several).
func (md *Model) SiteFrame() Frame { return frameOf(md.sc.PrimarySource()) }

// Receptors returns the receptors located and classified in the plume frame, m.
func (md *Model) Receptors() []Point { return md.pts }

// Derived returns the derived parameters in canonical units.
func (md *Model) Derived() Derived { return md.m.derived }

// Locate classifies a plume-frame place, m, over depths [top, bottom]
// (equal for a point).
func (md *Model) Locate(x, y, top, bottom float64) Point {
	p := Point{X: x, Y: y, Top: top, Bottom: bottom, Screen: bottom > top}
	md.m.classify(&p)
	return p
}

// LocateSite classifies a place given in canonical site coordinates, m.
func (md *Model) LocateSite(id string, x, y, z float64) Point {
	p := Point{ID: id, Top: z, Bottom: z, site: [2]float64{x, y}, hasSite: true}
	p.X, p.Y = md.frame.ToPlume(x, y)
	md.m.classify(&p)
	return p
}

// Value is the concentration, mg/L, of a closed-form method (MethodExact or
// MethodDomenico) at p and elapsed time tau since the source started, d
// (+Inf: the steady state). Domenico is 0 for an instantaneous release.
func (md *Model) Value(method string, p Point, tau float64) float64 {
	return md.m.closedForm(method == MethodExact, p, tau)
}

// Peak is the highest value of method at p over all time: its elapsed time,
// d (+Inf when approached as t -> infinity), and concentration, mg/L.
// steady is the method's steady state at p; taus are times already of
// interest (the requested ones), which the search also samples.
func (md *Model) Peak(method string, p Point, steady float64, taus []float64) (tau, c float64) {
	exact := method == MethodExact
	f := func(t float64) float64 { return md.m.closedForm(exact, p, t) }
	pk := md.m.findPeak(f, p, steady, taus)
	return pk.tau, pk.c
}

// Transport returns the model-wide transport parameters, canonical units;
// with DispersivityBasis "receptor_distance" the dispersivities are each
// point's own (TransportAt) and Alpha and Dispersion are zero here.
func (md *Model) Transport() Transport {
	m := md.m
	return Transport{V: m.v, R: m.r, Lambda: m.lambda, Mu: m.mu, Alpha: m.alpha, Dispersion: m.disp}
}

// TransportAt returns the transport parameters a point is evaluated with.
func (md *Model) TransportAt(p Point) Transport {
	tr := md.Transport()
	a := md.m.aquiferFor(p)
	tr.Alpha, tr.Dispersion = a.alpha, a.disp
	return tr
}

// SourceTerm returns the source description (the first source's when
// there are several; Continuous is true only when all are), canonical units.
func (md *Model) SourceTerm() SourceTerm {
	m := md.m
	return SourceTerm{Kind: m.kind, Concentration: m.c0, Mass: m.massKg, Width: m.width, Depth: m.depth,
		ReleaseDepth: m.relDepth, Start: m.start, Duration: m.duration, Depletion: m.depletion,
		DepletionRate: m.rate, DepletionExponent: m.gamma, Continuous: m.allContinuous()}
}

// ScreeningLevel is the screening level used, mg/L; ok is false when none is known.
func (md *Model) ScreeningLevel() (level float64, ok bool) {
	if md.m.screening == nil {
		return 0, false
	}
	return *md.m.screening, true
}

// Elapsed converts a time on the request's clock, in the request's unit,
// to the elapsed time since the source started, d.
func (md *Model) Elapsed(t float64) float64 { return t*md.uf.T - md.m.start }

// UnitFactors are the multipliers from a request's units to the canonical
// ones: a value q in the request's unit is q*L (or T, C) in m (d, mg/L).
type UnitFactors struct {
	L float64 // metres per request length unit
	T float64 // days per request time unit
	C float64 // mg/L per request concentration unit
	K float64 // m/d per request conductivity unit
	M float64 // g/d per request mass-discharge unit
}

// Transport holds the transport parameters of a model, canonical units.
type Transport struct {
	V          float64    // seepage velocity, m/d
	R          float64    // retardation factor
	Lambda     float64    // decay rate ln 2 / half-life, 1/d
	Mu         float64    // decay rate in the retarded equation, 1/d
	Alpha      [3]float64 // dispersivities alpha_L, alpha_T, alpha_V, m
	Dispersion [3]float64 // dispersion coefficients, m^2/d
}

// SourceTerm describes a model's source, canonical units.
type SourceTerm struct {
	Kind          string  // SourceKind3D, SourceKind1D or SourceKindInstantaneous
	Concentration float64 // C0, mg/L (continuous sources)
	Mass          float64 // released mass (instantaneous), or dissolvable mass M0 (continuous), kg
	Width, Depth  float64 // m; +Inf for a column
	ReleaseDepth  float64 // depth of an instantaneous release, m
	Start         float64 // d
	Duration      float64 // d; +Inf: continuous
	Depletion     float64 // 1/d; 0: constant strength
	// Depletion by the source mass: the rate Q C0/M0, 1/d (0: no source
	// mass), and the exponent of the power-law source function.
	DepletionRate     float64
	DepletionExponent float64
	Continuous        bool // constant strength forever
}

// Status says whether and how the model covers a place.
type Status string

// Statuses of a point.
const (
	// StatusModelled: downgradient of the source face (or anywhere for a spill).
	StatusModelled Status = "modelled"
	// StatusUpgradient: upgradient of the source, outside the model's domain.
	StatusUpgradient Status = "not_modelled_upgradient"
	// StatusInsideSource: within the source zone; the value is the source's.
	StatusInsideSource Status = "inside_source"
)

// point is a place the model is evaluated at, in the plume frame and
// canonical units (m): a point at depth Top (= Bottom) or a well screen
// from Top to Bottom (depth-averaged).
type Point struct {
	ID     string
	X, Y   float64 // plume frame: along flow from the source face, transverse
	Top    float64 // depth of the point or of the screen's top
	Bottom float64 // depth of the screen's bottom (= Top for a point)
	Screen bool    // a well screen rather than a point
	Status Status  // set by the model; "" counts as modelled

	aq      *aquiferParams // the point's own dispersion (BasisReceptorDistance); set by the model
	site    [2]float64     // canonical site coordinates, when known (hasSite)
	hasSite bool
}

// mid is the reported depth: the point depth or the screen's mid-depth.
func (p Point) mid() float64 { return 0.5 * (p.Top + p.Bottom) }

// Mid is the depth reported for p: the point's or the screen's mid-depth, m.
func (p Point) Mid() float64 { return p.mid() }

// upgradient reports a place upgradient of a continuous source.
func (p Point) upgradient() bool { return p.Status == StatusUpgradient }

// inside reports a place within a continuous source's zone.
func (p Point) inside() bool { return p.Status == StatusInsideSource }

// With returns a copy of md that runs methods at times (request units;
// nil times: none), sharing the derived parameters and receptors; methods
// must be known (see KnownMethod).
func (md *Model) With(methods []string, times []float64) *Model {
	c := *md
	c.sc.Methods, c.sc.Times = methods, times
	c.canon.Methods = append([]string(nil), methods...)
	c.canon.Times = make([]float64, len(times))
	for i, t := range times {
		c.canon.Times[i] = t * md.uf.T
	}
	return &c
}

// ConcentrationFloor is the concentration, mg/L, below which results are
// reported as 0 (see Derived.ConcentrationFloor).
func (md *Model) ConcentrationFloor() float64 { return md.m.concentrationFloor() }
