package api

import (
	"bytes"
	"context"
	_ "embed"
	"fmt"
	"html/template"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"downgradient/plots"
	"downgradient/plume"
)

// maxReportReceptorPlots is the most breakthrough plots one report holds.
const maxReportReceptorPlots = 12

//go:embed reports_page.html
var reportPage string

//go:embed reports_style.css
var reportStyle string

var reportTemplate = template.Must(template.New("report").Funcs(template.FuncMap{
	"num": fmtReportNumber,
	"nump": func(p *float64) string {
		if p == nil {
			return "—"
		}
		return fmtReportNumber(*p)
	},
	"lower": strings.ToLower,
}).Parse(reportPage))

// reports is POST /v1/reports: one self-contained HTML summary of a scenario.
func (s *server) reports(c echo.Context) error {
	body, _ := c.Get(ctxBody).([]byte)
	sb, p := decodeScenarioBody(body)
	if p != nil {
		return p
	}
	sc := sb.Scenario
	res, p := s.screen(c.Request().Context(), sc, nil)
	if p != nil {
		return p
	}
	page, p := compute(c.Request().Context(), s, nil, func(ctx context.Context) ([]byte, error) {
		fi, err := s.computeFigures(ctx, sc, res, nil)
		if err != nil {
			return nil, err
		}
		rv, err := buildReport(sb, res, fi)
		if err != nil {
			return nil, err
		}
		var buf bytes.Buffer
		if err := reportTemplate.Execute(&buf, rv); err != nil {
			return nil, err
		}
		return buf.Bytes(), nil
	})
	if p != nil {
		return p
	}
	return s.send(c, &reply{contentType: "text/html; charset=utf-8", body: page, header: [][2]string{{headerCSP, contentPolicy}}})
}

// reportView is what the page template shows.
type reportView struct {
	Style       template.CSS
	Title       string
	Description string
	Engine      plume.Engine
	Units       plume.Units
	Inputs      []reportGroup
	Receptors   []reportReceptorInput
	Times       string
	Methods     string
	Derived     []reportRow
	Results     []reportResult
	Screening   *float64
	MapSVG      template.HTML
	MapNote     string
	ProfileSVG  template.HTML
	Breakthru   []reportFigure
	PlotNote    string
	Caveats     []plume.Caveat
	Counts      map[string]int
	PlumeLength string
}

type reportGroup struct {
	Name string
	Rows []reportRow
}

type reportRow struct {
	Name, Value, Unit, Origin string
	Estimated                 bool
}

type reportReceptorInput struct {
	ID, X, Y, Depth string
}

type reportResult struct {
	ID, PlumeX, PlumeY, Depth                  string
	SteadyExact, SteadyDomenico, SteadyNumeric string
	Peak, PeakTime, FirstExceedance            string
	Exceeds, HasLevel, NotModelled             bool
	DomenicoDeviation                          string
}

type reportFigure struct {
	Caption string
	SVG     template.HTML
}

// fmtReportNumber prints 4 significant digits without noise (1.23e-05, 0.1288, 1450).
func fmtReportNumber(v float64) string {
	if v == 0 {
		return "0"
	}
	s := strconv.FormatFloat(v, 'g', 4, 64)
	if strings.Contains(s, "e") {
		mant, exp, _ := strings.Cut(s, "e")
		e, _ := strconv.Atoi(exp)
		return mant + " × 10" + superscript(e)
	}
	return s
}

// superscript writes an integer in Unicode superscript digits.
func superscript(n int) string {
	const digits = "⁰¹²³⁴⁵⁶⁷⁸⁹"
	sup := []rune(digits)
	var b strings.Builder
	if n < 0 {
		b.WriteRune('⁻')
		n = -n
	}
	for _, ch := range strconv.Itoa(n) {
		b.WriteRune(sup[ch-'0'])
	}
	return b.String()
}

func optNum(p *float64) string {
	if p == nil {
		return "—"
	}
	return fmtReportNumber(*p)
}

// buildReport assembles the page's content.
func buildReport(sb scenarioBody, res *plume.Result, fi *figureInputs) (*reportView, error) {
	sc := sb.Scenario
	u := res.Units
	rv := &reportView{Style: template.CSS(reportStyle), Engine: res.Engine, Units: u, Caveats: res.Caveats,
		Screening: res.Derived.ScreeningLevel, Counts: map[string]int{}}
	rv.Title = "Groundwater screening summary"
	if n := sc.Contaminant.Name; n != "" {
		rv.Title = fmt.Sprintf("Groundwater screening summary: %s", n)
	}
	if sb.Description != nil {
		rv.Description = *sb.Description
	}
	for _, cv := range res.Caveats {
		rv.Counts[cv.Severity]++
	}
	rv.Inputs = inputGroups(sc, u)
	rv.Receptors = receptorInputs(sc, res)
	ts := make([]string, len(sc.Times))
	for i, t := range sc.Times {
		ts[i] = fmtReportNumber(t)
	}
	rv.Times = orDash(strings.Join(ts, ", "))
	ms := sc.Methods
	if len(ms) == 0 {
		ms = plume.AllMethods
	}
	rv.Methods = strings.Join(ms, ", ")
	rv.Derived = derivedRows(res.Derived, u)
	rv.Results = resultRows(res)
	if err := rv.addFigures(res, fi); err != nil {
		return nil, err
	}
	return rv, nil
}

// inputGroups lists the inputs given, by group, in the request's units.
func inputGroups(sc plume.Scenario, u plume.Units) []reportGroup {
	L, T, C := u.Length, u.Time, u.Concentration
	given := func(p *float64) string { return optNum(p) }
	a, k, src := sc.Aquifer, sc.Contaminant, sc.Source
	aq := reportGroup{Name: "Aquifer", Rows: []reportRow{
		{Name: "Hydraulic conductivity", Value: given(a.HydraulicConductivity), Unit: L + "/" + T},
		{Name: "Hydraulic gradient", Value: given(a.HydraulicGradient), Unit: "–"},
		{Name: "Effective porosity", Value: given(a.EffectivePorosity), Unit: "–"},
		{Name: "Seepage velocity", Value: given(a.SeepageVelocity), Unit: L + "/" + T},
		{Name: "Bulk density", Value: given(a.BulkDensity), Unit: "kg/L"},
		{Name: "Organic carbon fraction", Value: given(a.OrganicCarbonFraction), Unit: "–"},
		{Name: "Effective diffusion", Value: given(a.EffectiveDiffusion), Unit: L + "²/" + T},
	}}
	if d := a.Dispersivity; d != nil {
		aq.Rows = append(aq.Rows,
			reportRow{Name: "Longitudinal dispersivity", Value: given(d.Longitudinal), Unit: L},
			reportRow{Name: "Transverse dispersivity", Value: given(d.Transverse), Unit: L},
			reportRow{Name: "Vertical dispersivity", Value: given(d.Vertical), Unit: L})
	}
	ct := reportGroup{Name: "Contaminant", Rows: []reportRow{
		{Name: "Name", Value: orDash(k.Name)},
		{Name: "Koc", Value: given(k.Koc), Unit: "L/kg"},
		{Name: "Half-life", Value: given(k.HalfLife), Unit: T},
		{Name: "Retardation factor", Value: given(k.Retardation), Unit: "–"},
		{Name: "Screening level", Value: given(k.ScreeningLevel), Unit: C},
		{Name: "Aqueous solubility", Value: given(k.Solubility), Unit: C},
	}}
	so := reportGroup{Name: "Source", Rows: []reportRow{
		{Name: "Face centre, site x", Value: given(src.X), Unit: L},
		{Name: "Face centre, site y", Value: given(src.Y), Unit: L},
		{Name: "Flow azimuth (clockwise from north)", Value: given(src.FlowAzimuthDeg), Unit: "degrees"},
		{Name: "Concentration", Value: given(src.Concentration), Unit: C},
		{Name: "Width", Value: given(src.Width), Unit: L},
		{Name: "Depth below the water table", Value: given(src.Depth), Unit: L},
		{Name: "Start", Value: given(src.Start), Unit: T},
		{Name: "Duration", Value: given(src.Duration), Unit: T},
		{Name: "Depletion half-life", Value: given(src.HalfLife), Unit: T},
		{Name: massLabel(src), Value: given(src.Mass), Unit: "kg"},
		{Name: "Depletion exponent", Value: given(src.DepletionExponent), Unit: "–"},
	}}
	for _, g := range []*reportGroup{&aq, &ct, &so} {
		rows := g.Rows[:0]
		for _, r := range g.Rows {
			if r.Value != "—" {
				rows = append(rows, r)
			}
		}
		g.Rows = rows
	}
	return []reportGroup{aq, ct, so}
}

// massLabel names source.mass: a released mass, or with a concentration
// the source's dissolvable mass.
func massLabel(src plume.Source) string {
	if src.Concentration != nil {
		return "Dissolvable source mass"
	}
	return "Released mass"
}

// receptorInputs lists the receptors as given.
func receptorInputs(sc plume.Scenario, res *plume.Result) []reportReceptorInput {
	var out []reportReceptorInput
	for i, r := range sc.Receptors {
		ri := reportReceptorInput{ID: res.Receptors[i].ID, X: optNum(r.X), Y: optNum(r.Y)}
		switch {
		case r.ScreenTop != nil && r.ScreenBottom != nil:
			ri.Depth = fmt.Sprintf("screen %s–%s", fmtReportNumber(*r.ScreenTop), fmtReportNumber(*r.ScreenBottom))
		case r.Z != nil:
			ri.Depth = fmtReportNumber(*r.Z)
		default:
			ri.Depth = "0"
		}
		out = append(out, ri)
	}
	return out
}

// resultRows are the verdict table's rows.
func resultRows(res *plume.Result) []reportResult {
	var out []reportResult
	for _, rr := range res.Receptors {
		r := reportResult{ID: rr.ID, PlumeX: fmtReportNumber(rr.PlumeX), PlumeY: fmtReportNumber(rr.PlumeY), Depth: fmtReportNumber(rr.Z),
			SteadyExact: optNum(rr.SteadyState.Exact), SteadyDomenico: optNum(rr.SteadyState.Domenico), SteadyNumeric: optNum(rr.SteadyState.Numeric),
			Peak: fmtReportNumber(rr.Peak.Concentration), PeakTime: "steady state", FirstExceedance: optNum(rr.FirstExceedanceTime),
			Exceeds: rr.ExceedsScreeningLevel != nil && *rr.ExceedsScreeningLevel, HasLevel: res.Derived.ScreeningLevel != nil,
			NotModelled: rr.Status == plume.StatusUpgradient, DomenicoDeviation: "—"}
		if rr.Peak.Time != nil {
			r.PeakTime = fmtReportNumber(*rr.Peak.Time)
		}
		if rr.DomenicoDeviation != nil {
			r.DomenicoDeviation = fmt.Sprintf("%.0f %%", 100**rr.DomenicoDeviation)
		}
		out = append(out, r)
	}
	return out
}

// renderInline renders a figure as inline SVG for the page.
func renderInline(f *plots.Figure, err error) (template.HTML, error) {
	if err != nil {
		return "", err
	}
	w, h := f.Size(plots.DefaultWidth)
	b, err := plots.Render(f, w, h, plots.SVG)
	if err != nil {
		return "", err
	}
	return template.HTML(plots.InlineSVG(b)), nil // our own SVG: text escaped by the SVG writer
}

// addFigures renders the map, the profile and the breakthrough plots.
func (rv *reportView) addFigures(res *plume.Result, fi *figureInputs) error {
	L, C := res.Units.Length, res.Units.Concentration
	var err error
	if rv.MapSVG, err = renderInline(plots.MapFigure(mapData(fi.planMap))); err != nil {
		return err
	}
	mp := fi.planMap
	rv.MapNote = fmt.Sprintf("Grid of %d × %d nodes, %s %s apart; %s solution.", mp.Grid.NX, mp.Grid.NY,
		fmtReportNumber(mp.Grid.DX), L, mp.Method)
	if pl := mp.SteadyPlumeLength; pl != nil {
		if pl.Length != nil {
			rv.PlumeLength = fmt.Sprintf("At steady state the plume reaches the screening level (%s %s) %s %s downgradient of the source face along its centreline at the water table.",
				fmtReportNumber(pl.Level), C, fmtReportNumber(*pl.Length), L)
		} else {
			rv.PlumeLength = "At steady state the centreline concentration does not fall to the screening level within 1,000 km (or the source is not constant)."
		}
	}
	if rv.ProfileSVG, err = renderInline(plots.ProfileFigure(profileData(fi.profile, res))); err != nil {
		return err
	}
	order := receptorOrder(res)
	if len(order) > maxReportReceptorPlots {
		rv.PlotNote = fmt.Sprintf("Breakthrough plots are shown for the %d receptors of highest peak concentration out of %d.", maxReportReceptorPlots, len(order))
		order = order[:maxReportReceptorPlots]
	}
	for _, i := range order {
		svg, err := renderInline(plots.BreakthroughFigure(breakthroughData(res, fi.dense, i)))
		if err != nil {
			return err
		}
		rv.Breakthru = append(rv.Breakthru, reportFigure{Caption: res.Receptors[i].ID, SVG: svg})
	}
	return nil
}

func orDash(s string) string {
	if s == "" {
		return "—"
	}
	return s
}

// derivedRows lists the derived parameters with how each was obtained.
func derivedRows(d plume.Derived, u plume.Units) []reportRow {
	L, T := u.Length, u.Time
	estimated := map[string]bool{}
	for _, p := range d.Estimated {
		estimated[p] = true
	}
	table := map[string]bool{}
	for _, p := range d.FromReferenceTable {
		table[p] = true
	}
	origin := func(path, computed string) (string, bool) {
		switch {
		case estimated[path]:
			return "estimated from the travel distance (Xu & Eckstein 1995; ratios common practice)", true
		case table[path]:
			return "reference table (" + d.ReferenceCompound + ")", true
		}
		return computed, false
	}
	vOrigin := map[string]string{"given": "given", "darcy": "Darcy: K i / n_e"}[d.SeepageVelocitySource]
	rOrigin := map[string]string{"given": "given", "sorption": "linear sorption: 1 + ρb Koc foc / n_e"}[d.RetardationSource]
	rows := []reportRow{
		{Name: "Seepage velocity", Value: fmtReportNumber(d.SeepageVelocity), Unit: L + "/" + T, Origin: vOrigin},
		{Name: "Retardation factor", Value: fmtReportNumber(d.Retardation), Unit: "–", Origin: rOrigin},
	}
	if d.Koc != nil {
		o, e := origin("contaminant.koc", "given")
		rows = append(rows, reportRow{Name: "Koc used", Value: fmtReportNumber(*d.Koc), Unit: "L/kg", Origin: o, Estimated: e})
	}
	hl := "no decay"
	if d.HalfLife != nil {
		hl = fmtReportNumber(*d.HalfLife)
	}
	o, e := origin("contaminant.half_life", "given")
	rows = append(rows,
		reportRow{Name: "Half-life used", Value: hl, Unit: T, Origin: o, Estimated: e},
		reportRow{Name: "Decay rate in the retarded equation", Value: fmtReportNumber(d.EffectiveDecayRate), Unit: "1/" + T,
			Origin: "ln 2 / half-life, acting on " + map[string]string{"total": "dissolved and sorbed mass", "dissolved": "the dissolved phase only (divided by R)"}[d.DecayAppliesTo]})
	for _, dv := range []struct {
		name, path string
		v, disp    float64
	}{
		{"Longitudinal dispersivity", "aquifer.dispersivity.longitudinal", d.Dispersivity.Longitudinal, d.Dispersion.Longitudinal},
		{"Transverse dispersivity", "aquifer.dispersivity.transverse", d.Dispersivity.Transverse, d.Dispersion.Transverse},
		{"Vertical dispersivity", "aquifer.dispersivity.vertical", d.Dispersivity.Vertical, d.Dispersion.Vertical},
	} {
		o, e := origin(dv.path, "given")
		rows = append(rows, reportRow{Name: dv.name, Value: fmtReportNumber(dv.v), Unit: L, Origin: o, Estimated: e})
	}
	rows = append(rows, reportRow{Name: "Longitudinal dispersion coefficient", Value: fmtReportNumber(d.Dispersion.Longitudinal), Unit: L + "²/" + T, Origin: "α_L v + D_e"})
	sl := "none"
	if d.ScreeningLevel != nil {
		sl = fmtReportNumber(*d.ScreeningLevel)
	}
	o, e = origin("contaminant.screening_level", "given")
	if d.ScreeningLevel == nil {
		o = "none given or found: no exceedance reported"
	}
	rows = append(rows, reportRow{Name: "Screening level", Value: sl, Unit: u.Concentration, Origin: o, Estimated: e})
	rows = append(rows, reportRow{Name: "Source model", Value: map[string]string{"3d": "vertical rectangle (3D)", "1d": "column (1D)", "instantaneous": "instantaneous release"}[d.SourceKind], Origin: "from the source fields given"})
	return append(rows, sourceMassRows(d, u)...)
}

// sourceMassRows lists the depletion of each source with a mass: its
// rate, when it falls below the screening level and when its mass is gone.
func sourceMassRows(d plume.Derived, u plume.Units) []reportRow {
	var rows []reportRow
	orNever := func(p *float64) string {
		if p == nil {
			return "never"
		}
		return fmtReportNumber(*p)
	}
	for _, sd := range d.Sources {
		if sd.DepletionRate == nil {
			continue
		}
		of := ""
		if sd.ID != "" {
			of = " (" + sd.ID + ")"
		}
		rows = append(rows,
			reportRow{Name: "Source depletion rate" + of, Value: fmtReportNumber(*sd.DepletionRate), Unit: "1/" + u.Time,
				Origin: "Q C0 / M0 with Q = n_e v W D (source mass; Falta, Rao & Basu 2005)"},
			reportRow{Name: "Source mass exhausted" + of, Value: orNever(sd.TimeMassExhausted), Unit: u.Time, Origin: "on the scenario's clock"})
		if d.ScreeningLevel != nil {
			rows = append(rows, reportRow{Name: "Source below the screening level" + of, Value: orNever(sd.TimeBelowScreeningLevel), Unit: u.Time, Origin: "on the scenario's clock"})
		}
	}
	return rows
}
