package api

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
	"time"

	"downgradient/plume"
)

func decodeResult(t testing.TB, b []byte) plume.Result {
	t.Helper()
	var r plume.Result
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatalf("decode result: %v", err)
	}
	return r
}

// The invented demo scenario in JSON: every receptor in request order, the
// derived Darcy velocity, the general caution and the upgradient caveat.
func TestDemoJSON(t *testing.T) {
	ts := newTestServer(t, Config{})
	rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil)
	if rec.Code != 200 || rec.Header().Get("Content-Type") != "application/json" {
		t.Fatalf("%d %s: %s", rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
	}
	res := decodeResult(t, rec.Body.Bytes())
	ids := []string{"MW-1", "MW-2", "W-4 supply well", "P-7 parcel corner", "S-1 creek bank", "MW-5 upgradient"}
	if len(res.Receptors) != len(ids) {
		t.Fatalf("%d receptors, want %d", len(res.Receptors), len(ids))
	}
	for i, id := range ids {
		rr := res.Receptors[i]
		if rr.ID != id {
			t.Errorf("receptor %d id %q, want %q", i, rr.ID, id)
		}
		if len(rr.Series) != 4 || rr.SteadyState.Exact == nil || rr.SteadyState.Domenico == nil {
			t.Errorf("%s: series %d, steady %+v", id, len(rr.Series), rr.SteadyState)
		}
	}
	// Darcy: v = K i / n_e = 8.6 * 0.004 / 0.28 m/d.
	if v := res.Derived.SeepageVelocity; math.Abs(v-8.6*0.004/0.28) > 1e-12 {
		t.Errorf("seepage velocity %g", v)
	}
	// Plume frame: the demo places MW-1 40 m down the flow line at azimuth
	// 110 degrees (coordinates rounded to 0.1 m).
	if rr := res.Receptors[0]; math.Abs(rr.PlumeX-40) > 0.1 || math.Abs(rr.PlumeY) > 0.1 {
		t.Errorf("MW-1 plume frame (%g, %g), want about (40, 0)", rr.PlumeX, rr.PlumeY)
	}
	if res.Engine.Version != "test" || len(res.Engine.InputSHA256) != 64 {
		t.Errorf("engine %+v", res.Engine)
	}
	codes := map[string]string{}
	for _, c := range res.Caveats {
		codes[c.Code] = c.ReceptorID
	}
	if _, ok := codes[plume.CaveatScreeningEstimate]; !ok {
		t.Errorf("no general screening caution in %v", codes)
	}
	if id, ok := codes[plume.CaveatReceptorUpgradient]; !ok || id != "MW-5 upgradient" {
		t.Errorf("no upgradient caveat for MW-5 in %v", codes)
	}
}

// The same demo as long-format CSV: header with units, one row per receptor,
// time and method, steady rows with time "steady", the same numbers as JSON.
func TestDemoCSV(t *testing.T) {
	ts := newTestServer(t, Config{})
	js := decodeResult(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil).Body.Bytes())
	for _, how := range []struct {
		target string
		accept string
	}{{"/v1/screenings?format=csv", ""}, {"/v1/screenings", "text/csv"}, {"/v1/screenings", "application/xml;q=0.9, text/csv"}} {
		rec := ts.call(t, http.MethodPost, how.target, demoBody(t), map[string]string{"Accept": how.accept})
		if rec.Code != 200 || !strings.HasPrefix(rec.Header().Get("Content-Type"), "text/csv") {
			t.Fatalf("%+v: %d %q", how, rec.Code, rec.Header().Get("Content-Type"))
		}
		rows, err := csv.NewReader(bytes.NewReader(rec.Body.Bytes())).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		want := []string{"receptor_id", "x_m", "y_m", "z_m", "plume_x_m", "plume_y_m", "time_d", "method", "compound", "concentration_mg_per_L",
			"status", "screening_level_mg_per_L", "above_screening_level",
			"allowable_source_concentration_steady_mg_per_L", "allowable_source_concentration_within_times_mg_per_L",
			"dilution_attenuation_factor_steady", "dilution_attenuation_factor_within_times",
			"allowable_scale_factor_steady", "allowable_scale_factor_within_times",
			"caveat_codes", "engine_version", "input_sha256"}
		if strings.Join(rows[0], ",") != strings.Join(want, ",") {
			t.Errorf("header %v", rows[0])
		}
		// 6 receptors x (4 times + steady) x 2 methods.
		if n := len(rows) - 1; n != 6*5*2 {
			t.Errorf("%d data rows, want 60", n)
		}
		steady := 0
		for _, r := range rows[1:] {
			c, err := strconv.ParseFloat(r[9], 64)
			if err != nil || math.IsNaN(c) || math.IsInf(c, 0) {
				t.Errorf("row %v: concentration", r)
			}
			if r[6] == "steady" {
				steady++
			}
			// Issue 11: a row of a receptor that is not modelled compares nothing.
			wantAbove := strconv.FormatBool(c >= 0.005)
			if r[10] == string(plume.StatusUpgradient) {
				wantAbove = ""
			}
			if r[12] != wantAbove || r[11] != "0.005" || r[8] != "benzene" {
				t.Errorf("row %v: above_screening_level", r)
			}
		}
		if steady != 12 {
			t.Errorf("%d steady rows, want 12", steady)
		}
		// Row 1 is MW-1, t = 365, exact: the JSON value, digit for digit.
		if r := rows[1]; r[0] != "MW-1" || r[1] != "1287.6" || r[6] != "365" || r[7] != "exact" ||
			r[9] != formatNumber(*js.Receptors[0].Series[0].Exact) {
			t.Errorf("first row %v", r)
		}
	}
}

// GeoJSON: a FeatureCollection of receptor points at the request's site
// coordinates, with the results as properties.
func TestDemoGeoJSON(t *testing.T) {
	ts := newTestServer(t, Config{})
	for _, how := range []struct{ target, accept string }{
		{"/v1/screenings?format=geojson", ""}, {"/v1/screenings", "application/geo+json"},
	} {
		rec := ts.call(t, http.MethodPost, how.target, demoBody(t), map[string]string{"Accept": how.accept})
		if rec.Code != 200 || rec.Header().Get("Content-Type") != "application/geo+json" {
			t.Fatalf("%d %q", rec.Code, rec.Header().Get("Content-Type"))
		}
		var fc featureCollection
		if err := json.Unmarshal(rec.Body.Bytes(), &fc); err != nil {
			t.Fatal(err)
		}
		if fc.Type != "FeatureCollection" || len(fc.Features) != 6 {
			t.Fatalf("type %q, %d features", fc.Type, len(fc.Features))
		}
		f := fc.Features[2]
		if f.ID != "W-4 supply well" || f.Geometry.Type != "Point" || f.Geometry.Coordinates != [2]float64{1449.4, 763.8} {
			t.Errorf("feature %+v", f)
		}
		if f.Properties.ScreenTop == nil || *f.Properties.ScreenTop != 2 || len(f.Properties.Series) != 4 || f.Properties.SteadyExact == nil {
			t.Errorf("properties %+v", f.Properties)
		}
		if len(fc.Caveats) == 0 || fc.Units.Length != "m" {
			t.Errorf("foreign members: caveats %d, units %+v", len(fc.Caveats), fc.Units)
		}
	}
}

// An Accept header that admits none of the representations gets 406; */*
// and an absent header get JSON.
func TestNegotiation(t *testing.T) {
	ts := newTestServer(t, Config{})
	for _, tc := range []struct {
		accept string
		status int
		ctype  string
	}{
		{"", 200, "application/json"},
		{"*/*", 200, "application/json"},
		{"text/html,application/xhtml+xml,*/*;q=0.8", 200, "application/json"},
		{"text/csv;q=0.5, application/geo+json", 200, "application/geo+json"},
		{"text/html", 406, "application/problem+json"},
		{"application/json;q=0", 406, "application/problem+json"},
	} {
		rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), map[string]string{"Accept": tc.accept})
		if rec.Code != tc.status || !strings.HasPrefix(rec.Header().Get("Content-Type"), tc.ctype) {
			t.Errorf("Accept %q: %d %q, want %d %q", tc.accept, rec.Code, rec.Header().Get("Content-Type"), tc.status, tc.ctype)
		}
	}
}

// concentrationQuery builds the spreadsheet GET for the demo's aquifer and
// source at one receptor.
func concentrationQuery(x, y, z float64, time, method string) string {
	q := url.Values{}
	for k, v := range map[string]string{
		"aquifer.hydraulic_conductivity": "8.6", "aquifer.hydraulic_gradient": "0.004",
		"aquifer.effective_porosity": "0.28", "aquifer.bulk_density": "1.75",
		"aquifer.organic_carbon_fraction": "0.001", "aquifer.dispersivity.longitudinal": "10",
		"aquifer.dispersivity.transverse": "1", "aquifer.dispersivity.vertical": "0.1",
		"contaminant.name": "benzene", "contaminant.half_life": "720", "contaminant.screening_level": "0.005",
		"source.x": "1250", "source.y": "830", "source.flow_azimuth_deg": "110",
		"source.concentration": "12", "source.width": "15", "source.depth": "3",
	} {
		q.Set(k, v)
	}
	q.Set("receptor.x", formatNumber(x))
	q.Set("receptor.y", formatNumber(y))
	q.Set("receptor.z", formatNumber(z))
	q.Set("time", time)
	if method != "" {
		q.Set("method", method)
	}
	return "/v1/concentration?" + q.Encode()
}

// The spreadsheet GET returns the bare number, equal to the POST's value for
// the same receptor, time and method.
func TestConcentrationGET(t *testing.T) {
	ts := newTestServer(t, Config{})
	res := decodeResult(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil).Body.Bytes())
	mw1 := res.Receptors[0] // demo MW-1 at (1287.6, 816.3), z = 1
	cases := []struct {
		time, method string
		want         float64
	}{
		{"365", "exact", *mw1.Series[0].Exact},
		{"365", "", *mw1.Series[0].Exact}, // default method exact
		{"1825", "domenico", *mw1.Series[1].Domenico},
		{"steady", "exact", *mw1.SteadyState.Exact},
		{"steady", "domenico", *mw1.SteadyState.Domenico},
	}
	for _, tc := range cases {
		rec := ts.call(t, http.MethodGet, concentrationQuery(1287.6, 816.3, 1, tc.time, tc.method), nil, nil)
		if rec.Code != 200 || !strings.HasPrefix(rec.Header().Get("Content-Type"), "text/plain") {
			t.Fatalf("%+v: %d %q %s", tc, rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
		}
		got, err := strconv.ParseFloat(rec.Body.String(), 64)
		if err != nil {
			t.Fatalf("body %q is not a bare number", rec.Body.String())
		}
		if got != tc.want {
			t.Errorf("%+v: GET %v, POST %v", tc, got, tc.want)
		}
	}
}

// Units: the demo in feet, years and ug/L gives the same answers converted
// (1 ft = 0.3048 m, NIST SP 811; 1 yr = 365.25 d; 1 mg/L = 1000 ug/L),
// within 1e-9 relative.
func TestUnitConversionEndToEnd(t *testing.T) {
	ts := newTestServer(t, Config{})
	base := decodeResult(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil).Body.Bytes())

	const ft, yr = 0.3048, 365.25
	m := demoMap(t)
	m["units"] = map[string]any{"length": "ft", "time": "yr", "concentration": "ug/L"}
	aq := m["aquifer"].(map[string]any)
	aq["hydraulic_conductivity"] = 8.6 / ft * yr // m/d -> ft/yr
	disp := aq["dispersivity"].(map[string]any)
	for _, k := range []string{"longitudinal", "transverse", "vertical"} {
		disp[k] = disp[k].(float64) / ft
	}
	ct := m["contaminant"].(map[string]any)
	ct["half_life"] = 720 / yr
	ct["screening_level"] = 0.005 * 1000
	src := m["source"].(map[string]any)
	for _, k := range []string{"x", "y", "width", "depth"} {
		src[k] = src[k].(float64) / ft
	}
	src["concentration"] = 12.0 * 1000
	for _, r := range m["receptors"].([]any) {
		rm := r.(map[string]any)
		for _, k := range []string{"x", "y", "z", "screen_top", "screen_bottom"} {
			if v, ok := rm[k]; ok {
				rm[k] = v.(float64) / ft
			}
		}
	}
	times := m["times"].([]any)
	for i := range times {
		times[i] = times[i].(float64) / yr
	}
	rec := ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil)
	if rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	conv := decodeResult(t, rec.Body.Bytes())
	if conv.Units != (plume.Units{Length: "ft", Time: "yr", Concentration: "ug/L", Conductivity: "ft/yr", MassDischarge: "kg/yr"}) {
		t.Errorf("units not echoed: %+v", conv.Units)
	}
	rel := func(a, b float64) float64 {
		if a == b {
			return 0
		}
		return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
	}
	check := func(what string, got, want float64) {
		t.Helper()
		if r := rel(got, want); r > 1e-9 && math.Abs(got-want) > 1e-300 {
			t.Errorf("%s: %v vs %v converted (rel %.2g)", what, got, want, r)
		}
	}
	check("seepage velocity", conv.Derived.SeepageVelocity, base.Derived.SeepageVelocity/ft*yr)
	for i, rb := range base.Receptors {
		rc := conv.Receptors[i]
		check(rb.ID+" plume_x", rc.PlumeX, rb.PlumeX/ft)
		for j := range rb.Series {
			check(fmt.Sprintf("%s t%d exact", rb.ID, j), *rc.Series[j].Exact, *rb.Series[j].Exact*1000)
			check(fmt.Sprintf("%s t%d domenico", rb.ID, j), *rc.Series[j].Domenico, *rb.Series[j].Domenico*1000)
		}
		check(rb.ID+" steady", *rc.SteadyState.Exact, *rb.SteadyState.Exact*1000)
		if (rb.FirstExceedanceTime == nil) != (rc.FirstExceedanceTime == nil) {
			t.Errorf("%s: first exceedance %v vs %v", rb.ID, rb.FirstExceedanceTime, rc.FirstExceedanceTime)
		} else if rb.FirstExceedanceTime != nil {
			check(rb.ID+" first exceedance", *rc.FirstExceedanceTime, *rb.FirstExceedanceTime/yr)
		}
	}
}

// Frames: rotating the site coordinates and the flow azimuth together by the
// same angle changes no result (the plume frame is invariant; identity of
// rotations).
func TestFrameRotationEndToEnd(t *testing.T) {
	ts := newTestServer(t, Config{})
	base := decodeResult(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil).Body.Bytes())
	for _, deg := range []float64{-90, 37, 180, 251} {
		m := demoMap(t)
		th := deg * math.Pi / 180
		// Azimuth is clockwise from north; rotating points clockwise by th
		// about the origin in (east, north) coordinates.
		rot := func(x, y float64) (float64, float64) {
			return x*math.Cos(th) + y*math.Sin(th), -x*math.Sin(th) + y*math.Cos(th)
		}
		src := m["source"].(map[string]any)
		src["x"], src["y"] = rot(src["x"].(float64), src["y"].(float64))
		src["flow_azimuth_deg"] = src["flow_azimuth_deg"].(float64) + deg
		for _, r := range m["receptors"].([]any) {
			rm := r.(map[string]any)
			rm["x"], rm["y"] = rot(rm["x"].(float64), rm["y"].(float64))
		}
		rec := ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil)
		if rec.Code != 200 {
			t.Fatalf("%d %s", rec.Code, rec.Body.String())
		}
		got := decodeResult(t, rec.Body.Bytes())
		for i, rb := range base.Receptors {
			rg := got.Receptors[i]
			if math.Abs(rg.PlumeX-rb.PlumeX) > 1e-9 || math.Abs(rg.PlumeY-rb.PlumeY) > 1e-9 {
				t.Errorf("rotation %g: %s plume frame (%g,%g) vs (%g,%g)", deg, rb.ID, rg.PlumeX, rg.PlumeY, rb.PlumeX, rb.PlumeY)
			}
			a, b := *rg.SteadyState.Exact, *rb.SteadyState.Exact
			if math.Abs(a-b) > 1e-9*math.Max(math.Abs(b), 1e-12) {
				t.Errorf("rotation %g: %s steady %v vs %v", deg, rb.ID, a, b)
			}
		}
	}
}

// The per-request deadline: work that cannot finish in time is answered 503
// with a problem document, not left running.
func TestDeadline503(t *testing.T) {
	ts := newTestServer(t, Config{RequestTimeout: 1}) // 1 ns: expired before the engine starts
	rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil)
	problemOf(t, rec, http.StatusServiceUnavailable)
	if rec.Header().Get("Retry-After") == "" {
		t.Error("no Retry-After")
	}
	rec = ts.call(t, http.MethodGet, concentrationQuery(1287.6, 816.3, 1, "365", ""), nil, nil)
	problemOf(t, rec, http.StatusServiceUnavailable)
}

// The workload limit: receptors x (times + 1) x closed-form methods.
func TestWorkload413(t *testing.T) {
	ts := newTestServer(t, Config{MaxEvaluations: 50}) // the demo needs 6 x 5 x 2 = 60
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil), http.StatusRequestEntityTooLarge)
	if !hasField(p, "receptors") {
		t.Errorf("problem does not name receptors: %+v", p.Errors)
	}
}

// The numeric cross-check through the API: its grid report and per-receptor
// agreement match the document (response validation in call), or the
// response says why it did not run.
func TestDemoWithNumeric(t *testing.T) {
	if testing.Short() {
		t.Skip("numeric cross-check is slow")
	}
	ts := newTestServer(t, Config{RequestTimeout: 120 * time.Second})
	m := demoMap(t)
	m["receptors"] = m["receptors"].([]any)[:3]
	m["methods"] = []any{"exact", "domenico", "numeric"}
	rec := ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil)
	if rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	res := decodeResult(t, rec.Body.Bytes())
	if res.Numeric == nil {
		found := false
		for _, c := range res.Caveats {
			found = found || c.Code == plume.CaveatNumericNotRun
		}
		if !found {
			t.Error("numeric neither ran nor explained")
		}
		t.Log("numeric not run")
		return
	}
	for _, rr := range res.Receptors {
		if rr.NumericAgreement == nil || rr.Series[0].Numeric == nil {
			t.Errorf("%s: no numeric values", rr.ID)
		}
	}
	// CSV carries numeric rows too.
	rec = ts.call(t, http.MethodPost, "/v1/screenings?format=csv", mustJSON(t, m), nil)
	if !strings.Contains(rec.Body.String(), ",numeric,") {
		t.Error("CSV has no numeric rows")
	}
}
