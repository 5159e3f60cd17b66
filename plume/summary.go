package plume

import (
	"fmt"
	"strings"
)

// summarize counts the receptors of r by outcome and says it in words;
// level is the screening level in r's unit (nil: none known).
func (r *Result) summarize(level *float64) {
	t := NewTally(-1)
	t.Add(r)
	r.Summary = t.summary(r, level)
}

// Tally counts the receptors of a screening by outcome, one part at a
// time: the summary of a layer screened in chunks (see Layer) is the same
// as that of one Result holding every receptor. With several compounds it
// keeps, per compound, the ids of the receptors that exceed, up to a cap
// (the rest are counted), so that its memory does not grow with the layer.
type Tally struct {
	s         Summary
	exceeding [][]string // per compound, ids of receptors exceeding its level (at most maxIDs)
	more      []int      // per compound, exceeding receptors beyond maxIDs
	maxIDs    int        // negative: no cap
	scale     *Allowance // the smallest allowable scale factor seen (several sources)
}

// NewTally returns an empty tally that keeps at most maxIDs ids per
// compound for the summary's text (negative: all).
func NewTally(maxIDs int) *Tally { return &Tally{maxIDs: maxIDs} }

// Add counts the receptors of part (a Result, or one chunk of a layer's)
// and takes the smaller of the allowable scale factors.
func (t *Tally) Add(part *Result) {
	s := &t.s
	for _, rr := range part.Receptors {
		s.Receptors++
		switch {
		case rr.ExceedsScreeningLevel == nil:
			s.NotCompared++
		case *rr.ExceedsScreeningLevel:
			s.Exceeding++
		default:
			s.Below++
		}
		switch rr.Status {
		case StatusUpgradient:
			s.NotModelled++
		case StatusInsideSource:
			s.InsideSource++
		}
		t.addCompounds(rr)
	}
	if a := part.AllowableScaleFactor; a != nil {
		if t.scale == nil {
			t.scale = &Allowance{}
		}
		t.scale.SteadyState = minPtr(t.scale.SteadyState, a.SteadyState)
		t.scale.WithinTimes = minPtr(t.scale.WithinTimes, a.WithinTimes)
	}
}

// addCompounds notes which compounds exceed at rr.
func (t *Tally) addCompounds(rr ReceptorResult) {
	for len(t.exceeding) < len(rr.Compounds) {
		t.exceeding = append(t.exceeding, nil)
		t.more = append(t.more, 0)
	}
	for i, cr := range rr.Compounds {
		if cr.ExceedsScreeningLevel == nil || !*cr.ExceedsScreeningLevel {
			continue
		}
		if t.maxIDs >= 0 && len(t.exceeding[i]) >= t.maxIDs {
			t.more[i]++
			continue
		}
		t.exceeding[i] = append(t.exceeding[i], rr.ID)
	}
}

// Counts returns the counts so far (Text is empty).
func (t *Tally) Counts() Summary { return t.s }

// summary is the tally's summary for a result of r's units and derived
// parameters; level is the screening level in r's unit (nil: none known).
func (t *Tally) summary(r *Result, level *float64) Summary {
	s := t.s
	if len(r.Derived.Compounds) > 0 {
		s.Text = t.compoundSummaryText(r.Derived.Compounds, s)
		return s
	}
	if level == nil {
		s.Text = fmt.Sprintf("No screening level is known, so nothing was compared: none of the %d receptor(s) can be called above or below a level. Give contaminant.screening_level.", s.Receptors)
		return s
	}
	var parts []string
	parts = append(parts, fmt.Sprintf("%d of %d receptor(s) reach the screening level of %g %s at some time", s.Exceeding, s.Receptors, *level, r.Units.Concentration))
	parts = append(parts, fmt.Sprintf("%d stay below it", s.Below))
	if s.NotModelled > 0 {
		parts = append(parts, fmt.Sprintf("%d lie upgradient of the source, are not modelled and are not compared", s.NotModelled))
	}
	if s.InsideSource > 0 {
		parts = append(parts, fmt.Sprintf("%d lie inside the source zone (compared at the source concentration)", s.InsideSource))
	}
	s.Text = strings.Join(parts, "; ") + "."
	return s
}

// compoundSummaryText says the outcome of a screening of several
// compounds: receptors by their verdict over all compounds, and which
// compounds exceed where.
func (t *Tally) compoundSummaryText(compounds []CompoundDerived, s Summary) string {
	parts := []string{fmt.Sprintf("%d of %d receptor(s) reach the screening level of at least one compound at some time", s.Exceeding, s.Receptors),
		fmt.Sprintf("%d stay below the levels of all compounds", s.Below)}
	if n := s.NotCompared - s.NotModelled; n > 0 {
		parts = append(parts, fmt.Sprintf("%d cannot be called below: a compound there has no screening level or no value (see the caveats)", n))
	}
	if s.NotModelled > 0 {
		parts = append(parts, fmt.Sprintf("%d lie upgradient of the source, are not modelled and are not compared", s.NotModelled))
	}
	var by []string
	for i, cd := range compounds {
		if i >= len(t.exceeding) || len(t.exceeding[i]) == 0 {
			continue
		}
		ids := strings.Join(t.exceeding[i], ", ")
		if t.more[i] > 0 {
			ids += fmt.Sprintf(" and %d more", t.more[i])
		}
		by = append(by, fmt.Sprintf("%s at %s", cd.Name, ids))
	}
	text := strings.Join(parts, "; ") + "."
	if len(by) > 0 {
		text += " Exceeding: " + strings.Join(by, "; ") + "."
	}
	return text
}
