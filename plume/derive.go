package plume

import (
	"downgradient/analytic"
	"fmt"
	"math"
)

// Source kinds (Derived.SourceKind).
const (
	SourceKind3D            = "3d"
	SourceKind1D            = "1d"
	SourceKindInstantaneous = "instantaneous"
)

// Value origins (Derived.SeepageVelocitySource, Derived.RetardationSource).
const (
	OriginGiven    = "given"
	OriginDarcy    = "darcy"
	OriginSorption = "sorption"
)

// Plausible range of seepage velocity, m/d (common practice: from very slow
// silty aquifers to fast gravels; outside it a unit slip is more likely than
// a real aquifer). Outside it Screen adds a caution.
const (
	PlausibleVelocityMin = 1e-4 // m/d
	PlausibleVelocityMax = 10   // m/d
)

// MinTravelDistance is the smallest travel distance, m, used to estimate
// dispersivity: Xu & Eckstein's relation gives 0 at 1 m and is fitted to
// field scales of metres and more, so shorter distances use 2 m (our choice).
const MinTravelDistance = 2.0

// DispersivityRelation names the relations used when dispersivities are
// estimated; it is reported in Derived.DispersivityRelation.
const DispersivityRelation = "alpha_L = 0.83 (log10 L)^2.414 with L the travel distance in m " +
	"(Xu & Eckstein 1995, Ground Water 33(6):905-908); alpha_T = alpha_L/10 and " +
	"alpha_V = alpha_L/100 (common practice)"

// SeepageVelocity is Darcy's law for the average linear velocity:
// v = K i / n_e, with K in L/T, i dimensionless, n_e in (0, 1); v in L/T.
func SeepageVelocity(conductivity, gradient, porosity float64) float64 {
	return conductivity * gradient / porosity
}

// Retardation is the linear-equilibrium-sorption retardation factor
// R = 1 + rho_b Kd / n_e with Kd = Koc f_oc (Freeze & Cherry 1979,
// Groundwater, section 9.2): rho_b in kg/L, Koc in L/kg, f_oc and n_e
// dimensionless.
func Retardation(bulkDensity, koc, foc, porosity float64) float64 {
	return 1 + bulkDensity*koc*foc/porosity
}

// DecayRate is the first-order rate ln 2 / half-life, 1/T for a half-life
// in T; 0 when the half-life is +Inf.
func DecayRate(halfLife float64) float64 {
	return math.Ln2 / halfLife
}

// LongitudinalDispersivity estimates alpha_L, m, from the travel distance
// L, m, by Xu & Eckstein (1995): alpha_L = 0.83 (log10 L)^2.414. L is raised
// to MinTravelDistance first.
func LongitudinalDispersivity(travelDistance float64) float64 {
	L := math.Max(travelDistance, MinTravelDistance)
	return 0.83 * math.Pow(math.Log10(L), 2.414)
}

// model holds the derived parameters of a scenario in canonical units (m, d,
// mg/L, kg), in three parts: the aquifer (shared by every compound and
// source), the compound and the sources (the first embedded, the further
// ones in extra; their closed forms superpose). Several compounds will be a
// slice of compoundParams (each its own retardation and decay, linked by
// yields); closedFormOf already takes the three parts separately.
type model struct {
	aquiferParams
	compoundParams                  // the (first) compound
	sourceParams                    // the first source
	extra          []sourceParams   // further sources (sources[1:]), superposed
	compounds      []compoundParams // several compounds (contaminants[]); nil for one
	chain          analytic.Chain   // the compounds linked by decay (with compounds)
	focus          int              // the compound closedForm gives (index into compounds; see Model.Focus)
	derived        Derived          // canonical units; converted by the caller
	opt            *optionals       // where one result's optional values are kept (see building); nil: each on its own
}

// aquiferParams are the flow and dispersion parameters.
type aquiferParams struct {
	v         float64      // seepage velocity, m/d
	alpha     [3]float64   // dispersivities, m (model-wide; see basis)
	disp      [3]float64   // dispersion coefficients, m^2/d (model-wide; see basis)
	porosity  float64      // effective porosity (0 when not given and not needed)
	given     Dispersivity // the dispersivities given, m
	de        float64      // effective diffusion, m^2/d
	basis     string       // BasisGiven, BasisScale or BasisReceptorDistance
	travel    *float64     // scale used for a model-wide estimate, m
	travelRaw float64      // the scale before the floor, m
}

// compoundParams are one compound's sorption, decay and levels.
type compoundParams struct {
	cpath      string   // JSON path of the compound ("contaminant" or "contaminants[i]")
	name       string   // as given
	r          float64  // retardation
	lambda     float64  // ln2 / half-life, 1/d
	mu         float64  // decay rate in the retarded equation, 1/d
	screening  *float64 // mg/L
	solubility *float64 // mg/L
	srcConc    float64  // source concentration of one of several compounds, mg/L
	daughter   int      // index of the compound it decays to (analytic.NoDaughter: none)
	yield      float64  // mass yield of that link
}

// sourceParams are one source's geometry, strength and history.
type sourceParams struct {
	id         string  // sources[i].id, default "S<i+1>"; "" for a lone source
	frame      Frame   // canonical site -> this source's plume frame
	lag        float64 // start - the first source's start, d
	kind       string
	c0         float64 // source concentration, mg/L
	massKg     float64 // instantaneous mass, or a continuous source's dissolvable mass M0, kg
	width      float64 // source width, m (+Inf for 1D)
	depth      float64 // source depth, m (+Inf for 1D)
	relDepth   float64 // release depth of an instantaneous mass, m
	geomUnused bool    // width or depth given for an instantaneous release (not used)
	start      float64 // source start, d
	duration   float64 // release duration, d (+Inf = continuous)
	depletion  float64 // source depletion rate, 1/d
	rate       float64 // depletion by mass, k = Q C0/M0, 1/d (0: no source mass)
	gamma      float64 // power-law exponent of the source function (with rate)
	inlet      string  // 1D inlet
}

// continuous reports whether the source strength is constant forever.
func (s *sourceParams) continuous() bool {
	return s.kind != SourceKindInstantaneous && math.IsInf(s.duration, 1) && s.depletion == 0 && s.rate == 0
}

// derive computes the transport parameters of a validated canonical
// scenario. Nothing in it depends on the receptors.
func derive(c Scenario) *model {
	m := &model{}
	d := &m.derived
	d.Estimated = []string{}
	d.FromReferenceTable = []string{}
	ref, haveRef := lookupReference(c.Contaminant.Name)
	if haveRef {
		d.ReferenceCompound = ref.Name
	}
	m.deriveFlow(c.Aquifer)
	m.cpath = "contaminant"
	k := c.Contaminant
	if len(c.Contaminants) > 0 {
		k, m.cpath = c.Contaminants[0].contaminant(), "contaminants[0]"
		ref, haveRef = lookupReference(k.Name)
		if haveRef {
			d.ReferenceCompound = ref.Name
		}
	}
	m.name = k.Name
	m.deriveSorption(c.Aquifer, k, ref)
	m.deriveDecay(k, ref)
	m.deriveLevels(k, ref)
	m.deriveDispersion(c.Aquifer)
	m.deriveSources(c)
	if len(c.Contaminants) > 0 {
		m.deriveCompounds(c)
	}
	m.deriveSourceReport()
	return m
}

// deriveFlow sets the porosity and the seepage velocity (given, or Darcy).
func (m *model) deriveFlow(a Aquifer) {
	if a.EffectivePorosity != nil {
		m.porosity = *a.EffectivePorosity
	}
	if a.SeepageVelocity != nil {
		m.v = *a.SeepageVelocity
		m.derived.SeepageVelocitySource = OriginGiven
	} else {
		m.v = SeepageVelocity(*a.HydraulicConductivity, *a.HydraulicGradient, m.porosity)
		m.derived.SeepageVelocitySource = OriginDarcy
	}
}

// deriveSorption sets the retardation factor (given, or from Koc, the
// table's when not given).
func (m *model) deriveSorption(a Aquifer, k Contaminant, ref referenceValues) {
	d := &m.derived
	if k.Retardation != nil {
		m.r = *k.Retardation
		d.RetardationSource = OriginGiven
		return
	}
	koc := k.Koc
	if koc == nil && ref.Koc != nil {
		koc = ref.Koc
		d.FromReferenceTable = append(d.FromReferenceTable, m.cpath+".koc")
	}
	d.Koc = Ptr(*koc)
	m.r = Retardation(*a.BulkDensity, *koc, *a.OrganicCarbonFraction, m.porosity)
	d.RetardationSource = OriginSorption
}

// deriveDecay sets the decay rates and the convention.
func (m *model) deriveDecay(k Contaminant, ref referenceValues) {
	d := &m.derived
	hl := k.HalfLife
	if hl == nil && k.UseTableHalfLife && ref.HalfLifeLong != nil {
		hl = ref.HalfLifeLong
		d.FromReferenceTable = append(d.FromReferenceTable, m.cpath+".half_life")
	}
	if hl != nil {
		m.lambda = DecayRate(*hl)
		d.HalfLife = Ptr(*hl)
	}
	d.DecayAppliesTo = k.DecayAppliesTo
	if d.DecayAppliesTo == "" {
		d.DecayAppliesTo = DecayTotal
	}
	m.mu = m.lambda
	if d.DecayAppliesTo == DecayDissolved {
		m.mu = m.lambda / m.r
	}
	d.DecayRate = m.lambda
	d.EffectiveDecayRate = m.mu
}

// deriveLevels sets the screening level and the solubility (given, or the table's).
func (m *model) deriveLevels(k Contaminant, ref referenceValues) {
	d := &m.derived
	m.screening = k.ScreeningLevel
	if m.screening == nil && ref.ScreeningLevel != nil {
		m.screening = ref.ScreeningLevel
		d.FromReferenceTable = append(d.FromReferenceTable, m.cpath+".screening_level")
	}
	m.solubility = k.Solubility
	if m.solubility == nil && ref.Solubility != nil {
		m.solubility = ref.Solubility
		d.FromReferenceTable = append(d.FromReferenceTable, m.cpath+".solubility")
	}
	d.ScreeningLevel = copyPtr(m.screening)
	d.Solubility = copyPtr(m.solubility)
}

// Bases of the dispersivities (Derived.DispersivityBasis).
const (
	// BasisGiven: the longitudinal dispersivity was given.
	BasisGiven = "given"
	// BasisScale: estimated at aquifer.dispersivity_scale for the whole model.
	BasisScale = "dispersivity_scale"
	// BasisReceptorDistance: estimated at each receptor's (and map node's)
	// own travel distance from the source face.
	BasisReceptorDistance = "receptor_distance"
)

// deriveDispersion sets the dispersivities and the dispersion coefficients:
// given ones win; a missing alpha_L is estimated at the dispersivity scale
// when one is given, else at each point's own travel distance (classify
// then gives each point its own); missing alpha_T and alpha_V follow alpha_L.
func (m *model) deriveDispersion(a Aquifer) {
	d := &m.derived
	if a.Dispersivity != nil {
		m.given = *a.Dispersivity
	}
	if a.EffectiveDiffusion != nil {
		m.de = *a.EffectiveDiffusion
	}
	switch {
	case m.given.Longitudinal != nil:
		m.basis = BasisGiven
	case a.DispersivityScale != nil:
		m.basis = BasisScale
		m.travel = Ptr(*a.DispersivityScale)
		m.travelRaw = *a.DispersivityScale
	default:
		m.basis = BasisReceptorDistance
	}
	if m.given.Longitudinal == nil {
		d.Estimated = append(d.Estimated, "aquifer.dispersivity.longitudinal")
	}
	if m.given.Transverse == nil {
		d.Estimated = append(d.Estimated, "aquifer.dispersivity.transverse")
	}
	if m.given.Vertical == nil {
		d.Estimated = append(d.Estimated, "aquifer.dispersivity.vertical")
	}
	d.DispersivityBasis = m.basis
	d.DispersivityEstimated = len(d.Estimated) > 0
	if d.DispersivityEstimated {
		d.DispersivityRelation = DispersivityRelation
	}
	d.SeepageVelocity = m.v
	d.Retardation = m.r
	if m.basis == BasisReceptorDistance {
		return // each point its own (see pointAquifer)
	}
	travel := 0.0
	if m.travel != nil {
		travel = *m.travel
	}
	m.alpha, m.disp = m.dispersionAt(travel)
	d.TravelDistance = copyPtr(m.travel)
	d.Dispersivity = &DispersivityValues{m.alpha[0], m.alpha[1], m.alpha[2]}
	d.Dispersion = &DispersionValues{m.disp[0], m.disp[1], m.disp[2]}
}

// dispersionAt returns the dispersivities, m, and dispersion coefficients,
// m^2/d, for a travel distance, m (used only for what was not given; raised
// to MinTravelDistance).
func (a *aquiferParams) dispersionAt(travel float64) (alpha, disp [3]float64) {
	if a.given.Longitudinal != nil {
		alpha[0] = *a.given.Longitudinal
	} else {
		alpha[0] = LongitudinalDispersivity(math.Max(travel, MinTravelDistance))
	}
	if a.given.Transverse != nil {
		alpha[1] = *a.given.Transverse
	} else {
		alpha[1] = alpha[0] / 10
	}
	if a.given.Vertical != nil {
		alpha[2] = *a.given.Vertical
	} else {
		alpha[2] = alpha[0] / 100
	}
	for i := range disp {
		disp[i] = alpha[i]*a.v + a.de
	}
	return alpha, disp
}

// deriveSources sets the first source (source, or sources[0]) and the
// further ones of a scenario with several.
func (m *model) deriveSources(c Scenario) {
	if len(c.Sources) == 0 {
		m.sourceParams = newSourceParams(c.Source, "")
	} else {
		m.sourceParams = newSourceParams(c.Sources[0], "S1")
		for i, src := range c.Sources[1:] {
			sp := newSourceParams(src, fmt.Sprintf("S%d", i+2))
			sp.lag = sp.start - m.start
			m.extra = append(m.extra, sp)
		}
	}
	for i := range m.sourceCount() {
		m.setDepletionRate(m.source(i))
	}
	m.derived.SourceKind = m.kind
	if m.kind == SourceKind1D {
		m.derived.Inlet = m.inlet
	}
}

// newSourceParams derives one canonical source; defID names it when it
// has no id of its own.
func newSourceParams(s Source, defID string) sourceParams {
	sp := sourceParams{id: s.ID, frame: frameOf(s), duration: math.Inf(1), width: math.Inf(1), depth: math.Inf(1)}
	if sp.id == "" {
		sp.id = defID
	}
	if s.Start != nil {
		sp.start = *s.Start
	}
	switch {
	case s.instantaneous():
		sp.kind = SourceKindInstantaneous
		sp.massKg = *s.Mass
		if s.ReleaseDepth != nil {
			sp.relDepth = *s.ReleaseDepth
		}
		sp.geomUnused = s.Width != nil || s.Depth != nil
	case s.Width != nil:
		sp.kind = SourceKind3D
		sp.c0 = derefOr(s.Concentration, 0) // several compounds: set by deriveCompounds
		sp.width, sp.depth = *s.Width, *s.Depth
	default:
		sp.kind = SourceKind1D
		sp.c0 = derefOr(s.Concentration, 0)
		sp.inlet = s.Inlet
		if sp.inlet == "" {
			sp.inlet = InletConcentration
		}
	}
	if s.Duration != nil {
		sp.duration = *s.Duration
	}
	if s.HalfLife != nil {
		sp.depletion = DecayRate(*s.HalfLife)
	}
	if s.depletesByMass() {
		sp.massKg = *s.Mass
		sp.gamma = derefOr(s.DepletionExponent, DefaultDepletionExponent)
	}
	return sp
}

// DefaultDepletionExponent is the power-law exponent of a source mass
// when source.depletion_exponent is not given: 1, exponential depletion.
const DefaultDepletionExponent = 1.0

// setDepletionRate sets the depletion rate k = Q C0/M0, 1/d, of a source
// with a dissolvable mass: Q = n_e v W D (m^3/d) times C0 (mg/L = g/m^3)
// is the mass discharge in g/d, over M0 in g.
func (m *model) setDepletionRate(s *sourceParams) {
	if s.kind == SourceKindInstantaneous || !(s.massKg > 0) {
		return
	}
	s.rate = m.faceFlow(s) * s.c0 / (s.massKg * 1000)
}

// Ptr returns a pointer to a copy of v.
func Ptr(v float64) *float64 { return &v }

func copyPtr(p *float64) *float64 {
	if p == nil {
		return nil
	}
	return Ptr(*p)
}
