package plume

import (
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

// model holds everything Screen needs, in canonical units (m, d, mg/L, kg).
type model struct {
	kind       string
	v          float64    // seepage velocity, m/d
	r          float64    // retardation
	lambda     float64    // ln2 / half-life, 1/d
	mu         float64    // decay rate in the retarded equation, 1/d
	alpha      [3]float64 // dispersivities, m
	disp       [3]float64 // dispersion coefficients, m^2/d
	c0         float64    // source concentration, mg/L
	massKg     float64    // instantaneous mass, kg
	porosity   float64    // effective porosity (0 when not given and not needed)
	width      float64    // source width, m (+Inf for 1D)
	depth      float64    // source depth, m (+Inf for 1D)
	relDepth   float64    // release depth of an instantaneous mass, m
	geomUnused bool       // width or depth given for an instantaneous release (not used)
	start      float64    // source start, d
	duration   float64    // release duration, d (+Inf = continuous)
	depletion  float64    // source depletion rate, 1/d
	inlet      string     // 1D inlet
	screening  *float64   // mg/L
	solubility *float64   // mg/L
	travel     *float64   // travel distance used for estimates, m
	travelRaw  float64    // travel distance before the floor, m
	derived    Derived    // canonical units; converted by the caller
}

// continuous reports whether the source strength is constant forever.
func (m *model) continuous() bool {
	return m.kind != SourceKindInstantaneous && math.IsInf(m.duration, 1) && m.depletion == 0
}

// derive computes the transport parameters of a validated canonical
// scenario; maxPlumeX is the largest plume-frame x of the receptors, m.
func derive(c Scenario, maxPlumeX float64) *model {
	m := &model{duration: math.Inf(1), width: math.Inf(1), depth: math.Inf(1)}
	d := &m.derived
	d.Estimated = []string{}
	d.FromReferenceTable = []string{}
	a, k, s := c.Aquifer, c.Contaminant, c.Source
	ref, haveRef := lookupReference(k.Name)
	if haveRef {
		d.ReferenceCompound = ref.Name
	}
	fromTable := func(path string) { d.FromReferenceTable = append(d.FromReferenceTable, path) }
	estimated := func(path string) { d.Estimated = append(d.Estimated, path) }

	if a.EffectivePorosity != nil {
		m.porosity = *a.EffectivePorosity
	}
	// Seepage velocity.
	if a.SeepageVelocity != nil {
		m.v = *a.SeepageVelocity
		d.SeepageVelocitySource = OriginGiven
	} else {
		m.v = SeepageVelocity(*a.HydraulicConductivity, *a.HydraulicGradient, m.porosity)
		d.SeepageVelocitySource = OriginDarcy
	}
	// Retardation.
	if k.Retardation != nil {
		m.r = *k.Retardation
		d.RetardationSource = OriginGiven
	} else {
		koc := k.Koc
		if koc == nil && haveRef {
			koc = ref.Koc
			fromTable("contaminant.koc")
		}
		d.Koc = ptr(*koc)
		m.r = Retardation(*a.BulkDensity, *koc, *a.OrganicCarbonFraction, m.porosity)
		d.RetardationSource = OriginSorption
	}
	// Decay.
	hl := k.HalfLife
	if hl == nil && k.UseTableHalfLife && haveRef && ref.HalfLifeLong != nil {
		hl = ref.HalfLifeLong
		fromTable("contaminant.half_life")
	}
	if hl != nil {
		m.lambda = DecayRate(*hl)
		d.HalfLife = ptr(*hl)
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

	// Screening level and solubility.
	m.screening = k.ScreeningLevel
	if m.screening == nil && haveRef && ref.ScreeningLevel != nil {
		m.screening = ref.ScreeningLevel
		fromTable("contaminant.screening_level")
	}
	m.solubility = k.Solubility
	if m.solubility == nil && haveRef && ref.Solubility != nil {
		m.solubility = ref.Solubility
		fromTable("contaminant.solubility")
	}
	d.ScreeningLevel = copyPtr(m.screening)
	d.Solubility = copyPtr(m.solubility)

	// Dispersivities: given ones win; a missing alpha_L comes from the
	// travel distance, missing alpha_T and alpha_V from alpha_L.
	var given Dispersivity
	if a.Dispersivity != nil {
		given = *a.Dispersivity
	}
	if given.Longitudinal != nil {
		m.alpha[0] = *given.Longitudinal
	} else {
		m.travelRaw = math.Max(maxPlumeX, 0)
		L := math.Max(m.travelRaw, MinTravelDistance)
		m.travel = &L
		m.alpha[0] = LongitudinalDispersivity(L)
		estimated("aquifer.dispersivity.longitudinal")
	}
	if given.Transverse != nil {
		m.alpha[1] = *given.Transverse
	} else {
		m.alpha[1] = m.alpha[0] / 10
		estimated("aquifer.dispersivity.transverse")
	}
	if given.Vertical != nil {
		m.alpha[2] = *given.Vertical
	} else {
		m.alpha[2] = m.alpha[0] / 100
		estimated("aquifer.dispersivity.vertical")
	}
	d.DispersivityEstimated = given.Longitudinal == nil || given.Transverse == nil || given.Vertical == nil
	if d.DispersivityEstimated {
		d.DispersivityRelation = DispersivityRelation
		d.TravelDistance = copyPtr(m.travel)
	}
	de := 0.0
	if a.EffectiveDiffusion != nil {
		de = *a.EffectiveDiffusion
	}
	for i := range m.disp {
		m.disp[i] = m.alpha[i]*m.v + de
	}
	d.SeepageVelocity = m.v
	d.Retardation = m.r
	d.Dispersivity = DispersivityValues{m.alpha[0], m.alpha[1], m.alpha[2]}
	d.Dispersion = DispersionValues{m.disp[0], m.disp[1], m.disp[2]}

	// Source.
	if s.Start != nil {
		m.start = *s.Start
	}
	switch {
	case s.Mass != nil:
		m.kind = SourceKindInstantaneous
		m.massKg = *s.Mass
		if s.ReleaseDepth != nil {
			m.relDepth = *s.ReleaseDepth
		}
		m.geomUnused = s.Width != nil || s.Depth != nil
	case s.Width != nil:
		m.kind = SourceKind3D
		m.c0 = *s.Concentration
		m.width, m.depth = *s.Width, *s.Depth
	default:
		m.kind = SourceKind1D
		m.c0 = *s.Concentration
		m.inlet = s.Inlet
		if m.inlet == "" {
			m.inlet = InletConcentration
		}
		d.Inlet = m.inlet
	}
	if s.Duration != nil {
		m.duration = *s.Duration
	}
	if s.HalfLife != nil {
		m.depletion = DecayRate(*s.HalfLife)
	}
	d.SourceKind = m.kind
	return m
}

func ptr(v float64) *float64 { return &v }

func copyPtr(p *float64) *float64 {
	if p == nil {
		return nil
	}
	return ptr(*p)
}
