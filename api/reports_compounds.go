package api

import (
	"fmt"
	"sort"

	"github.com/paulmach/orb"

	"downgradient/plots"
	"downgradient/plume"
)

// memoView is a screening seen through one compound of several
// (plume's Result.Focus), or as it is for a scenario of one compound.
type memoView struct {
	// Name of the compound; "" for a scenario of one compound.
	Name string
	Res  *plume.Result
}

// compoundViews are the screening's compounds, in the scenario's order.
func memoViews(res *plume.Result) ([]memoView, error) {
	if len(res.Derived.Compounds) == 0 {
		return []memoView{{Res: res}}, nil
	}
	out := make([]memoView, 0, len(res.Derived.Compounds))
	for _, cd := range res.Derived.Compounds {
		f, err := res.Focus(cd.Name)
		if err != nil {
			return nil, err
		}
		out = append(out, memoView{Name: cd.Name, Res: f})
	}
	return out, nil
}

// focusOn is the view of the compound called name in a screening of the
// same scenario (the dense curves), or r itself for one compound.
func focusOn(r *plume.Result, name string) (*plume.Result, error) {
	if name == "" {
		return r, nil
	}
	return r.Focus(name)
}

// plotRow is one breakthrough plot: a receptor (index of the screening)
// and a compound (index of the views).
type plotRow struct{ receptor, compound int }

// plotRows are the plots of the memo: every modelled receptor and
// compound, in the results table's order (reaching the level first, then
// by peak concentration), at most maxReportReceptorPlots.
func plotRows(views []memoView) []plotRow {
	type keyed struct {
		plotRow
		exceeds bool
		peak    float64
	}
	var all []keyed
	for ci, v := range views {
		for ri, rr := range v.Res.Receptors {
			if rr.Status == plume.StatusUpgradient {
				continue
			}
			all = append(all, keyed{plotRow{ri, ci}, rr.ExceedsScreeningLevel != nil && *rr.ExceedsScreeningLevel, rr.Peak.Concentration})
		}
	}
	sort.SliceStable(all, func(a, b int) bool {
		if all[a].exceeds != all[b].exceeds {
			return all[a].exceeds
		}
		return all[a].peak > all[b].peak
	})
	out := make([]plotRow, 0, min(len(all), maxReportReceptorPlots))
	for _, k := range all {
		if len(out) == maxReportReceptorPlots {
			break
		}
		out = append(out, k.plotRow)
	}
	return out
}

// plotReceptors are the distinct receptors of rows, in order.
func plotReceptors(rows []plotRow) []int {
	seen := map[int]bool{}
	var out []int
	for _, r := range rows {
		if !seen[r.receptor] {
			seen[r.receptor] = true
			out = append(out, r.receptor)
		}
	}
	return out
}

// compoundTitle prefixes a picture's title with the compound it shows,
// for a scenario of several.
func compoundTitle(name, title string) string {
	if name == "" {
		return title
	}
	return fmt.Sprintf("%s: %s", name, lowerFirst(title))
}

// lowerFirst lowers an ASCII capital at the start of a title.
func lowerFirst(s string) string {
	if s != "" && s[0] >= 'A' && s[0] <= 'Z' {
		return string(s[0]+'a'-'A') + s[1:]
	}
	return s
}

// sourcesOf are the scenario's sources: sources[], or its one source.
func sourcesOf(sc plume.Scenario) []plume.Source {
	if len(sc.Sources) > 0 {
		return sc.Sources
	}
	return []plume.Source{sc.Source}
}

// sourceShapes are the sources in plan, site coordinates of the request:
// each face across its own flow direction, its zone one width upgradient
// (the convention of the receptor_inside_source caveat).
func sourceShapes(sc plume.Scenario) []plots.SourceShape {
	var out []plots.SourceShape
	for _, s := range sourcesOf(sc) {
		fr := plume.Frame{X0: valueOr(s.X, 0), Y0: valueOr(s.Y, 0), AzimuthDeg: valueOr(s.FlowAzimuthDeg, 90)}
		w := 0.0
		if s.Width != nil && s.Depth != nil && s.Mass == nil {
			w = *s.Width
		}
		site := func(px, py float64) orb.Point {
			x, y := fr.ToSite(px, py)
			return orb.Point{x, y}
		}
		shape := plots.SourceShape{Face: [2]orb.Point{site(0, -w/2), site(0, w/2)}}
		if w > 0 {
			shape.Zone = orb.Ring{site(0, -w/2), site(0, w/2), site(-w, w/2), site(-w, -w/2), site(0, -w/2)}
		}
		out = append(out, shape)
	}
	return out
}

func valueOr(p *float64, def float64) float64 {
	if p == nil {
		return def
	}
	return *p
}
