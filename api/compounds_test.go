package api

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"downgradient/internal/gistest"
	"downgradient/plume"
)

// dryCleanerMap is the invented dry-cleaner demo (testdata/demo) with the
// closed forms only, so that the tests do not wait for the 3D chain.
func dryCleanerMap(t *testing.T) map[string]any { return dryCleanerMapB(t) }

// dryCleanerMapB is dryCleanerMap for tests and benchmarks.
func dryCleanerMapB(t testing.TB) map[string]any {
	t.Helper()
	return demoFileMap(t, "dry-cleaner.json")
}

// equalRChain makes the demo's compounds share one retardation factor, so
// that every closed form gives every compound.
func equalRChain(m map[string]any) {
	for _, c := range m["contaminants"].([]any) {
		c.(map[string]any)["retardation"] = 2.0
	}
}

// Issue 13 end to end: receptors report compounds (and not their own
// series), derived.compounds gives each compound's parameters, the caveats
// name their compound, and the CSV and GeoJSON carry every compound.
func TestCompoundsThroughTheAPI(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := dryCleanerMap(t)
	var res struct {
		Derived struct {
			Compounds []plume.CompoundDerived `json:"compounds"`
		} `json:"derived"`
		Receptors []map[string]json.RawMessage `json:"receptors"`
		Caveats   []plume.Caveat               `json:"caveats"`
	}
	if err := json.Unmarshal(screenAs(t, ts, m, ""), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Derived.Compounds) != 4 || res.Derived.Compounds[3].Name != "vinyl chloride" || res.Derived.Compounds[0].YieldSource != "molar_mass_ratio" {
		t.Errorf("derived.compounds %+v", res.Derived.Compounds)
	}
	for _, rr := range res.Receptors {
		if _, ok := rr["series"]; ok {
			t.Errorf("receptor %s has its own series beside compounds", rr["id"])
		}
		var cs []plume.CompoundResult
		if err := json.Unmarshal(rr["compounds"], &cs); err != nil || len(cs) != 4 {
			t.Fatalf("receptor %s compounds %s", rr["id"], rr["compounds"])
		}
		// Distinct retardation in 3D without numeric: the daughters have
		// no value and no verdict, so no receptor reads as clean.
		if cs[3].ExceedsScreeningLevel != nil || cs[3].Series[0].Exact != nil {
			t.Errorf("vinyl chloride at %s: %+v", rr["id"], cs[3])
		}
		if string(rr["exceeds_screening_level"]) == "false" {
			t.Errorf("receptor %s reads below with compounds not compared", rr["id"])
		}
	}
	named := false
	for _, c := range res.Caveats {
		named = named || c.Code == "decay_convention" && c.Compound == "TCE"
	}
	if !named {
		t.Errorf("no decay_convention caveat naming TCE: %+v", res.Caveats)
	}

	// CSV: one row per receptor, compound, time (and steady) and method
	// with a value; equal retardation so that all four have one.
	equalRChain(m)
	rows, err := csv.NewReader(bytes.NewReader(screenAs(t, ts, m, "csv"))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	perCompound := map[string]int{}
	for _, r := range rows[1:] {
		perCompound[r[col["compound"]]]++
		// The table's lowest drinking-water limit for vinyl chloride is
		// the WHO guideline value, 0.0003 mg/L (plume's reference table).
		if r[col["compound"]] == "vinyl chloride" && r[col["screening_level_ug_per_L"]] != "0.3" {
			t.Errorf("vinyl chloride row with level %q, want 0.3 ug/L", r[col["screening_level_ug_per_L"]])
		}
	}
	// 3 receptors x (4 times + steady) x 2 methods per compound.
	for _, name := range []string{"PCE", "TCE", "cis-1,2-DCE", "vinyl chloride"} {
		if perCompound[name] != 30 {
			t.Errorf("%s: %d CSV rows, want 30 (%v)", name, perCompound[name], perCompound)
		}
	}

	// GeoJSON: per-compound columns, which a GIS reader sees.
	body := screenAs(t, ts, m, "geojson")
	info := gistest.OgrinfoBytes(t, "chain.geojson", body)
	l := info.Layers[0]
	for _, want := range []string{"vinyl_chloride_exceeds_screening_level", "cis_1_2_dce_peak_concentration", "pce_exact_t40yr_ug_L", "tce_domenico_steady_ug_L"} {
		if _, ok := l.Field(want); !ok {
			t.Errorf("no attribute column %s in %v", want, l.Fields)
		}
	}
	if len(info.Warnings) > 0 {
		t.Errorf("ogrinfo warnings: %s", strings.Join(info.Warnings, "; "))
	}
}

// GET /v1/concentration with contaminants (a JSON array) and compound:
// the compound's value, its level and verdict in the headers; without
// compound, a 422 naming it.
func TestConcentrationOfACompound(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := dryCleanerMap(t)
	equalRChain(m)
	cs, _ := json.Marshal(m["contaminants"])
	q := url.Values{
		"units.length": {"m"}, "units.time": {"yr"}, "units.concentration": {"ug/L"}, "units.conductivity": {"m/d"},
		"aquifer.hydraulic_conductivity": {"3.5"}, "aquifer.hydraulic_gradient": {"0.006"}, "aquifer.effective_porosity": {"0.25"},
		"aquifer.dispersivity.longitudinal": {"8"}, "aquifer.dispersivity.transverse": {"0.8"}, "aquifer.dispersivity.vertical": {"0.05"},
		"contaminants": {string(cs)}, "source.width": {"20"}, "source.depth": {"4"},
		"receptor.x": {"320"}, "receptor.y": {"10"}, "receptor.screen_top": {"3"}, "receptor.screen_bottom": {"12"},
		"time": {"40"}, "compound": {"vinyl chloride"},
	}
	rec := ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil)
	if rec.Code != http.StatusOK {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	got, err := strconv.ParseFloat(rec.Body.String(), 64)
	if err != nil {
		t.Fatal(err)
	}
	if rec.Header().Get("X-Screening-Level") != "0.3" {
		t.Errorf("X-Screening-Level %q, want vinyl chloride's 0.3 ug/L", rec.Header().Get("X-Screening-Level"))
	}
	// The same value as the screening's JSON for that compound and time.
	m["receptors"] = []any{map[string]any{"id": "R1", "x": 320.0, "y": 10.0, "screen_top": 3.0, "screen_bottom": 12.0}}
	m["times"] = []any{40.0}
	m["methods"] = []any{"exact"}
	var res plume.Result
	if err := json.Unmarshal(screenAs(t, ts, m, ""), &res); err != nil {
		t.Fatal(err)
	}
	if want := *res.Receptors[0].Compounds[3].Series[0].Exact; got != want {
		t.Errorf("GET %v, POST %v", got, want)
	}
	q.Del("compound")
	p := problemOf(t, ts.call(t, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil), http.StatusUnprocessableEntity)
	if !hasField(p, "compound") {
		t.Errorf("problem %+v does not name compound", p)
	}
}

// Bad chains are 422 naming the field (issue 13).
func TestCompoundsBadInputThroughTheAPI(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := dryCleanerMap(t)
	cs := m["contaminants"].([]any)
	cs[1].(map[string]any)["decays_to"] = "TCE"
	cs[2].(map[string]any)["yield"] = -1.0
	m["contaminant"] = map[string]any{"name": "benzene"}
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil), http.StatusUnprocessableEntity)
	for _, f := range []string{"contaminants[1].decays_to", "contaminants[2].yield", "contaminants"} {
		if !hasField(p, f) {
			t.Errorf("problem does not name %s: %+v", f, p.Errors)
		}
	}
}
