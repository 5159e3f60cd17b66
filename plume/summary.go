package plume

import (
	"fmt"
	"strings"
)

// summarize counts the receptors of r by outcome and says it in words;
// level is the screening level in r's unit (nil: none known).
func (r *Result) summarize(level *float64) {
	s := Summary{Receptors: len(r.Receptors)}
	for _, rr := range r.Receptors {
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
	}
	if len(r.Derived.Compounds) > 0 {
		s.Text = r.compoundSummaryText(s)
		r.Summary = s
		return
	}
	if level == nil {
		s.Text = fmt.Sprintf("No screening level is known, so nothing was compared: none of the %d receptor(s) can be called above or below a level. Give contaminant.screening_level.", s.Receptors)
		r.Summary = s
		return
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
	r.Summary = s
}

// compoundSummaryText says the outcome of a screening of several
// compounds: receptors by their verdict over all compounds, and which
// compounds exceed where.
func (r *Result) compoundSummaryText(s Summary) string {
	parts := []string{fmt.Sprintf("%d of %d receptor(s) reach the screening level of at least one compound at some time", s.Exceeding, s.Receptors),
		fmt.Sprintf("%d stay below the levels of all compounds", s.Below)}
	if n := s.NotCompared - s.NotModelled; n > 0 {
		parts = append(parts, fmt.Sprintf("%d cannot be called below: a compound there has no screening level or no value (see the caveats)", n))
	}
	if s.NotModelled > 0 {
		parts = append(parts, fmt.Sprintf("%d lie upgradient of the source, are not modelled and are not compared", s.NotModelled))
	}
	var by []string
	for i, cd := range r.Derived.Compounds {
		var ids []string
		for _, rr := range r.Receptors {
			if i < len(rr.Compounds) && rr.Compounds[i].ExceedsScreeningLevel != nil && *rr.Compounds[i].ExceedsScreeningLevel {
				ids = append(ids, rr.ID)
			}
		}
		if len(ids) > 0 {
			by = append(by, fmt.Sprintf("%s at %s", cd.Name, strings.Join(ids, ", ")))
		}
	}
	text := strings.Join(parts, "; ") + "."
	if len(by) > 0 {
		text += " Exceeding: " + strings.Join(by, "; ") + "."
	}
	return text
}
