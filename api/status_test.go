package api

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"downgradient/plume"
)

// The tests of this file pin issue 11: nothing reads as clean unless it was
// modelled and compared, caveats travel with the numbers, and no answer
// depends on the other receptors of the request. The scenarios are the
// invented demo (testdata/demo) and edits of it.

// screenAs posts a scenario tree and returns the response in one format.
func screenAs(t *testing.T, ts *testServer, m map[string]any, format string) []byte {
	t.Helper()
	target := "/v1/screenings"
	if format != "" {
		target += "?format=" + format
	}
	rec := ts.call(t, http.MethodPost, target, mustJSON(t, m), nil)
	if rec.Code != http.StatusOK {
		t.Fatalf("%s: %d %s", target, rec.Code, rec.Body.String())
	}
	return rec.Body.Bytes()
}

// receptorByID finds a receptor of a JSON result.
func receptorByID(t *testing.T, res plume.Result, id string) plume.ReceptorResult {
	t.Helper()
	for _, rr := range res.Receptors {
		if rr.ID == id {
			return rr
		}
	}
	t.Fatalf("no receptor %q", id)
	return plume.ReceptorResult{}
}

// csvRows reads a CSV answer into maps by column name.
func csvRows(t *testing.T, b []byte) []map[string]string {
	t.Helper()
	rows, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, r := range rows[1:] {
		m := map[string]string{}
		for i, h := range rows[0] {
			m[h] = r[i]
		}
		out = append(out, m)
	}
	return out
}

// geoFeatures reads a GeoJSON answer's feature properties by receptor id.
func geoFeatures(t *testing.T, b []byte) map[string]map[string]any {
	t.Helper()
	var fc struct {
		Features []struct {
			ID         string         `json:"id"`
			Properties map[string]any `json:"properties"`
		} `json:"features"`
	}
	if err := json.Unmarshal(b, &fc); err != nil {
		t.Fatal(err)
	}
	out := map[string]map[string]any{}
	for _, f := range fc.Features {
		out[f.ID] = f.Properties
	}
	return out
}

// Problem 1: an upgradient receptor is not modelled and reads as such in
// every format: JSON and GeoJSON status not_modelled_upgradient with
// exceeds_screening_level null, CSV status and an empty comparison, the
// caveat code on the row and the feature, the GET a 422, the report "not
// modelled".
func TestStatusUpgradientNeverReadsClean(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	const up = "MW-5 upgradient" // demo: 30 m upgradient of the source face
	res := decodeResult(t, screenAs(t, ts, m, ""))
	rr := receptorByID(t, res, up)
	if rr.Status != plume.StatusUpgradient || rr.ExceedsScreeningLevel != nil {
		t.Errorf("JSON: status %q exceeds %v", rr.Status, rr.ExceedsScreeningLevel)
	}
	if res.Summary.NotModelled != 1 || res.Summary.NotCompared != 1 || res.Summary.Below+res.Summary.Exceeding != 5 {
		t.Errorf("summary %+v", res.Summary)
	}
	for _, row := range csvRows(t, screenAs(t, ts, m, "csv")) {
		if row["receptor_id"] != up {
			continue
		}
		if row["status"] != "not_modelled_upgradient" || row["above_screening_level"] != "" ||
			!strings.Contains(row["caveat_codes"], plume.CaveatReceptorUpgradient) {
			t.Errorf("CSV row %v", row)
		}
	}
	f := geoFeatures(t, screenAs(t, ts, m, "geojson"))[up]
	if f["status"] != "not_modelled_upgradient" || f["exceeds_screening_level"] != nil ||
		!strings.Contains(f["caveat_codes"].(string), plume.CaveatReceptorUpgradient) {
		t.Errorf("GeoJSON feature %v", f)
	}
	q := demoQuery()
	q.Set("receptor.x", "-40")
	p := problemOf(t, ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil), http.StatusUnprocessableEntity)
	if p.Type != "/problems/receptor-not-modelled" || !hasField(p, "receptor.x") {
		t.Errorf("GET upgradient: %+v", p)
	}
	rec := ts.call(t, http.MethodPost, "/v1/reports", demoBody(t), nil)
	if rec.Code != http.StatusOK || !strings.Contains(rec.Body.String(), ">not modelled<") {
		t.Errorf("report: %d, no \"not modelled\" verdict", rec.Code)
	}
}

// demoQuery is a one-receptor GET query in the spirit of the demo.
func demoQuery() url.Values {
	q := url.Values{}
	for k, v := range map[string]string{
		"aquifer.seepage_velocity": "0.1229", "aquifer.dispersivity.longitudinal": "10",
		"aquifer.dispersivity.transverse": "1", "aquifer.dispersivity.vertical": "0.1",
		"contaminant.name": "benzene", "contaminant.retardation": "1.375", "contaminant.half_life": "720",
		"source.concentration": "12", "source.width": "15", "source.depth": "3",
		"receptor.x": "60", "receptor.y": "-3", "receptor.z": "1", "time": "1825",
	} {
		q.Set(k, v)
	}
	return q
}

// Problem 2: an unknown screening level compares nothing, and a misspelt
// name is pointed out with the entry meant.
func TestStatusNoLevelAndMisspeltName(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	set(m, "contaminant", map[string]any{"name": "benzine", "retardation": 1.37, "half_life": 720})
	res := decodeResult(t, screenAs(t, ts, m, ""))
	for _, rr := range res.Receptors {
		if rr.ExceedsScreeningLevel != nil {
			t.Errorf("%s: exceeds %v without a level", rr.ID, *rr.ExceedsScreeningLevel)
		}
	}
	var named, level bool
	for _, c := range res.Caveats {
		switch c.Code {
		case plume.CaveatNameNotRecognized:
			named = c.Severity == plume.SeverityWarning && strings.Contains(c.Message, `"benzene"`)
		case plume.CaveatNoScreeningLevel:
			level = c.Severity == plume.SeverityWarning
		}
	}
	if !named || !level {
		t.Errorf("name caveat %v, no-level warning %v: %+v", named, level, res.Caveats)
	}
	if res.Summary.NotCompared != len(res.Receptors) || !strings.Contains(res.Summary.Text, "nothing was compared") {
		t.Errorf("summary %+v", res.Summary)
	}
	for id, f := range geoFeatures(t, screenAs(t, ts, m, "geojson")) {
		if f["exceeds_screening_level"] != nil {
			t.Errorf("GeoJSON %s exceeds %v without a level", id, f["exceeds_screening_level"])
		}
	}
	for _, row := range csvRows(t, screenAs(t, ts, m, "csv")) {
		if row["above_screening_level"] != "" {
			t.Errorf("CSV row compares without a level: %v", row)
		}
	}
}

// Problem 3: with estimated dispersivities, MW-1's answer is the same alone,
// with a far well added, and through the GET.
func TestStatusAnswerIndependentOfOtherReceptors(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	set(m, "aquifer.dispersivity", deleteMarker)
	recs := m["receptors"].([]any)
	set(m, "receptors", []any{recs[0]})
	alone := receptorByID(t, decodeResult(t, screenAs(t, ts, m, "")), "MW-1")
	set(m, "receptors", []any{recs[0], map[string]any{"id": "far", "x": 4000, "y": -500}})
	with := receptorByID(t, decodeResult(t, screenAs(t, ts, m, "")), "MW-1")
	if a, b := mustJSON(t, alone), mustJSON(t, with); !bytes.Equal(a, b) {
		t.Errorf("MW-1 alone and with a far well differ:\n%s\n%s", a, b)
	}
	if alone.Dispersivity == nil || alone.Dispersivity.TravelDistance <= 0 {
		t.Errorf("no receptor dispersivity: %+v", alone.Dispersivity)
	}
}

// The property behind problem 3: adding, removing or reordering receptors
// never changes another receptor's values, in JSON, CSV, GeoJSON and the GET
// (random subsets of the demo's receptors, dispersivities estimated, closed
// forms).
func TestPropertyReceptorIndependence(t *testing.T) {
	ts := newTestServer(t, Config{})
	base := demoMap(t)
	set(base, "aquifer.dispersivity", deleteMarker)
	all := base["receptors"].([]any)
	full := screenAll(t, ts, base)
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := range 6 {
		perm := rng.Perm(len(all))[:1+rng.IntN(len(all))]
		var sub []any
		for _, i := range perm {
			sub = append(sub, all[i])
		}
		m := demoMap(t)
		set(m, "aquifer.dispersivity", deleteMarker)
		set(m, "receptors", sub)
		got := screenAll(t, ts, m)
		for id, want := range full {
			g, ok := got[id]
			if !ok {
				continue
			}
			for format := range want {
				if g[format] != want[format] {
					t.Errorf("trial %d, %s, %s: %s\nvs %s", trial, id, format, g[format], want[format])
				}
			}
		}
	}
	// The GET gives the POST's value for the same well and time.
	for _, i := range []int{0, 2} {
		r := all[i].(map[string]any)
		id := r["id"].(string)
		q := url.Values{}
		q.Set("aquifer.hydraulic_conductivity", "8.6")
		q.Set("aquifer.hydraulic_gradient", "0.004")
		q.Set("aquifer.effective_porosity", "0.28")
		q.Set("aquifer.bulk_density", "1.75")
		q.Set("aquifer.organic_carbon_fraction", "0.001")
		q.Set("contaminant.name", "benzene")
		q.Set("contaminant.half_life", "720")
		q.Set("contaminant.screening_level", "0.005")
		for k, v := range map[string]string{"x": "1250", "y": "830", "flow_azimuth_deg": "110", "concentration": "12", "width": "15", "depth": "3"} {
			q.Set("source."+k, v)
		}
		for k, v := range r {
			if k != "id" {
				q.Set("receptor."+k, fmt.Sprint(v))
			}
		}
		q.Set("time", "1825")
		rec := ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil)
		if rec.Code != http.StatusOK {
			t.Fatalf("GET %s: %d %s", id, rec.Code, rec.Body.String())
		}
		if want := full[id]["exact@1825"]; rec.Body.String() != want {
			t.Errorf("GET %s: %s, POST %s", id, rec.Body.String(), want)
		}
	}
}

// screenAll answers a scenario in JSON, CSV and GeoJSON and returns, per
// receptor, its JSON result, CSV rows (minus the input hash, which names
// the request) and GeoJSON properties as text, and each exact value by time.
func screenAll(t *testing.T, ts *testServer, m map[string]any) map[string]map[string]string {
	t.Helper()
	out := map[string]map[string]string{}
	res := decodeResult(t, screenAs(t, ts, m, ""))
	for _, rr := range res.Receptors {
		out[rr.ID] = map[string]string{"json": string(mustJSON(t, rr))}
		for _, sp := range rr.Series {
			out[rr.ID][fmt.Sprintf("exact@%g", sp.Time)] = formatNumber(*sp.Exact)
		}
	}
	for _, row := range csvRows(t, screenAs(t, ts, m, "csv")) {
		delete(row, "input_sha256")
		out[row["receptor_id"]]["csv"] += string(mustJSON(t, row))
	}
	for id, f := range geoFeatures(t, screenAs(t, ts, m, "geojson")) {
		out[id]["geojson"] = string(mustJSON(t, f))
	}
	return out
}

// Problem 4: the caveats travel with the numbers: CSV columns, GeoJSON
// properties, GET headers and the GET's JSON form.
func TestStatusCaveatsTravelWithNumbers(t *testing.T) {
	ts := newTestServer(t, Config{})
	rows := csvRows(t, screenAs(t, ts, demoMap(t), "csv"))
	for _, row := range rows {
		if row["status"] == "" || row["screening_level_mg_per_L"] != "0.005" || !strings.Contains(row["caveat_codes"], plume.CaveatScreeningEstimate) ||
			row["engine_version"] != "test" || len(row["input_sha256"]) != 64 {
			t.Fatalf("CSV row lacks its context: %v", row)
		}
	}
	for id, f := range geoFeatures(t, screenAs(t, ts, demoMap(t), "geojson")) {
		if f["status"] == nil || !strings.Contains(fmt.Sprint(f["caveat_codes"]), plume.CaveatScreeningEstimate) {
			t.Errorf("feature %s lacks status or caveat codes: %v", id, f)
		}
	}
	q := demoQuery()
	rec := ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil)
	h := rec.Header()
	if h.Get("X-Receptor-Status") != "modelled" || h.Get("X-Exceeds-Screening-Level") != "true" ||
		!strings.Contains(h.Get("X-Caveat-Codes"), plume.CaveatScreeningEstimate) || h.Get("X-Screening-Caution") != plume.ScreeningCaution ||
		h.Get("X-Engine-Version") != "test" || len(h.Get("X-Input-SHA256")) != 64 {
		t.Errorf("GET headers %v", h)
	}
	q.Set("format", "json")
	rec = ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil)
	var cv struct {
		Value   float64        `json:"value"`
		Status  string         `json:"status"`
		Exceeds *bool          `json:"exceeds_screening_level"`
		Caveats []plume.Caveat `json:"caveats"`
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &cv); err != nil || cv.Status != "modelled" || cv.Exceeds == nil || !*cv.Exceeds || len(cv.Caveats) == 0 || cv.Value <= 0 {
		t.Errorf("GET format=json: %v %s", err, rec.Body.String())
	}
}

// Problem 5, first trap: every bad field at once, from the schema check and
// the domain's rules together; a request missing only required fields is
// titled as missing.
func TestStatusAllBadFieldsAtOnce(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	recs := m["receptors"].([]any)
	delete(recs[0].(map[string]any), "y")               // schema: required
	set(m, "source.width", deleteMarker)                // domain: width and depth both or neither
	set(m, "receptors.1.screen_top", 5)                 // domain: screen bottom missing
	set(m, "contaminant.decay_applies_to", "dissolved") // fine
	set(m, "aquifer.hydraulic_gradient", deleteMarker)  // domain: K, i, n_e together
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil), http.StatusUnprocessableEntity)
	for _, f := range []string{"receptors[0].y", "source.width", "receptors[1].screen_bottom", "aquifer.hydraulic_gradient"} {
		if !hasField(p, f) {
			t.Errorf("%s not named: %+v", f, p.Errors)
		}
	}
	m = demoMap(t)
	delete(m["receptors"].([]any)[0].(map[string]any), "x")
	p = problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil), http.StatusUnprocessableEntity)
	if p.Type != "/problems/missing-input" || p.Title != "Required input missing" {
		t.Errorf("missing field titled %q (%s)", p.Title, p.Type)
	}
}

// Problem 5, other traps: times given in days where years were meant warn
// that the level is reached later; conductivity may carry its own unit and
// every input's unit is echoed; the GET never returns a subnormal number.
func TestStatusTraps(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	set(m, "times", []any{1, 5, 10, 30}) // years meant, days given
	res := decodeResult(t, screenAs(t, ts, m, ""))
	late := 0
	for _, c := range res.Caveats {
		if c.Code == plume.CaveatExceedsAfterTimes && c.Severity == plume.SeverityWarning {
			late++
		}
	}
	if late == 0 {
		t.Errorf("no warning that the level is reached after the requested times: %+v", res.Caveats)
	}

	// 8.6 m/d given as ft/d with the request in years: the same velocity as
	// 8.6*0.3048 m/d in metres and days (1 ft = 0.3048 m, NIST SP 811).
	a := demoMap(t)
	set(a, "aquifer.hydraulic_conductivity", 8.6*0.3048)
	b := demoMap(t)
	set(b, "units", map[string]any{"length": "m", "time": "yr", "concentration": "mg/L", "conductivity": "ft/d"})
	set(b, "times", []any{1, 5, 10, 20})
	set(b, "contaminant.half_life", 720/365.25)
	ra, rb := decodeResult(t, screenAs(t, ts, a, "")), decodeResult(t, screenAs(t, ts, b, ""))
	if va, vb := ra.Derived.SeepageVelocity, rb.Derived.SeepageVelocity/365.25; math.Abs(va-vb) > 1e-12*va {
		t.Errorf("velocity %g m/d vs %g m/d", va, vb)
	}
	if rb.Derived.InputUnits["aquifer.hydraulic_conductivity"] != "ft/d" || rb.Derived.InputUnits["contaminant.half_life"] != "yr" {
		t.Errorf("input units %v", rb.Derived.InputUnits)
	}

	// A far receptor at an early time: the exact value is far below the
	// floor (about 1e-300 mg/L here), so the GET answers 0, never a subnormal.
	q := demoQuery()
	q.Set("receptor.x", "900")
	q.Set("time", "2000")
	rec := ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil)
	if rec.Body.String() != "0" {
		t.Errorf("far early value %s, want 0 (below the floor)", rec.Body.String())
	}
}
