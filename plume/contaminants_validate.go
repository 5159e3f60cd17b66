package plume

import (
	"fmt"
	"strings"
)

// validateContaminants checks several compounds: at most MaxCompounds, each
// with a unique name and its own properties, a source concentration >= 0
// (at least one positive), decay links to compounds of the scenario without
// cycles, and yields in [0, YieldBoundFactor times the molar-mass ratio]
// (1.5 without both molar masses). Not together with contaminant, an
// instantaneous release or several sources.
func validateContaminants(fe *FieldErrors, sc Scenario) {
	ks := sc.Contaminants
	if sc.Contaminant != (Contaminant{}) {
		fe.Add("contaminants", "give contaminant (one compound) or contaminants (several), not both")
	}
	if len(ks) > MaxCompounds {
		fe.Add("contaminants", fmt.Sprintf("%d compounds; at most %d allowed", len(ks), MaxCompounds))
		return
	}
	if len(sc.Sources) > 0 {
		fe.Add("contaminants", "several compounds are screened from one source: give source, not sources")
	}
	names := map[string]int{}
	anySource := false
	for i, k := range ks {
		at := fmt.Sprintf("contaminants[%d]", i)
		if strings.TrimSpace(k.Name) == "" {
			fe.Add(at+".name", "required: each compound needs a name (decays_to refers to it)")
		} else if j, dup := names[compoundKey(k.Name)]; dup {
			fe.Add(at+".name", fmt.Sprintf("names the same compound as contaminants[%d]", j))
		} else {
			names[compoundKey(k.Name)] = i
		}
		validateOneContaminant(fe, sc.Aquifer, elemPath{"contaminants", i}, k.contaminant())
		switch {
		case k.SourceConcentration == nil:
			fe.Add(at+".source_concentration", "required: the compound's concentration at the source, C (0 for a daughter formed only by decay)")
		default:
			fe.Check(at+".source_concentration", k.SourceConcentration, NonNegative)
			anySource = anySource || *k.SourceConcentration > 0
		}
	}
	if !anySource && len(ks) > 0 {
		fe.Add("contaminants", "at least one compound needs a positive source_concentration")
	}
	validateDecayLinks(fe, ks, names)
}

// MaxCompounds is the most compounds one scenario may hold.
const MaxCompounds = 20

// YieldBoundFactor bounds a decay link's yield: at most this times the
// stoichiometric yield (the ratio of molar masses, the mass of daughter a
// one-to-one transformation forms per mass of parent). The margin allows
// for lumped entries such as "xylenes"; our choice.
const YieldBoundFactor = 1.5

// compoundKey identifies a compound name: the reference table's name when
// the table knows it (so aliases match), else the normalised name.
func compoundKey(name string) string {
	if c, ok := LookupContaminant(name); ok {
		return c.Name
	}
	return normalizeCompoundName(name)
}

// validateDecayLinks checks decays_to (a compound of the scenario, not the
// compound itself, no cycle) and the yields.
func validateDecayLinks(fe *FieldErrors, ks []Constituent, names map[string]int) {
	daughter := make([]int, len(ks))
	for i, k := range ks {
		at := fmt.Sprintf("contaminants[%d]", i)
		daughter[i] = -1
		fe.Check(at+".yield", k.Yield, NonNegative)
		if k.DecaysTo == "" {
			if k.Yield != nil {
				fe.Add(at+".yield", "applies only with decays_to")
			}
			continue
		}
		j, ok := names[compoundKey(k.DecaysTo)]
		switch {
		case !ok:
			fe.Add(at+".decays_to", fmt.Sprintf("names no compound of this scenario: %q", k.DecaysTo))
			continue
		case j == i:
			fe.Add(at+".decays_to", "a compound cannot decay to itself")
			continue
		}
		daughter[i] = j
		if bound, known := yieldBound(k.Name, ks[j].Name); k.Yield == nil && !known {
			fe.Add(at+".yield", "required: the molar masses of "+k.Name+" and "+ks[j].Name+" are not both in the reference table, so give the mass yield")
		} else if k.Yield != nil && Finite(*k.Yield) && *k.Yield > bound {
			fe.Add(at+".yield", fmt.Sprintf("must be at most %.4g (%g times the molar-mass ratio, or %g without it), got %g", bound, YieldBoundFactor, YieldBoundFactor, *k.Yield))
		}
	}
	for i := range ks {
		seen := map[int]bool{}
		for j := i; j >= 0; j = daughter[j] {
			if seen[j] {
				fe.Add(fmt.Sprintf("contaminants[%d].decays_to", i), "the decay links form a cycle")
				break
			}
			seen[j] = true
		}
	}
}

// stoichiometricYield is the ratio of the daughter's molar mass to the
// parent's; ok false when the table lacks either.
func stoichiometricYield(parent, daughter string) (y float64, ok bool) {
	p, ok1 := LookupContaminant(parent)
	d, ok2 := LookupContaminant(daughter)
	if !ok1 || !ok2 || p.MolarMass.Value <= 0 || d.MolarMass.Value <= 0 {
		return 0, false
	}
	return d.MolarMass.Value / p.MolarMass.Value, true
}

// yieldBound is the largest yield allowed on a link; known is false when
// the molar masses are not both known (the bound is then YieldBoundFactor).
func yieldBound(parent, daughter string) (bound float64, known bool) {
	if y, ok := stoichiometricYield(parent, daughter); ok {
		return YieldBoundFactor * y, true
	}
	return YieldBoundFactor, false
}
