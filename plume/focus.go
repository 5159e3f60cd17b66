package plume

import (
	"fmt"
	"strings"
)

// Focus returns the model seen through one compound of a scenario of
// several (contaminants[]), named as the reference table matches names:
// Value, Peak, ScreeningLevel and Transport then refer to that compound.
// For a scenario of one compound, name must be "" or that compound's.
//
// Capability packages that work from the closed forms (uncertainty,
// calibration) analyse one compound at a time through Focus; a compound
// that no closed form gives (formed by decay, 3D, distinct retardation
// factors) is refused with a KindInvalid error on the field "compound".
func (md *Model) Focus(name string) (*Model, error) {
	m := md.m
	if len(m.compounds) == 0 {
		if name == "" || compoundKey(name) == compoundKey(m.name) {
			return md, nil
		}
		return nil, Invalid("compound", fmt.Sprintf("the scenario has one compound (%s): leave compound out", m.name))
	}
	i, err := findCompound(m.compounds, name)
	if err != nil {
		return nil, err
	}
	if !m.closedFormAvailable(i, true) {
		return nil, Invalid("compound", fmt.Sprintf(
			"%s is formed by decay and the compounds have different retardation factors: no closed form gives it in 3D, and this analysis uses the closed forms (screen it with methods [\"numeric\"], or give the compounds one retardation factor)", m.compounds[i].name))
	}
	mm := *m
	mm.focus = i
	mm.compoundParams = m.compounds[i]
	c := *md
	c.m = &mm
	return &c, nil
}

// Compounds returns the names of a scenario's compounds, in order (one
// name for a scenario of one compound).
func (md *Model) Compounds() []string {
	if len(md.m.compounds) == 0 {
		return []string{md.m.name}
	}
	names := make([]string, len(md.m.compounds))
	for i, cp := range md.m.compounds {
		names[i] = cp.name
	}
	return names
}

// findCompound finds the compound called name.
func findCompound(cs []compoundParams, name string) (int, error) {
	names := make([]string, len(cs))
	for i, cp := range cs {
		names[i] = fmt.Sprintf("%q", cp.name)
	}
	if name == "" {
		return 0, Invalid("compound", "required: the scenario has several compounds; name the one to analyse: one of "+strings.Join(names, ", "))
	}
	for i, cp := range cs {
		if compoundKey(cp.name) == compoundKey(name) {
			return i, nil
		}
	}
	return 0, Invalid("compound", fmt.Sprintf("names no compound of the scenario: %q (one of %s)", name, strings.Join(names, ", ")))
}

// Focus returns r seen through one of its compounds (for a result of
// several): each receptor's series, steady state, peak, first exceedance,
// screening level and verdict are the compound's, Derived.ScreeningLevel is
// its level, and the caveats are those about all compounds or this one.
// For a result of one compound name must be "" (r is returned). r itself
// is not changed; the copy shares r's other fields.
func (r *Result) Focus(name string) (*Result, error) {
	if len(r.Derived.Compounds) == 0 {
		if name == "" || r.Derived.ReferenceCompound != "" && compoundKey(name) == compoundKey(r.Derived.ReferenceCompound) {
			return r, nil
		}
		return nil, Invalid("compound", "the scenario has one compound: leave compound out")
	}
	cs := make([]compoundParams, len(r.Derived.Compounds))
	for i, cd := range r.Derived.Compounds {
		cs[i].name = cd.Name
	}
	i, err := findCompound(cs, name)
	if err != nil {
		return nil, err
	}
	c := *r
	cd := r.Derived.Compounds[i]
	c.Derived.ScreeningLevel = cd.ScreeningLevel
	c.Receptors = make([]ReceptorResult, len(r.Receptors))
	for k, rr := range r.Receptors {
		cr := rr.Compounds[i]
		rr.Compounds = nil
		rr.Series, rr.SteadyState, rr.FirstExceedanceTime = cr.Series, cr.SteadyState, cr.FirstExceedanceTime
		rr.ExceedsScreeningLevel = cr.ExceedsScreeningLevel
		rr.Peak = Peak{}
		if cr.Peak != nil {
			rr.Peak = *cr.Peak
		}
		c.Receptors[k] = rr
	}
	c.Caveats = nil
	for _, cv := range r.Caveats {
		if cv.Compound == "" || cv.Compound == cd.Name {
			c.Caveats = append(c.Caveats, cv)
		}
	}
	return &c, nil
}
