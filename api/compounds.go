package api

import (
	"strings"
	"unicode"

	"downgradient/plume"
)

// compoundView is a result seen through one of its compounds (see
// plume.Result.Focus); for a result of one compound, the result itself
// under the scenario's contaminant name.
type compoundView struct {
	name string
	res  *plume.Result
}

// compoundViews lists the views of res: one per compound of a scenario of
// several, else the one result.
func compoundViews(sc plume.Scenario, res *plume.Result) []compoundView {
	if len(res.Derived.Compounds) == 0 {
		return []compoundView{{name: sc.Contaminant.Name, res: res}}
	}
	views := make([]compoundView, 0, len(res.Derived.Compounds))
	for _, cd := range res.Derived.Compounds {
		v, err := res.Focus(cd.Name)
		if err != nil {
			continue // cannot happen: the names come from res
		}
		views = append(views, compoundView{name: cd.Name, res: v})
	}
	return views
}

// compoundToken spells a compound name for an attribute column: lower
// case, letters and digits kept, every other run of characters one
// underscore ("cis-1,2-DCE" -> "cis_1_2_dce").
func compoundToken(name string) string {
	var b strings.Builder
	under := false
	for _, r := range strings.ToLower(name) {
		if r < 0x80 && (unicode.IsLetter(r) || unicode.IsDigit(r)) {
			b.WriteRune(r)
			under = false
			continue
		}
		if !under && b.Len() > 0 {
			b.WriteByte('_')
			under = true
		}
	}
	return strings.TrimSuffix(b.String(), "_")
}
