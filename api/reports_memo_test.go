package api

import (
	"encoding/json"
	"html"
	"net/http"
	"os"
	"regexp"
	"strings"
	"testing"
	"time"

	"downgradient/internal/svgtext"
	"downgradient/plume"
)

var (
	rowRE  = regexp.MustCompile(`(?s)<tr[^>]*>(.*?)</tr>`)
	cellRE = regexp.MustCompile(`(?s)<t[hd][^>]*>(.*?)</t[hd]>`)
	tagRE  = regexp.MustCompile(`<[^>]+>`)
)

// tableRows returns the body rows of the first table whose opening tag
// contains class, each as its cells' text.
func tableRows(t *testing.T, page, class string) [][]string {
	t.Helper()
	i := strings.Index(page, `<table class="`+class+`"`)
	if i < 0 {
		t.Fatalf("no table %q", class)
	}
	tbl := page[i:]
	tbl = tbl[:strings.Index(tbl, "</table>")]
	body := tbl[strings.Index(tbl, "<tbody>"):]
	var rows [][]string
	for _, r := range rowRE.FindAllStringSubmatch(body, -1) {
		var cells []string
		for _, c := range cellRE.FindAllStringSubmatch(r[1], -1) {
			cells = append(cells, strings.Join(strings.Fields(html.UnescapeString(tagRE.ReplaceAllString(c[1], " "))), " "))
		}
		rows = append(rows, cells)
	}
	return rows
}

// report posts body to /v1/reports (with query) and returns the page.
func report(t *testing.T, ts *testServer, query string, body []byte) string {
	t.Helper()
	rec := ts.call(t, http.MethodPost, "/v1/reports"+query, body, nil)
	if rec.Code != http.StatusOK {
		t.Fatalf("report: %d %.600s", rec.Code, rec.Body.String())
	}
	return rec.Body.String()
}

// The verdict table of the demo: one row per receptor, exceedances first
// then by concentration, site coordinates as given, the requested times
// as columns, "< floor" where the engine reports 0, "not modelled" (never
// "below") for the upgradient well, the receptor's own caveat numbers.
func TestReportVerdictTable(t *testing.T) {
	ts := newTestServer(t, Config{})
	page := report(t, ts, "", demoBody(t))
	rows := tableRows(t, page, "data results")
	var ids []string
	for _, r := range rows {
		ids = append(ids, r[0])
	}
	// Peaks of the demo (exact, mg/L): MW-1 4.25, MW-2 0.93, W-4 0.129,
	// P-7 0.0213 reach 0.005; S-1 0.0015 stays below; MW-5 is upgradient.
	want := "MW-1,MW-2,W-4 supply well,P-7 parcel corner,S-1 creek bank,MW-5 upgradient"
	if strings.Join(ids, ",") != want {
		t.Fatalf("row order %v, want %s", ids, want)
	}
	// Columns: id, x, y, depth, along flow, 4 times, steady, first, verdict, caveats.
	mw1, w4, s1, mw5 := rows[0], rows[2], rows[4], rows[5]
	if len(mw1) != 13 {
		t.Fatalf("MW-1 row %v: %d cells, want 13", mw1, len(mw1))
	}
	if mw1[1] != "1287.6" || mw1[2] != "816.3" || w4[3] != "2–8" {
		t.Errorf("coordinates %v / depth %v", mw1[1:3], w4[3])
	}
	if w4[5] != floorText || w4[11] != "above level" {
		t.Errorf("W-4 at 365 d %q, verdict %q", w4[5], w4[11])
	}
	if s1[11] != "below level" || mw5[11] != "not modelled" || mw5[5] != "—" {
		t.Errorf("S-1 %v / MW-5 %v", s1[11], mw5)
	}
	if mw5[12] == "" || !strings.Contains(page, "receptor_upgradient_of_source") {
		t.Errorf("MW-5 caveat numbers %q", mw5[12])
	}
	// Without a known level nothing is "below".
	m := demoMap(t)
	set(m, "contaminant", map[string]any{"name": "benzine", "retardation": 1.37, "half_life": 720})
	for _, r := range tableRows(t, report(t, ts, "", mustJSON(t, m)), "data results") {
		if v := r[len(r)-2]; v != "no level" && v != "not modelled" {
			t.Errorf("%s without a level: verdict %q", r[0], v)
		}
	}
}

// The footer names the methods that ran and only those.
func TestReportFooterMethods(t *testing.T) {
	ts := newTestServer(t, Config{})
	footer := func(page string) string { return page[strings.Index(page, `<footer class="colophon">`):] }
	plain := footer(report(t, ts, "", demoBody(t)))
	if !strings.Contains(plain, "Domenico (1987)") || !strings.Contains(plain, "Wexler 1992") || strings.Contains(plain, "finite-volume") {
		t.Errorf("demo footer: %s", plain)
	}
	m := demoMap(t)
	m["methods"] = []any{"exact"}
	if f := footer(report(t, ts, "", mustJSON(t, m))); strings.Contains(f, "Domenico") || strings.Contains(f, "finite-volume") {
		t.Errorf("exact-only footer: %s", f)
	}
	// One receptor and one time keep the finite-volume run short (the
	// footer is the point here, not the run).
	m["methods"] = []any{"exact", "numeric"}
	m["receptors"] = []any{map[string]any{"id": "MW-1", "x": 1287.6, "y": 816.3, "z": 1}}
	m["times"] = []any{365}
	if f := footer(report(t, ts, "", mustJSON(t, m))); !strings.Contains(f, "finite-volume cross-check") || strings.Contains(f, "Domenico") {
		t.Errorf("numeric footer: %s", f)
	}
}

// The memo header and the sources of values are printed; neither reaches
// the engine (the input hash is unchanged); a misspelt source key is refused.
func TestReportMemoAndSources(t *testing.T) {
	clock := func() time.Time { return time.Date(2024, 5, 17, 9, 30, 0, 0, time.UTC) }
	ts := newTestServer(t, Config{Clock: clock})
	m := demoMap(t)
	m["memo"] = map[string]any{"project": "P-1234 Hollin Lane", "site": "Hollin Lane depot (invented)",
		"prepared_by": "A. Reviewer", "checked_by": "B. Checker", "date": "17 May 2024"}
	m["sources_of_values"] = map[string]any{"aquifer.hydraulic_conductivity": "slug tests MW-1..MW-3, 2019 (invented)",
		"aquifer.dispersivity": "handbook range for sand (invented)", "receptors": "site survey 2020 (invented)"}
	page := report(t, ts, "", mustJSON(t, m))
	for _, want := range []string{"P-1234 Hollin Lane", "A. Reviewer", "B. Checker", "17 May 2024", "2024-05-17 09:30 UTC",
		"slug tests MW-1..MW-3, 2019 (invented)", "site survey 2020 (invented)"} {
		if !strings.Contains(page, html.EscapeString(want)) {
			t.Errorf("page lacks %q", want)
		}
	}
	var disp int
	for _, r := range tableRows(t, page, "data inputs") {
		if strings.HasSuffix(r[0], "dispersivity") && len(r) == 5 && r[4] == "handbook range for sand (invented)" {
			disp++
		}
		if r[0] == "Seepage velocity" && !strings.HasPrefix(r[3], "derived") {
			t.Errorf("seepage velocity basis %q", r[3])
		}
		if r[0] == "Koc" && !strings.HasPrefix(r[3], "reference table") {
			t.Errorf("Koc basis %q", r[3])
		}
	}
	if disp != 3 {
		t.Errorf("%d dispersivities carry the source of aquifer.dispersivity, want 3", disp)
	}
	hash := func(b []byte) string {
		var r plume.Result
		if err := json.Unmarshal(ts.call(t, http.MethodPost, "/v1/screenings", b, nil).Body.Bytes(), &r); err != nil {
			t.Fatal(err)
		}
		return r.Engine.InputSHA256
	}
	if hash(mustJSON(t, m)) != hash(demoBody(t)) {
		t.Error("memo or sources_of_values changed engine.input_sha256")
	}
	m["sources_of_values"] = map[string]any{"aquifer.conductivity": "typo"}
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, m), nil), http.StatusUnprocessableEntity)
	if !hasField(p, "sources_of_values.aquifer.conductivity") {
		t.Errorf("misspelt source key: %+v", p.Errors)
	}
	// Every key sources_of_values accepts has a row (or the receptors' or times' caption) in the report.
	spec := ts.routes["POST /v1/reports"].Spec.Components.Schemas["SourcesOfValues"].Value
	keys := map[string]bool{}
	for k := range spec.Properties {
		keys[k] = true
	}
	for _, k := range sourceKeys {
		if !keys[k] {
			t.Errorf("sourceKeys has %q, openapi.yaml does not", k)
		}
		delete(keys, k)
	}
	for k := range keys {
		t.Errorf("openapi.yaml has %q, sourceKeys does not", k)
	}
}

// POST /v1/reports with the /v1/uncertainty envelope adds the uncertainty
// section computed by the uncertainty engine: per receptor the chance of
// reaching the level with its interval, the percentiles of the peak and
// the drivers; bad envelopes are refused like /v1/uncertainty refuses them.
func TestReportUncertainty(t *testing.T) {
	ts := newTestServer(t, Config{})
	env := uncertaintyMap(t)
	page := report(t, ts, "", mustJSON(t, env))
	if !strings.Contains(page, `id="uncertainty"`) || !strings.Contains(page, "200 realizations") {
		t.Fatalf("no uncertainty section")
	}
	rows := tableRows(t, page[strings.Index(page, `id="uncertainty"`):], "data results")
	if len(rows) != 6 {
		t.Fatalf("%d uncertainty rows, want 6", len(rows))
	}
	for _, r := range rows {
		switch r[0] {
		case "MW-5 upgradient":
			if r[1] != "not modelled" {
				t.Errorf("MW-5: %v", r)
			}
		case "MW-1":
			// MW-1 lies 40 m from a 12 mg/L source: every realization exceeds 0.005 mg/L.
			if r[1] != "100 %" || !strings.Contains(r[6], "+") {
				t.Errorf("MW-1: %v", r)
			}
		}
	}
	for _, name := range []string{"Hydraulic conductivity", "Half-life", "Longitudinal dispersivity", "lognormal", "triangular", "log-uniform"} {
		if !strings.Contains(page, name) {
			t.Errorf("page lacks %q", name)
		}
	}
	if !strings.Contains(page, "Latin hypercube realizations (seed 7)") {
		t.Error("footer does not name the uncertainty run")
	}
	bad := uncertaintyMap(t)
	bad["realizations"] = 0
	problemOf(t, ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, bad), nil), http.StatusUnprocessableEntity)
	bad = uncertaintyMap(t)
	set(bad["scenario"].(map[string]any), "aquifer.effective_porosity", 1.5)
	bad["colour"] = "red"
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, bad), nil), http.StatusUnprocessableEntity)
	if !hasField(p, "colour") || !hasField(p, "scenario.aquifer.effective_porosity") {
		t.Errorf("bad envelope: %+v", p.Errors)
	}
	m := demoMap(t)
	m["colour"] = "red"
	set(m, "aquifer.effective_porosity", 0)
	p = problemOf(t, ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, m), nil), http.StatusUnprocessableEntity)
	if !hasField(p, "colour") || !hasField(p, "aquifer.effective_porosity") {
		t.Errorf("bad scenario: %+v", p.Errors)
	}
}

// The picture options of /v1/plots: time, levels, labels and scale reach
// the picture; bad values are refused naming the parameter.
func TestPlotOptions(t *testing.T) {
	ts := newTestServer(t, Config{})
	body := demoBody(t)
	svg := func(query string) string {
		rec := ts.call(t, http.MethodPost, "/v1/plots?"+query, body, nil)
		if rec.Code != http.StatusOK {
			t.Fatalf("%s: %d %.500s", query, rec.Code, rec.Body.String())
		}
		return rec.Body.String()
	}
	if s := svg("kind=map&time=3650&levels=0.01,0.1"); !strings.Contains(s, "Plume 3650 d after the release began") ||
		!strings.Contains(s, "at or above 0.01 mg/L") || strings.Contains(s, "0.005 mg/L") {
		t.Error("map time and levels not applied")
	}
	if s := svg("kind=map&labels=none"); strings.Contains(s, ">MW-1<") {
		t.Error("labels=none labels MW-1")
	}
	if s := svg("kind=map&labels=exceedances"); !strings.Contains(s, ">MW-1<") || strings.Contains(s, ">S-1 creek bank<") {
		t.Error("labels=exceedances")
	}
	if s := svg("kind=breakthrough&receptor=MW-1"); !strings.Contains(s, "log scale") || !strings.Contains(s, "first at the level") {
		t.Error("MW-1 (peak 4.25 against 0.005 mg/L) is not on a log axis with its first exceedance marked")
	}
	if s := svg("kind=breakthrough&receptor=MW-1&scale=linear"); strings.Contains(s, "log scale") {
		t.Error("scale=linear ignored")
	}
	if s := svg("kind=section&time=steady"); !strings.Contains(s, "Section along the plume axis at steady state") || !strings.Contains(s, "vertical exaggeration") {
		t.Error("section")
	}
	for _, c := range []struct {
		query string
		code  int
		field string
	}{
		{"kind=map&time=-5", 422, "time"},
		{"kind=map&time=soon", 422, "time"},
		{"kind=map&levels=0.01,-1", 422, "levels[1]"},
		{"kind=map&levels=" + strings.Repeat("0.1,", 20) + "0.1", 413, "levels"},
		{"kind=map&labels=some", 422, "labels"},
		{"kind=breakthrough&scale=cubic", 422, "scale"},
	} {
		p := problemOf(t, ts.call(t, http.MethodPost, "/v1/plots?"+c.query, body, nil), c.code)
		if !hasField(p, c.field) {
			t.Errorf("%s: %+v", c.query, p.Errors)
		}
	}
}

// Every picture of the demo and of a 500-receptor layer, through the
// service, under the automatic label policy: no two texts overlap (boxes
// from the SVG and the fonts' metrics).
func TestPlotTextsDoNotOverlap(t *testing.T) {
	ts := newTestServer(t, Config{})
	for name, body := range map[string][]byte{"demo": demoBody(t), "layer": mustJSON(t, layerMap(t, 500))} {
		for _, kind := range []string{"map", "section", "profile", "breakthrough"} {
			rec := ts.call(t, http.MethodPost, "/v1/plots?kind="+kind, body, nil)
			if rec.Code != http.StatusOK {
				t.Fatalf("%s %s: %d", name, kind, rec.Code)
			}
			bad, err := svgtext.Overlapping(rec.Body.Bytes(), 0.3)
			if err != nil {
				t.Fatal(err)
			}
			for _, b := range bad {
				t.Errorf("%s %s: %s", name, kind, b)
			}
		}
	}
}

// memoMap is the demo with the invented memo header and sources of
// values of testdata/demo/memo.json.
func memoMap(t testing.TB) map[string]any {
	t.Helper()
	b, err := os.ReadFile("../testdata/demo/memo.json")
	if err != nil {
		t.Fatal(err)
	}
	var extra map[string]any
	if err := json.Unmarshal(b, &extra); err != nil {
		t.Fatal(err)
	}
	m := demoMap(t)
	for k, v := range extra {
		m[k] = v
	}
	return m
}

// Every source kind, the numeric method and imperial units give a memo
// with all its pictures, and each verdict is one the comparison allows.
func TestReportSourceKinds(t *testing.T) {
	ts := newTestServer(t, Config{})
	for name, body := range map[string][]byte{
		"column": mustJSON(t, goldenColumn(t)), "spill": mustJSON(t, goldenSpill(t)),
		"numeric": mustJSON(t, goldenNumeric(t)), "imperial": []byte(goldenImperial),
	} {
		page := report(t, ts, "", body)
		if n := strings.Count(page, "<svg"); n < 4 {
			t.Errorf("%s: %d pictures", name, n)
		}
		for _, r := range tableRows(t, page, "data results") {
			switch v := r[len(r)-2]; v {
			case "above level", "above level (in source)", "below level", "not modelled", "no level":
			default:
				t.Errorf("%s: %s verdict %q", name, r[0], v)
			}
		}
		// A spill has no steady state: its map shows the time of a peak, with a plume on it.
		if name == "spill" && (!strings.Contains(page, "after the release began, at the water table") || strings.Count(page, "(nowhere)") == 6) {
			t.Errorf("spill: the map is not at a peak time or shows nothing")
		}
		if regexp.MustCompile(`\bNaN\b|[+-]?\bInf\b`).MatchString(page) {
			t.Errorf("%s: a non-finite number on the page", name)
		}
	}
}

// A scenario of several compounds gets a row per receptor and compound
// with a compound column, a breakthrough plot per receptor (a line per
// compound, reports_chain_test.go) and an input group per compound; one
// of several sources gets a group per source.
func TestReportCompoundsAndSources(t *testing.T) {
	ts := newTestServer(t, Config{})
	dc := readDemo(t, "dry-cleaner.json")
	dc["methods"] = []any{"exact"} // the closed forms only: quick
	page := report(t, ts, "", mustJSON(t, dc))
	rows := tableRows(t, page, "data results")
	compounds, receptors := len(dc["contaminants"].([]any)), len(dc["receptors"].([]any))
	if len(rows) != compounds*receptors || !strings.Contains(page, ">Compound</th>") {
		t.Errorf("%d rows for %d compounds x %d receptors, or no compound column", len(rows), compounds, receptors)
	}
	for _, c := range dc["contaminants"].([]any) {
		if name := c.(map[string]any)["name"].(string); !strings.Contains(page, "Compound "+html.EscapeString(name)) {
			t.Errorf("no input group for %s", name)
		}
	}
	if !strings.Contains(page, "PCE: plume") {
		t.Error("the map does not name the compound it shows")
	}
	if n := strings.Count(page, `<figure class="plot bt">`); n != receptors {
		t.Errorf("%d breakthrough plots, want one per receptor (%d)", n, receptors)
	}
	sb := readDemo(t, "sources-and-brook.json")
	page = report(t, ts, "", mustJSON(t, sb))
	for _, src := range sb["sources"].([]any) {
		if id := src.(map[string]any)["id"].(string); !strings.Contains(page, "Source "+id) {
			t.Errorf("no input group for source %s", id)
		}
	}
}

// /v1/plots names the compound of a breakthrough plot of several.
func TestPlotCompound(t *testing.T) {
	ts := newTestServer(t, Config{})
	b, err := os.ReadFile("../testdata/demo/dry-cleaner.json")
	if err != nil {
		t.Fatal(err)
	}
	var dc map[string]any
	if err := json.Unmarshal(b, &dc); err != nil {
		t.Fatal(err)
	}
	dc["methods"] = []any{"exact"}
	body := mustJSON(t, dc)
	rec := ts.call(t, http.MethodPost, "/v1/plots?kind=breakthrough&receptor=MW-3&compound=pce", body, nil)
	if rec.Code != http.StatusOK || !strings.Contains(rec.Body.String(), "PCE at MW-3") {
		t.Errorf("%d %.300s", rec.Code, rec.Body.String())
	}
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/plots?kind=breakthrough&compound=benzene", body, nil), http.StatusUnprocessableEntity)
	if !hasField(p, "compound") {
		t.Errorf("%+v", p.Errors)
	}
	p = problemOf(t, ts.call(t, http.MethodPost, "/v1/plots?kind=breakthrough&compound=benzene", demoBody(t), nil), http.StatusUnprocessableEntity)
	if !hasField(p, "compound") {
		t.Errorf("one compound: %+v", p.Errors)
	}
}
