package api

import (
	"fmt"
	"math"
	"sort"

	"github.com/paulmach/orb"

	"downgradient/plots"
	"downgradient/plume"
	"downgradient/plume/maps"
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
// and a compound (index of the views; allCompounds for a line per
// compound of several).
type plotRow struct{ receptor, compound int }

// allCompounds is the compound of a plot of every compound of several.
const allCompounds = -1

// rankedRows are every modelled receptor and compound, in the results
// table's order (reaching the level first, then by peak concentration).
func rankedRows(views []memoView) []plotRow {
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
	out := make([]plotRow, len(all))
	for i, k := range all {
		out[i] = k.plotRow
	}
	return out
}

// plotRows are the breakthrough plots of the memo, at most
// maxReportReceptorPlots: one per modelled receptor in the results
// table's order; for several compounds one per receptor with a line per
// compound, the receptors in the order of their first row.
func plotRows(views []memoView) []plotRow {
	rows := rankedRows(views)
	if len(views) > 1 {
		rows = rows[:0:0]
		for _, ri := range plotReceptors(rankedRows(views)) {
			rows = append(rows, plotRow{ri, allCompounds})
		}
	}
	return rows[:min(len(rows), maxReportReceptorPlots)]
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

// maxMemoCompoundMaps is the most compounds whose map, section and
// profile one memo draws (about a page and a half each), so that a memo
// of several compounds prints within the pages of one of a single
// compound (see TestReportPrint).
const maxMemoCompoundMaps = 2

// memoMapPlan says which compounds' map, section and profile the memo
// draws: targets, in order; leftOut, those the closed forms give but the
// page budget leaves out (the memo names them); noClosedForm, those no closed form gives (a
// compound formed by decay in 3D with distinct retardation factors),
// which cannot be mapped. Indices are of the views.
type memoMapPlan struct {
	targets      []mapTarget
	leftOut      []int
	noClosedForm []int
}

// planMemoMaps picks the compounds the memo maps: for one compound, it;
// for several, those the closed forms give, the ones reaching their
// level at the most receptors first (ties in the scenario's order), at
// most maxMemoCompoundMaps, drawn in the scenario's order. Each map shows
// the time o asks for, else the steady state or the time of the
// compound's peak (peakMapTime). md is the prepared scenario, whose Focus
// says which compounds the closed forms give (nil for a scenario of one
// compound).
func planMemoMaps(md *plume.Model, sc plume.Scenario, views []memoView, o figureOptions) memoMapPlan {
	var plan memoMapPlan
	order := make([]int, len(views))
	reached := make([]int, len(views))
	for k, v := range views {
		order[k], reached[k] = k, exceedingReceptors(v.Res)
	}
	sort.SliceStable(order, func(a, b int) bool { return reached[order[a]] > reached[order[b]] })
	for _, k := range order {
		v := views[k]
		if md != nil && v.Name != "" {
			if _, err := md.Focus(v.Name); err != nil {
				plan.noClosedForm = append(plan.noClosedForm, k)
				continue
			}
		}
		if len(plan.targets) == maxMemoCompoundMaps {
			plan.leftOut = append(plan.leftOut, k)
			continue
		}
		t := mapTarget{view: k, name: v.Name, time: o.Time, levels: targetLevels(sc, views, k, o)}
		if t.time == nil {
			t.time = peakMapTime(v.Res)
			t.atPeak = t.time != nil
		}
		plan.targets = append(plan.targets, t)
	}
	sort.SliceStable(plan.targets, func(a, b int) bool { return plan.targets[a].view < plan.targets[b].view })
	sort.Ints(plan.noClosedForm)
	sort.Ints(plan.leftOut)
	return plan
}

// exceedingReceptors counts the receptors at which a compound reaches its level.
func exceedingReceptors(res *plume.Result) int {
	n := 0
	for _, rr := range res.Receptors {
		if rr.ExceedsScreeningLevel != nil && *rr.ExceedsScreeningLevel {
			n++
		}
	}
	return n
}

// targetLevels are the outline levels of compound k's map and section:
// those o gives; else nil (the default: the compound's screening level
// and 10 and 100 times it) when a level is known; else a thousandth, a
// hundredth and a tenth of its source concentration (of the largest of
// the scenario's when it is not released at the source).
func targetLevels(sc plume.Scenario, views []memoView, k int, o figureOptions) []float64 {
	if len(o.Levels) > 0 {
		return o.Levels
	}
	res := views[k].Res
	if views[k].Name == "" || res.Derived.ScreeningLevel != nil {
		return maps.FigureLevels(sc, res.Derived.ScreeningLevel)
	}
	c0 := 0.0
	for _, cd := range res.Derived.Compounds {
		if cd.Name == views[k].Name {
			c0 = cd.SourceConcentration
		}
	}
	if !(c0 > 0) {
		for _, cd := range res.Derived.Compounds {
			c0 = math.Max(c0, cd.SourceConcentration)
		}
	}
	return []float64{c0 * 1e-3, c0 * 1e-2, c0 * 1e-1}
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
