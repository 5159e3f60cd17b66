package plume

import (
	"fmt"
	"strings"
)

// compoundInfo is what the caveats of one compound need beyond its
// parameters: its derived decay convention, and its name as a label in
// messages ("" for the lone compound of a single-compound scenario).
type compoundInfo struct {
	decayAppliesTo string
	label          string // compound name for Caveat.Compound ("" for one compound)
}

// add appends a result-wide caveat about this compound.
func (ci compoundInfo) add(res *Result, code, severity, format string, args ...any) {
	res.caveat(code, severity, "", format, args...)
	res.Caveats[len(res.Caveats)-1].Compound = ci.label
}

// of is " of <name>" for one of several compounds, else "".
func (ci compoundInfo) of() string {
	if ci.label == "" {
		return ""
	}
	return " of " + ci.label
}

// decayCaveat states the compound's decay convention and rate.
func decayCaveat(res *Result, cp *compoundParams, ci compoundInfo, fm fmtr) {
	add := func(code, severity, format string, args ...any) { ci.add(res, code, severity, format, args...) }
	of := ci.of()
	switch {
	case cp.lambda == 0:
		add(CaveatDecayConvention, SeverityNote, "No decay assumed%s (half-life null): conservative for a compound that degrades.", of)
	case ci.decayAppliesTo == DecayDissolved:
		add(CaveatDecayConvention, SeverityNote,
			"The half-life%s acts on the dissolved phase only (decay_applies_to = dissolved): the decay rate ln2/half-life = %s is divided by R = %.4g, giving %s in the retarded equation.",
			of, fm.rate(cp.lambda), cp.r, fm.rate(cp.mu))
	default:
		add(CaveatDecayConvention, SeverityNote,
			"The half-life%s acts on dissolved and sorbed mass alike (decay_applies_to = total): the decay rate ln2/half-life = %s is used as is in the retarded equation.",
			of, fm.rate(cp.lambda))
	}
}

// levelCaveats are the caveats of one compound's concentrations: source
// above solubility and no screening level.
func (m *model) levelCaveats(res *Result, cp *compoundParams, ci compoundInfo, fm fmtr) {
	add := func(code, severity, format string, args ...any) { ci.add(res, code, severity, format, args...) }
	of := ci.of()
	for i := range m.sourceCount() {
		s := m.source(i)
		c0 := s.c0
		if ci.label != "" {
			c0 = cp.srcConc
		}
		if cp.solubility != nil && s.kind != SourceKindInstantaneous && c0 > *cp.solubility {
			add(CaveatAboveSolubility, SeverityWarning,
				"The source concentration%s %s%s is above the aqueous solubility %s: a separate (non-aqueous) phase is likely, and the source may last much longer than a dissolved-only model assumes.",
				of, fm.conc(c0), sourceLabel(s), fm.conc(*cp.solubility))
		}
	}
	if cp.screening == nil {
		if ci.label == "" {
			add(CaveatNoScreeningLevel, SeverityWarning,
				"No screening level was given or found in the reference table, so nothing was compared: exceeds_screening_level is null for every receptor. Give contaminant.screening_level (for example the drinking-water limit that applies).")
		} else {
			add(CaveatNoScreeningLevel, SeverityWarning,
				"No screening level was given or found in the reference table for %s, so nothing was compared for it: its exceeds_screening_level is null at every receptor, and so is each receptor's overall verdict unless another compound exceeds. Give %s.screening_level.",
				ci.label, cp.cpath)
		}
	}
}

// referenceCaveats name the values taken from the reference table and
// the names it did not recognise.
func referenceCaveats(res *Result, d Derived, cp *compoundParams, label string) {
	if msg := nameMessage(d.ReferenceCompound, cp.name, cp.cpath); msg != "" {
		res.caveat(CaveatNameNotRecognized, SeverityWarning, "", "%s", msg)
		res.Caveats[len(res.Caveats)-1].Compound = label
	}
	if len(d.FromReferenceTable) > 0 {
		res.caveat(CaveatReferenceValues, SeverityNote, "",
			"Values taken from the contaminant reference table (%s): %s. Site-specific values are preferable.",
			d.ReferenceCompound, strings.Join(d.FromReferenceTable, ", "))
		res.Caveats[len(res.Caveats)-1].Compound = label
	}
}

// chainCaveats are the caveats of a scenario of several compounds: each
// compound's own, then what the methods can say about the chain.
func (m *model) chainCaveats(res *Result, run methods, fm fmtr) {
	for i := range m.compounds {
		cd := res.Derived.Compounds[i]
		cp := &m.compounds[i]
		ci := compoundInfo{decayAppliesTo: cd.DecayAppliesTo, label: cd.Name}
		decayCaveat(res, cp, ci, fm)
		m.levelCaveats(res, cp, ci, fm)
		referenceCaveats(res, Derived{ReferenceCompound: cd.ReferenceCompound, FromReferenceTable: cd.FromReferenceTable}, cp, cd.Name)
	}
	if !m.hasLinks() {
		return
	}
	if run.domenico && m.chain.EqualRetardation() {
		res.caveat(CaveatChainMethods, SeverityNote, "",
			"The Domenico values of the compounds formed by decay apply the chain's decoupling (Sun, Petersen & Clement 1999) to the Domenico approximation: an approximation of an approximation, flagged as such; the exact values are the reference.")
	}
	if m.chain.EqualRetardation() || m.kind == SourceKind1D && run.exact {
		return
	}
	var none []string
	for i, cp := range m.compounds {
		if m.hasParent(i) {
			none = append(none, cp.name)
		}
	}
	msg := fmt.Sprintf("The compounds have different retardation factors, and no closed form gives a compound formed by decay in 3D then: the exact and Domenico values of %s are null.", strings.Join(none, ", "))
	if run.numeric {
		msg += " Their values, peaks and verdicts come from the numeric (finite-volume) solution of the coupled equations, at the requested times only: a peak between or after them is not seen, so request times that span the breakthrough."
	} else {
		msg += " Add \"numeric\" to methods for their values and verdicts; until then their verdicts are null."
	}
	res.caveat(CaveatClosedFormUnavailable, SeverityWarning, "", "%s", msg)
}

// hasLinks reports whether any compound decays to another.
func (m *model) hasLinks() bool {
	for i := range m.compounds {
		if m.hasParent(i) {
			return true
		}
	}
	return false
}
