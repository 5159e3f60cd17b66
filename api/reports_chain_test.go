package api

import (
	"encoding/json"
	"fmt"
	"net/http"
	"net/url"
	"os"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"downgradient/internal/svgtext"
	"downgradient/plots"
	"downgradient/plume"
)

// The pictures of a scenario of several compounds (issue 13): the invented
// dry cleaner of testdata/demo, whose four compounds have distinct
// retardation factors (the closed forms give PCE only, the finite volumes
// the daughters), and the same chain with one retardation factor (the
// closed forms give every compound).

// equalRDryCleaner is the invented dry cleaner with one retardation
// factor for its four compounds and the closed forms only (quick): every
// compound has a map.
func equalRDryCleaner(t testing.TB) map[string]any {
	m := dryCleanerMapB(t)
	equalRChain(m)
	return m
}

// chainStrokes counts the lines of one compound in a breakthrough plot.
type chainStrokes struct {
	// curves: data lines in the compound's colour; levels: level lines
	// across the plot in it.
	curves, levels int
	// method named by the compound's legend entry.
	method string
}

var (
	svgElemRE   = regexp.MustCompile(`(?s)<path d="([^"]*)" style="([^"]*)"|<text[^>]*>([^<]*)</text>`)
	svgPointRE  = regexp.MustCompile(`[ML](-?[0-9.e+-]+),(-?[0-9.e+-]+)`)
	curveLegend = regexp.MustCompile(`^(.+), (exact|Domenico \(1987\)|finite volume|no values|not modelled)$`)
	levelLegend = regexp.MustCompile(`^(.+) level ([0-9.e+-]+) \S+$`)
	captionRE   = regexp.MustCompile(`^(?:Plan view|Section|Centreline profile) of (.+?)(?: along the plume axis)?\. `)
)

// svgLine is a stroked path of straight segments.
type svgLine struct {
	stroke string
	width  float64
	pts    [][2]float64
}

// thumbnail: a short horizontal stroke, a legend entry's sample.
func (l svgLine) thumbnail() bool {
	return len(l.pts) == 2 && l.pts[0][1] == l.pts[1][1] && l.pts[1][0]-l.pts[0][0] <= 25
}

// across: a horizontal line of two points across the plot (a level).
func (l svgLine) across() bool {
	return len(l.pts) == 2 && l.pts[0][1] == l.pts[1][1] && l.pts[1][0]-l.pts[0][0] > 60
}

// chainLines reads a breakthrough plot of several compounds: each
// compound's colour from its legend entry (the sample drawn before the
// text), its level entry in the same colour, and the data lines of each
// colour. Problems (a level in another colour than its curve) are errors.
func chainLines(svg string) (map[string]*chainStrokes, []string) {
	var lines []svgLine
	colour := map[string]string{}
	out := map[string]*chainStrokes{}
	var bad []string
	var last *svgLine
	for _, m := range svgElemRE.FindAllStringSubmatch(svg, -1) {
		if m[1] == "" && m[2] == "" {
			txt := m[3]
			if last == nil {
				continue
			}
			if c := curveLegend.FindStringSubmatch(txt); c != nil {
				colour[last.stroke] = c[1]
				out[c[1]] = &chainStrokes{method: c[2]}
			} else if c := levelLegend.FindStringSubmatch(txt); c != nil && colour[last.stroke] != c[1] {
				bad = append(bad, fmt.Sprintf("level entry %q drawn in %s, the colour of %q", txt, last.stroke, colour[last.stroke]))
			}
			continue
		}
		if strings.ContainsAny(m[1], "AZ") {
			continue // a glyph
		}
		l := svgLine{}
		for _, kv := range strings.Split(m[2], ";") {
			k, v, _ := strings.Cut(kv, ":")
			switch k {
			case "stroke":
				l.stroke = v
			case "stroke-width":
				l.width, _ = strconv.ParseFloat(v, 64)
			}
		}
		for _, p := range svgPointRE.FindAllStringSubmatch(m[1], -1) {
			x, _ := strconv.ParseFloat(p[1], 64)
			y, _ := strconv.ParseFloat(p[2], 64)
			l.pts = append(l.pts, [2]float64{x, y})
		}
		lines = append(lines, l)
		if l.thumbnail() {
			last = &lines[len(lines)-1]
		}
	}
	for _, l := range lines {
		name, ok := colour[l.stroke]
		switch {
		case !ok || l.thumbnail():
		case l.width == 2:
			out[name].curves++
		case l.width == 1.4 && l.across():
			out[name].levels++
		}
	}
	return out, bad
}

// checkChainPlot checks a breakthrough plot of several compounds: one
// line per compound (by the method its results show), one level line per
// compound in its colour, no two texts overlapping.
func checkChainPlot(t *testing.T, what, svg string, methods map[string]string) {
	t.Helper()
	got, bad := chainLines(svg)
	for _, b := range bad {
		t.Errorf("%s: %s", what, b)
	}
	if len(got) != len(methods) {
		t.Errorf("%s: legend names %d compounds, want %d", what, len(got), len(methods))
	}
	for name, m := range methods {
		s := got[name]
		switch {
		case s == nil:
			t.Errorf("%s: no legend entry for %s", what, name)
		case s.curves != 1 || s.levels != 1 || s.method != m:
			t.Errorf("%s: %s has %d lines (%s) and %d level lines, want 1 (%s) and 1", what, name, s.curves, s.method, s.levels, m)
		}
	}
	overlaps, err := svgtext.Overlapping([]byte(svg), 0.3)
	if err != nil {
		t.Fatal(err)
	}
	for _, o := range overlaps {
		t.Errorf("%s: overlapping texts %s", what, o)
	}
}

// figures are the figures of a memo page whose opening tag has class,
// each as its inline SVG and its caption's text.
func figures(page, class string) (svgs, captions []string) {
	open := `<figure class="` + class + `">`
	for _, part := range strings.Split(page, open)[1:] {
		part = part[:strings.Index(part, "</figure>")]
		svgs = append(svgs, part[strings.Index(part, "<svg"):strings.Index(part, "</svg>")+len("</svg>")])
		c := part[strings.Index(part, "<figcaption>"):]
		captions = append(captions, strings.Join(strings.Fields(tagRE.ReplaceAllString(c, " ")), " "))
	}
	return svgs, captions
}

// chainScreening is the screening of a chain scenario, compound by compound.
type chainScreening struct {
	Derived struct {
		Compounds []plume.CompoundDerived `json:"compounds"`
	} `json:"derived"`
	Receptors []struct {
		ID        string                 `json:"id"`
		Compounds []plume.CompoundResult `json:"compounds"`
	} `json:"receptors"`
}

// primaryMethods are each compound's method in a plot's legend: the
// method of its peak (exact where a closed form gives the compound, else
// the finite volumes).
func (cs chainScreening) primaryMethods() map[string]string {
	out := map[string]string{}
	for _, cr := range cs.Receptors[0].Compounds {
		out[cr.Name] = map[string]string{plume.MethodExact: "exact", plume.MethodNumeric: "finite volume"}[cr.Peak.Method]
	}
	return out
}

// mapped are the compounds the memo should map when all have a closed
// form: those reaching their level at the most receptors, ties in the
// scenario's order, at most maxMemoCompoundMaps.
func (cs chainScreening) mapped() []string {
	names := make([]string, len(cs.Derived.Compounds))
	count := map[string]int{}
	for i, cd := range cs.Derived.Compounds {
		names[i] = cd.Name
		for _, rr := range cs.Receptors {
			if e := rr.Compounds[i].ExceedsScreeningLevel; e != nil && *e {
				count[cd.Name]++
			}
		}
	}
	sort.SliceStable(names, func(a, b int) bool { return count[names[a]] > count[names[b]] })
	return names[:maxMemoCompoundMaps]
}

// The invented dry cleaner as given (distinct retardation factors, the
// finite volumes run): a breakthrough plot per receptor with a line per
// compound (PCE exact, the daughters the finite-volume values) and a
// level line per compound, through the memo and /v1/plots; a map,
// section and profile of PCE alone and, in place of the others', the
// sentence that no closed form gives them; the memo prints on at most 8
// pages. The 3D chain's finite volumes over 40 years take seconds
// (minutes under the race detector): one request runs them.
func TestReportChainPictures(t *testing.T) {
	if testing.Short() {
		t.Skip("a 3D finite-volume run of four species")
	}
	ts := newTestServer(t, Config{RequestTimeout: 10 * time.Minute})
	b, err := os.ReadFile("../testdata/demo/dry-cleaner.json")
	if err != nil {
		t.Fatal(err)
	}
	page := report(t, ts, "", b)
	// The methods each compound's plot shows: exact for PCE, the finite
	// volumes for the daughters (TestDryCleanerVinylChlorideDecides).
	methods := map[string]string{"PCE": "exact", "TCE": "finite volume", "cis-1,2-DCE": "finite volume", "vinyl chloride": "finite volume"}
	svgs, captions := figures(page, "plot bt")
	if len(svgs) != 3 {
		t.Fatalf("%d breakthrough plots, want one per receptor (3)", len(svgs))
	}
	for i, svg := range svgs {
		checkChainPlot(t, "memo "+captions[i], svg, methods)
	}
	maps, mapCaptions := figures(page, "plot")
	if len(maps) != 3 || !strings.HasPrefix(mapCaptions[0], "Plan view of PCE.") || !strings.HasPrefix(mapCaptions[2], "Centreline profile of PCE.") {
		t.Errorf("map, section and profile: %d figures %q, want PCE's three", len(maps), mapCaptions)
	}
	flat := strings.Join(strings.Fields(page), " ")
	if !strings.Contains(flat, "No map, section or profile of TCE, cis-1,2-DCE and vinyl chloride:") ||
		!strings.Contains(flat, "give their values from the finite-volume solution of the chain at the requested times") {
		t.Error("the memo does not say why TCE, cis-1,2-DCE and vinyl chloride have no map")
	}
	for _, svg := range maps {
		if bad, err := svgtext.Overlapping([]byte(svg), 0.3); err != nil || len(bad) > 0 {
			t.Errorf("map figure: overlapping texts %v %v", bad, err)
		}
	}
	checkPrint(t, "dry-cleaner chain", page, 8, []string{"MW-3", "MW-6", "Orchard Lane well"})
	// /v1/plots draws the same lines. Over the first ten years only, so that
	// the finite volumes run a quarter as long (about 1 s; 5 s for 40 years).
	var short map[string]any
	if err := json.Unmarshal(b, &short); err != nil {
		t.Fatal(err)
	}
	short["times"] = []any{5, 10}
	rec := ts.call(t, http.MethodPost, "/v1/plots?kind=breakthrough&receptor=MW-3", mustJSON(t, short), nil)
	if rec.Code != http.StatusOK {
		t.Fatalf("plots: %d %.300s", rec.Code, rec.Body.String())
	}
	checkChainPlot(t, "plots MW-3", rec.Body.String(), methods)
	if !strings.Contains(rec.Body.String(), ">Breakthrough at MW-3<") {
		t.Error("plots: title")
	}
}

// The chain with one retardation factor (closed forms only): every
// compound has a closed form, so the memo maps two, those reaching their
// level at the most receptors, each at its own levels, and names the
// others as left out; a breakthrough plot per receptor with a line and a
// level per compound; /v1/plots draws a line per compound without
// compound, the one compound with it, and any compound's map at its own
// levels.
func TestReportChainMaps(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := equalRDryCleaner(t)
	body := mustJSON(t, m)
	var res chainScreening
	if err := json.Unmarshal(ts.call(t, http.MethodPost, "/v1/screenings", body, nil).Body.Bytes(), &res); err != nil {
		t.Fatal(err)
	}
	level := map[string]float64{}
	for _, cd := range res.Derived.Compounds {
		level[cd.Name] = *cd.ScreeningLevel
	}
	page := report(t, ts, "", body)
	svgs, captions := figures(page, "plot bt")
	if len(svgs) != len(res.Receptors) {
		t.Fatalf("%d breakthrough plots, want %d", len(svgs), len(res.Receptors))
	}
	for i, svg := range svgs {
		checkChainPlot(t, "memo "+captions[i], svg, res.primaryMethods())
	}
	maps, mapCaptions := figures(page, "plot")
	want := res.mapped()
	if len(maps) != 3*len(want) {
		t.Fatalf("%d map figures %q, want 3 for each of %v", len(maps), mapCaptions, want)
	}
	shown := map[string]bool{}
	for i, c := range mapCaptions {
		cm := captionRE.FindStringSubmatch(c)
		if cm == nil {
			t.Fatalf("caption %.80q names no compound", c)
		}
		name := cm[1]
		shown[name] = true
		if i%3 == 2 {
			continue // the profile: one line per time, the level named in its legend
		}
		// Outlines at the compound's own levels: the level and 10 and 100 times it.
		for _, l := range []float64{level[name], 10 * level[name], 100 * level[name]} {
			if !strings.Contains(maps[i], fmt.Sprintf("at or above %s ug/L", plots.FormatNumber(l))) {
				t.Errorf("%s: no outline at %g ug/L", c[:40], l)
			}
		}
	}
	var left []string
	for _, cd := range res.Derived.Compounds {
		if !shown[cd.Name] {
			left = append(left, cd.Name)
		}
	}
	for _, n := range want {
		if !shown[n] {
			t.Errorf("the memo maps %v, want %v", shown, want)
		}
	}
	flat := strings.Join(strings.Fields(page), " ")
	if !strings.Contains(flat, fmt.Sprintf("those of %s are left out", joinAnd(left))) {
		t.Errorf("the memo does not name %v as left out", left)
	}
	plot := func(query string) string {
		rec := ts.call(t, http.MethodPost, "/v1/plots?"+query, body, nil)
		if rec.Code != http.StatusOK {
			t.Fatalf("%s: %d %.300s", query, rec.Code, rec.Body.String())
		}
		return rec.Body.String()
	}
	checkChainPlot(t, "plots", plot("kind=breakthrough"), res.primaryMethods())
	// compound= draws that compound alone, every method, as for one compound.
	one := plot("kind=breakthrough&receptor=MW-6&compound=TCE")
	if !strings.Contains(one, ">TCE at MW-6<") || !strings.Contains(one, ">Domenico (1987) approximation<") || strings.Contains(one, "PCE") {
		t.Error("compound=TCE: not the plot of TCE alone")
	}
	vc := plot("kind=map&compound=" + url.QueryEscape("vinyl chloride"))
	if !strings.Contains(vc, "vinyl chloride: plume") || !strings.Contains(vc, "at or above 0.3 ug/L") || strings.Contains(vc, "at or above 5 ug/L") {
		t.Error("the map of vinyl chloride is not at its own levels")
	}
	if first := plot("kind=profile"); !strings.Contains(first, "PCE: centreline profile") {
		t.Error("the profile without compound is not the first compound's")
	}
}

// The dry cleaner as given with the closed forms only: the daughters have
// no values (no closed form; the finite volumes did not run): each plot
// names them without a line, the memo says why they have no map and asks
// for "numeric", and /v1/plots refuses their map naming compound, while
// the map without compound is PCE's.
func TestReportChainWithoutValues(t *testing.T) {
	ts := newTestServer(t, Config{})
	body := mustJSON(t, dryCleanerMap(t))
	page := report(t, ts, "", body)
	svgs, _ := figures(page, "plot bt")
	for _, svg := range svgs {
		got, _ := chainLines(svg)
		for _, n := range []string{"TCE", "cis-1,2-DCE", "vinyl chloride"} {
			if s := got[n]; s == nil || s.method != "no values" || s.curves != 0 || s.levels != 1 {
				t.Errorf("%s: %+v, want a legend entry without values, no line, its level", n, s)
			}
		}
		if s := got["PCE"]; s == nil || s.curves != 1 || s.method != "exact" {
			t.Errorf("PCE: %+v", s)
		}
	}
	if flat := strings.Join(strings.Fields(page), " "); !strings.Contains(flat, `Add "numeric" to the methods for their values and verdicts`) &&
		!strings.Contains(flat, `Add &#34;numeric&#34; to the methods for their values and verdicts`) {
		t.Error("the memo does not ask for the numeric method")
	}
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/plots?kind=map&compound=TCE", body, nil), http.StatusUnprocessableEntity)
	if !hasField(p, "compound") {
		t.Errorf("map of TCE: %+v", p.Errors)
	}
	rec := ts.call(t, http.MethodPost, "/v1/plots?kind=map", body, nil)
	if rec.Code != http.StatusOK || !strings.Contains(rec.Body.String(), "PCE: plume") {
		t.Errorf("map without compound: %d", rec.Code)
	}
}
