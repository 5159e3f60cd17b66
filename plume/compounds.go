package plume

import (
	"fmt"
	"math"

	"downgradient/analytic"
)

// Several compounds (contaminants[]): each has its own sorption, decay,
// level and source concentration, and may decay to another compound of
// the scenario with a mass yield. The governing equations (DESIGN.md 3b)
// and the production term for distinct retardation factors are derived in
// package analytic (chain.go): in the retarded form of compound i the
// production by a parent p is y_p (R_p/R_i) Mu_p C_p, Mu the decay rate of
// the dissolved concentration in the retarded equation (the parent's own
// convention carries over to its daughters' production).
//
// Methods: with equal retardation factors the chain decouples (Sun,
// Petersen & Clement 1999) and every closed form carries over (exact,
// Domenico). In the 1D column distinct factors are solved exactly in the
// Laplace domain. In 3D with distinct factors no closed form exists for a
// compound formed by decay: its exact and Domenico values are null, a
// caveat says so, and the numeric cross-check is the answer; compounds
// released only at the source (no parent) keep their closed forms.

// CompoundDerived describes one compound of several, in the request's units.
type CompoundDerived struct {
	Name              string `json:"name"`
	ReferenceCompound string `json:"reference_compound,omitempty"`
	// Source concentration, C.
	SourceConcentration float64 `json:"source_concentration"`
	// Retardation factor and how it was obtained ("given" or "sorption").
	Retardation       float64  `json:"retardation"`
	RetardationSource string   `json:"retardation_source"`
	Koc               *float64 `json:"koc"`
	HalfLife          *float64 `json:"half_life"`
	// Decay rate ln 2 / half-life and the rate in the retarded equation, 1/T.
	DecayRate          float64 `json:"decay_rate"`
	EffectiveDecayRate float64 `json:"effective_decay_rate"`
	DecayAppliesTo     string  `json:"decay_applies_to"`
	// Screening level and solubility used, C.
	ScreeningLevel *float64 `json:"screening_level"`
	Solubility     *float64 `json:"solubility"`
	// The compound it decays to, the mass yield, and where the yield came
	// from ("given" or "molar_mass_ratio"); empty without a link.
	DecaysTo    string   `json:"decays_to,omitempty"`
	Yield       *float64 `json:"yield,omitempty"`
	YieldSource string   `json:"yield_source,omitempty"`
	// JSON paths of the values taken from the reference table.
	FromReferenceTable []string `json:"from_reference_table"`
}

// CompoundResult is one compound's answer at a receptor, in the request's units.
type CompoundResult struct {
	Name   string `json:"name"`
	Status Status `json:"status"`
	// Concentrations at the requested times; a method without a value for
	// this compound (a daughter in 3D with distinct retardation) is null.
	Series      []SeriesPoint `json:"series"`
	SteadyState MethodValues  `json:"steady_state"`
	// Highest value of the compound's primary method over all time; null
	// when no closed form gives this compound (see the numeric values).
	Peak                  *Peak    `json:"peak"`
	FirstExceedanceTime   *float64 `json:"first_exceedance_time"`
	ScreeningLevel        *float64 `json:"screening_level"`
	ExceedsScreeningLevel *bool    `json:"exceeds_screening_level"`
}

// deriveCompounds derives every compound of c.Contaminants (the first is
// already the model's compoundParams) and the decay chain linking them.
func (m *model) deriveCompounds(c Scenario) {
	ks := c.Contaminants
	m.compounds = make([]compoundParams, len(ks))
	index := map[string]int{}
	m.derived.Compounds = make([]CompoundDerived, len(ks))
	for i, k := range ks {
		tmp := &model{aquiferParams: m.aquiferParams}
		tmp.derived.FromReferenceTable = []string{}
		tmp.cpath = fmt.Sprintf("contaminants[%d]", i)
		tmp.name = k.Name
		ref, haveRef := lookupReference(k.Name)
		kk := k.contaminant()
		tmp.deriveSorption(c.Aquifer, kk, ref)
		tmp.deriveDecay(kk, ref)
		tmp.deriveLevels(kk, ref)
		cp := tmp.compoundParams
		cp.srcConc = *k.SourceConcentration
		cp.daughter = analytic.NoDaughter
		m.compounds[i] = cp
		index[compoundKey(k.Name)] = i
		d := tmp.derived
		cd := CompoundDerived{Name: k.Name, SourceConcentration: cp.srcConc, Retardation: cp.r, RetardationSource: d.RetardationSource,
			Koc: d.Koc, HalfLife: d.HalfLife, DecayRate: d.DecayRate, EffectiveDecayRate: d.EffectiveDecayRate,
			DecayAppliesTo: d.DecayAppliesTo, ScreeningLevel: d.ScreeningLevel, Solubility: d.Solubility,
			FromReferenceTable: d.FromReferenceTable}
		if haveRef {
			cd.ReferenceCompound = ref.Name
		}
		m.derived.Compounds[i] = cd
		if i > 0 {
			m.derived.FromReferenceTable = append(m.derived.FromReferenceTable, d.FromReferenceTable...)
		}
	}
	for i, k := range ks {
		if k.DecaysTo == "" {
			continue
		}
		j := index[compoundKey(k.DecaysTo)]
		cp := &m.compounds[i]
		cp.daughter = j
		cd := &m.derived.Compounds[i]
		cd.DecaysTo = ks[j].Name
		if k.Yield != nil {
			cp.yield, cd.YieldSource = *k.Yield, "given"
		} else {
			cp.yield, _ = stoichiometricYield(k.Name, ks[j].Name)
			cd.YieldSource = "molar_mass_ratio"
		}
		cd.Yield = Ptr(cp.yield)
	}
	m.compoundParams = m.compounds[0]
	m.chain = make(analytic.Chain, len(m.compounds))
	for i, cp := range m.compounds {
		m.chain[i] = analytic.Compound{R: cp.r, Mu: cp.mu, Daughter: cp.daughter, Yield: cp.yield}
	}
	m.sourceParams.c0 = 0
	for _, cp := range m.compounds {
		m.sourceParams.c0 = math.Max(m.sourceParams.c0, cp.srcConc)
	}
}

// hasParent reports whether compound i is formed by the decay of another.
func (m *model) hasParent(i int) bool {
	for _, cp := range m.compounds {
		if cp.daughter == i {
			return true
		}
	}
	return false
}

// compoundValues sets out[i] to compound i's concentration, mg/L, at p and
// elapsed time tau (+Inf: steady state) by a closed form (exact, else
// Domenico); NaN where no closed form gives the compound (formed by decay,
// 3D, distinct retardation factors).
func (m *model) compoundValues(exact bool, p Point, tau float64, out []float64) {
	n := len(m.compounds)
	for i := range out[:n] {
		out[i] = 0
	}
	s := &m.sourceParams
	switch {
	case math.IsInf(tau, 1) && !s.continuous(), !(tau > 0), p.upgradient():
		return
	case p.inside():
		for i, cp := range m.compounds {
			out[i] = cp.srcConc
			if !math.IsInf(tau, 1) {
				out[i] = cp.srcConc * s.strength(tau) / math.Max(s.c0, math.SmallestNonzeroFloat64)
			}
		}
		return
	}
	aq := m.aquiferFor(p)
	pr := params(aq, &m.compounds[0])
	c0 := make([]float64, n)
	for i, cp := range m.compounds {
		c0[i] = cp.srcConc
	}
	pt := analytic.Point{X: p.X, Y: p.Y, Top: p.Top, Bottom: p.Bottom}
	hist := s.history()
	var err error
	switch {
	case s.kind == SourceKind1D && exact:
		inlet := analytic.FirstType
		if s.inlet == InletFlux {
			inlet = analytic.ThirdType
		}
		err = analytic.ChainColumnAt(p.X, tau, pr, inlet, hist, m.chain, c0, out)
	case s.kind == SourceKind1D:
		err = analytic.ChainDomenicoAt(analytic.Point{X: p.X}, tau, pr, s.plumeSource(), hist, m.chain, c0, out)
	case exact:
		err = analytic.ChainExact3DAt(pt, tau, pr, s.plumeSource(), hist, m.chain, c0, out)
	default:
		err = analytic.ChainDomenicoAt(pt, tau, pr, s.plumeSource(), hist, m.chain, c0, out)
	}
	if err != nil {
		// Distinct retardation factors without a closed form: the compounds
		// released only at the source are single-compound problems; the
		// others have no closed-form value.
		for i := range m.compounds {
			out[i] = math.NaN()
			if !m.hasParent(i) {
				one := *s
				one.c0 = c0[i]
				out[i] = closedFormOf(aq, &m.compounds[i], &one, exact, p, tau)
			}
		}
		return
	}
	for i := range out[:n] {
		if !(out[i] > 0) || !Finite(out[i]) {
			out[i] = 0
		}
	}
}
