package api

import (
	"fmt"
	"html/template"
	"math"
	"slices"
	"strings"

	"downgradient/plots"
	"downgradient/plume"
	"downgradient/plume/maps"
)

// reportView is what the page template shows.
type reportView struct {
	Style       template.CSS
	Title       string
	Memo        []memoField
	Description string
	RunAt       string
	Engine      plume.Engine
	Units       plume.Units
	// The general screening caution, in full.
	Caution string
	Summary plume.Summary
	// The screening level in words ("0.005 mg/L" or "none known").
	Level       string
	PlumeLength string
	Verdict     verdictTable
	Uncertainty *uncertaintySection
	Figures     reportFigures
	Inputs      []inputGroup
	Model       []inputRow
	Receptors   []receptorInputRow
	// HasReceptorDispersivity adds each receptor's own dispersivity.
	HasReceptorDispersivity bool
	// Free-text sources of the receptors and of the times, if given.
	ReceptorSource, TimesSource string
	Times, Methods              string
	Caveats                     []numberedCaveat
	Counts                      map[string]int
	// The methods that ran, in words, for the footer.
	MethodsRun []string
	// section is the number of the last section numbered (Next).
	section int
}

// Next numbers the page's sections in order.
func (rv *reportView) Next() int {
	rv.section++
	return rv.section
}

// memoField is one line of the memo header.
type memoField struct{ Name, Value string }

// reportFigures are the inline pictures with their notes.
type reportFigures struct {
	// Maps: the map, section and profile of each compound drawn.
	Maps []mapFigures
	// MapsNote names the compounds whose map, section and profile are not
	// drawn, and why; empty when every compound's is.
	MapsNote  string
	Breakthru []reportFigure
	PlotNote  string
}

// mapFigures are the map, section and profile of one compound.
type mapFigures struct {
	// Name of the compound, for a scenario of several; "" for one.
	Name                           string
	MapSVG, SectionSVG, ProfileSVG template.HTML
	MapNote, SectionNote           string
	// When the map and section show, in words ("at steady state").
	When string
}

type reportFigure struct {
	Caption string
	SVG     template.HTML
	// Several: the plot has a line per compound of several.
	Several bool
}

// receptorInputRow is a receptor as given, with where it lies in the
// plume frame and, when each has its own, its dispersivity.
type receptorInputRow struct {
	ID, X, Y, Depth, AlongFlow, Offset, Dispersivity string
}

// numberedCaveat is a caveat with its number in the list; Run names the
// run it came from when not the screening.
type numberedCaveat struct {
	plume.Caveat
	No  int
	Run string
}

// buildReport assembles the page's content.
func buildReport(sb scenarioBody, res *plume.Result, views []memoView, plan memoMapPlan, fi *figureInputs, o figureOptions) (*reportView, error) {
	sc := sb.Scenario
	u := res.Units
	rv := &reportView{Style: template.CSS(reportStyle), Engine: res.Engine, Units: u, Caution: plume.ScreeningCaution,
		Summary: res.Summary, Counts: map[string]int{}, Level: "none known"}
	rv.Title = "Groundwater screening memo"
	if n := sc.Contaminant.Name; n != "" {
		rv.Title += ": " + n
	}
	if l := res.Derived.ScreeningLevel; l != nil {
		rv.Level = fmtReportNumber(*l) + " " + u.Concentration
	}
	if len(views) > 1 {
		rv.Title += ": " + joinAnd(compoundNames(views))
		rv.Level = compoundLevels(views, u.Concentration)
	}
	if sb.Description != nil {
		rv.Description = *sb.Description
	}
	rv.Memo = memoFields(sb.Memo)
	caveatNo := rv.addCaveats(res, fi)
	rv.Verdict = buildVerdict(sc, views, caveatNo)
	rv.Inputs = inputTable(sc, res.Derived, u, sb.SourcesOfValues)
	rv.Model = modelRows(res.Derived, u)
	rv.Receptors = receptorInputs(sc, res)
	for _, rr := range res.Receptors {
		rv.HasReceptorDispersivity = rv.HasReceptorDispersivity || rr.Dispersivity != nil
	}
	rv.ReceptorSource = sb.SourcesOfValues["receptors"]
	rv.TimesSource = sb.SourcesOfValues["times"]
	ts := make([]string, len(sc.Times))
	for i, t := range sc.Times {
		ts[i] = fmtReportNumber(t)
	}
	rv.Times = orDash(strings.Join(ts, ", "))
	ran := methodsRanAll(views)
	rv.Methods = strings.Join(ran, ", ")
	rv.MethodsRun = methodsInWords(ran, res, fi)
	if fi.unc != nil {
		rv.Uncertainty = buildUncertainty(fi.unc, res, inputNames(rv.Inputs))
	}
	if err := rv.addFigures(views, plan, fi, sc, o); err != nil {
		return nil, err
	}
	return rv, nil
}

// compoundNames are the names of the compounds of views.
func compoundNames(views []memoView) []string {
	out := make([]string, len(views))
	for k, v := range views {
		out[k] = v.Name
	}
	return out
}

// compoundLevels are the screening levels of several compounds in words
// ("PCE 5 ug/L, vinyl chloride 0.3 ug/L"; "none known" for a compound
// without).
func compoundLevels(views []memoView, unit string) string {
	out := make([]string, len(views))
	for k, v := range views {
		out[k] = v.Name + " none known"
		if l := v.Res.Derived.ScreeningLevel; l != nil {
			out[k] = v.Name + " " + fmtReportNumber(*l) + " " + unit
		}
	}
	return strings.Join(out, ", ")
}

// methodsRanAll are the methods that produced values for any compound of
// views, in canonical order (methodsRan of one compound).
func methodsRanAll(views []memoView) []string {
	seen := map[string]bool{}
	for _, v := range views {
		for _, m := range methodsRan(v.Res) {
			seen[m] = true
		}
	}
	var out []string
	for _, m := range plume.AllMethods {
		if seen[m] {
			out = append(out, m)
		}
	}
	return out
}

// memoFields are the memo header's lines that were given.
func memoFields(m *memoHeader) []memoField {
	if m == nil {
		return nil
	}
	var out []memoField
	for _, f := range []memoField{{"Project", m.Project}, {"Site", m.Site}, {"Prepared by", m.PreparedBy},
		{"Checked by", m.CheckedBy}, {"Date", m.Date}} {
		if f.Value != "" {
			out = append(out, f)
		}
	}
	return out
}

// addCaveats numbers the screening's caveats, then those of the
// uncertainty run that the screening has not already given (same code and
// receptor), and returns the numbers of each receptor's own caveats by
// caveatKey (receptor and compound; "" for those of every compound).
func (rv *reportView) addCaveats(res *plume.Result, fi *figureInputs) map[string][]int {
	byReceptor := map[string][]int{}
	add := func(cv plume.Caveat, run string) {
		n := len(rv.Caveats) + 1
		rv.Caveats = append(rv.Caveats, numberedCaveat{Caveat: cv, No: n, Run: run})
		rv.Counts[cv.Severity]++
		if cv.ReceptorID != "" {
			k := caveatKey(cv.ReceptorID, cv.Compound)
			byReceptor[k] = append(byReceptor[k], n)
		}
	}
	seen := map[[2]string]bool{}
	for _, cv := range res.Caveats {
		add(cv, "")
		seen[[2]string{cv.Code, cv.ReceptorID}] = true
	}
	if fi.unc != nil {
		// The run repeats the screening's caveats at the medians: only its own are new.
		for _, cv := range fi.unc.Caveats {
			if !seen[[2]string{cv.Code, cv.ReceptorID}] {
				add(cv, "uncertainty run")
			}
		}
	}
	return byReceptor
}

// caveatKey keys a receptor's caveats about one compound ("": all).
func caveatKey(receptor, compound string) string { return receptor + "\x00" + compound }

// receptorInputs lists the receptors as given.
func receptorInputs(sc plume.Scenario, res *plume.Result) []receptorInputRow {
	xs, ys := make([]float64, len(sc.Receptors)), make([]float64, len(sc.Receptors))
	for i, r := range sc.Receptors {
		xs[i], ys[i] = *r.X, *r.Y
	}
	dx, dy := coordDecimals(xs), coordDecimals(ys)
	out := make([]receptorInputRow, 0, len(sc.Receptors))
	for i, rr := range res.Receptors {
		row := receptorInputRow{ID: rr.ID, X: fmtCoord(xs[i], dx), Y: fmtCoord(ys[i], dy), Depth: depthText(rr),
			AlongFlow: fmtCoord(rr.PlumeX, 1), Offset: fmtCoord(rr.PlumeY, 1)}
		if d := rr.Dispersivity; d != nil {
			row.Dispersivity = fmtReportNumber(d.Longitudinal)
		}
		out = append(out, row)
	}
	return out
}

// methodsInWords says which methods ran, with their sources, for the
// footer: only those that produced values, and the uncertainty run and the
// pictures' grids when there were any.
func methodsInWords(ran []string, res *plume.Result, fi *figureInputs) []string {
	kind := res.Derived.SourceKind
	var out []string
	for _, m := range ran {
		switch {
		case m == plume.MethodExact && kind == plume.SourceKind3D:
			out = append(out, "the exact solution: the time integral of the point-source solution over the rectangular source (Ogata & Banks 1961; Wexler 1992)")
		case m == plume.MethodExact && kind == plume.SourceKind1D:
			out = append(out, "the exact solution of the one-dimensional column (Ogata & Banks 1961; van Genuchten & Alves 1982)")
		case m == plume.MethodExact:
			out = append(out, "the exact solution of an instantaneous release: a Gaussian puff below a no-flux water table")
		case m == plume.MethodDomenico:
			out = append(out, "the Domenico (1987) approximation")
		case m == plume.MethodNumeric:
			out = append(out, "a finite-volume cross-check of the same mass balance")
		}
	}
	if fi.unc != nil {
		out = append(out, fmt.Sprintf("an uncertainty run of %d Latin hypercube realizations (seed %d) with the %s method(s)",
			fi.unc.Realizations, fi.unc.Seed, strings.Join(fi.unc.Methods, " and ")))
	}
	if len(fi.maps) > 0 && fi.maps[0].planMap != nil {
		out = append(out, fmt.Sprintf("the map, section and profile with the %s solution on grids", fi.maps[0].planMap.Method))
	}
	return out
}

// addFigures renders the map, the section and the profile of each
// compound plan.targets names (with a note on the others) and the
// breakthrough plots (plotRows).
func (rv *reportView) addFigures(views []memoView, plan memoMapPlan, fi *figureInputs, sc plume.Scenario, o figureOptions) error {
	var lengths []string
	for k, t := range plan.targets {
		mf, err := mapFiguresOf(views[t.view], t, fi.maps[k], sc, o)
		if err != nil {
			return err
		}
		rv.Figures.Maps = append(rv.Figures.Maps, mf)
		u := views[t.view].Res.Units
		if l := plumeLengthText(fi.maps[k].planMap, u.Length, u.Concentration, t.name); l != "" {
			lengths = append(lengths, l)
		}
	}
	rv.PlumeLength = strings.Join(lengths, " ")
	rv.Figures.MapsNote = mapsNote(views, plan)
	return rv.addBreakthroughs(views, fi, o)
}

// mapFiguresOf renders the map, section and profile of the compound of v.
func mapFiguresOf(v memoView, t mapTarget, cm compoundMaps, sc plume.Scenario, o figureOptions) (mapFigures, error) {
	L := v.Res.Units.Length
	mf := mapFigures{Name: v.Name}
	var err error
	if mf.MapSVG, err = renderInline(plots.MapFigure(mapData(cm.planMap, v, sc, o))); err != nil {
		return mf, err
	}
	mp := cm.planMap
	mf.When = whenText(mp.Time, v.Res.Units.Time)
	switch {
	case t.atPeak && v.Name == "":
		mf.When += " (the time of the peak at the first receptor of the results table; the steady state of this source shows little)"
	case t.atPeak:
		mf.When += fmt.Sprintf(" (the time of the peak of %s at its first receptor of the results table; the steady state of this source shows little)", v.Name)
	}
	mf.MapNote = fmt.Sprintf("Grid of %d × %d nodes, %s %s apart; %s solution.", mp.Grid.NX, mp.Grid.NY,
		fmtReportNumber(mp.Grid.DX), L, mp.Method)
	if mf.SectionSVG, err = renderInline(plots.SectionFigure(sectionData(cm.section, v, sc, o))); err != nil {
		return mf, err
	}
	mf.SectionNote = fmt.Sprintf("Receptors within %s %s of the plume axis are projected onto the section.",
		fmtReportNumber(roundSig(sectionCorridor(cm.section), 3)), L)
	if mf.ProfileSVG, err = renderInline(plots.ProfileFigure(profileData(cm.profile, v, o))); err != nil {
		return mf, err
	}
	return mf, nil
}

// mapsNote says which compounds have no map, section and profile and
// why: no closed form gives them, or the memo's budget of
// maxMemoCompoundMaps left them out; "" when every compound has its own.
func mapsNote(views []memoView, plan memoMapPlan) string {
	names := func(ks []int) (string, bool) {
		ns := make([]string, len(ks))
		for i, k := range ks {
			ns[i] = views[k].Name
		}
		return joinAnd(ns), len(ks) > 1
	}
	var out []string
	if len(plan.noClosedForm) > 0 {
		n, many := names(plan.noClosedForm)
		it, is, its, obj := "it", "is", "its", "it"
		if many {
			it, is, its, obj = "they", "are", "their", "them"
		}
		msg := fmt.Sprintf("No map, section or profile of %s: %s %s formed by decay and the compounds' retardation factors differ, so no closed form gives %s in three dimensions, and the pictures evaluate the closed forms on grids.", n, it, is, obj)
		if methodsInclude(views[plan.noClosedForm[0]].Res, plume.MethodNumeric) {
			msg += fmt.Sprintf(" The results table and the breakthrough plots give %s values from the finite-volume solution of the chain at the requested times.", its)
		} else {
			msg += fmt.Sprintf(" Add \"numeric\" to the methods for %s values and verdicts (the finite-volume solution of the chain); without it the memo has none.", its)
		}
		out = append(out, msg)
	}
	if len(plan.leftOut) > 0 {
		n, _ := names(plan.leftOut)
		out = append(out, fmt.Sprintf("To stay short the memo draws the map, section and profile of at most %d compounds, those reaching their level at the most receptors first: those of %s are left out (POST /v1/plots?kind=map&compound=%s draws one).",
			maxMemoCompoundMaps, n, views[plan.leftOut[0]].Name))
	}
	return strings.Join(out, " ")
}

// methodsInclude reports whether method ran for res, with values or not.
func methodsInclude(res *plume.Result, method string) bool {
	return method == plume.MethodNumeric && res.Numeric != nil || slices.Contains(methodsRan(res), method)
}

// joinAnd joins names as prose: "a", "a and b", "a, b and c".
func joinAnd(names []string) string {
	if len(names) < 2 {
		return strings.Join(names, "")
	}
	return strings.Join(names[:len(names)-1], ", ") + " and " + names[len(names)-1]
}

// addBreakthroughs renders a breakthrough plot per row of plotRows.
func (rv *reportView) addBreakthroughs(views []memoView, fi *figureInputs, o figureOptions) error {
	rows := plotRows(views)
	if n := len(views[0].Res.Receptors); len(rows) < n {
		rv.Figures.PlotNote = fmt.Sprintf("Breakthrough plots are shown for %d of the %d receptors: in the order of the results table, modelled receptors only.", len(rows), n)
	}
	for _, row := range rows {
		f, err := fi.breakthrough(views, row, o)
		svg, err := renderCompact(f, err)
		if err != nil {
			return err
		}
		caption := views[0].Res.Receptors[row.receptor].ID
		if row.compound != allCompounds && views[row.compound].Name != "" {
			caption = views[row.compound].Name + " at " + caption
		}
		rv.Figures.Breakthru = append(rv.Figures.Breakthru, reportFigure{Caption: caption, SVG: svg, Several: row.compound == allCompounds})
	}
	return nil
}

// plumeLengthText says how far the steady-state plume reaches the level
// (of the compound called name, for a scenario of several).
func plumeLengthText(mp *maps.Map, L, C, name string) string {
	pl := mp.SteadyPlumeLength
	switch {
	case pl == nil:
		return ""
	case pl.Length != nil && name != "":
		return fmt.Sprintf("At steady state the %s plume reaches its screening level (%s %s) %s %s downgradient of the source face along its centreline at the water table.",
			name, fmtReportNumber(pl.Level), C, fmtReportNumber(*pl.Length), L)
	case pl.Length != nil:
		return fmt.Sprintf("At steady state the plume reaches the screening level (%s %s) %s %s downgradient of the source face along its centreline at the water table.",
			fmtReportNumber(pl.Level), C, fmtReportNumber(*pl.Length), L)
	case name != "":
		return fmt.Sprintf("At steady state the centreline concentration of %s does not fall to its screening level within 1,000 km (or the source is not constant).", name)
	}
	return "At steady state the centreline concentration does not fall to the screening level within 1,000 km (or the source is not constant)."
}

// roundSig rounds v to n significant digits.
func roundSig(v float64, n int) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	p := math.Pow(10, float64(n)-math.Ceil(math.Log10(math.Abs(v))))
	return math.Round(v*p) / p
}

func orDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}
