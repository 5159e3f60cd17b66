package api

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"net/http"
	"reflect"
	"strings"
	"testing"

	"downgradient/openapi"
	"downgradient/plume/fit"
	"downgradient/plume/uncertainty"
)

// uncertaintyMap is an uncertainty request on the invented demo scenario
// with three uncertain parameters.
func uncertaintyMap(t testing.TB) map[string]any {
	t.Helper()
	sc := demoMap(t)
	set(sc, "aquifer.hydraulic_conductivity", map[string]any{"distribution": "lognormal", "p05": 3, "p95": 25})
	set(sc, "contaminant.half_life", map[string]any{"distribution": "triangular", "min": 200, "mode": 720, "max": 1500})
	set(sc, "aquifer.dispersivity.longitudinal", map[string]any{"distribution": "loguniform", "min": 3, "max": 30})
	return map[string]any{"scenario": sc, "realizations": 200, "seed": 7}
}

// One run end to end in the three formats; every response is checked
// against the OpenAPI document by ts.call.
func TestUncertaintyEndToEnd(t *testing.T) {
	ts := newTestServer(t, Config{})
	body := mustJSON(t, uncertaintyMap(t))
	rec := ts.call(t, http.MethodPost, "/v1/uncertainty", body, nil)
	if rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	var res uncertainty.UncertaintyResult
	if err := json.Unmarshal(rec.Body.Bytes(), &res); err != nil {
		t.Fatal(err)
	}
	if res.Realizations != 200 || len(res.Receptors) != 6 || len(res.Parameters) != 3 {
		t.Fatalf("realizations %d receptors %d parameters %d", res.Realizations, len(res.Receptors), len(res.Parameters))
	}
	w4 := res.Receptors[2]
	// The demo asks for exact and domenico: 4 times x 2 methods.
	if len(w4.Series) != 8 || w4.Series[0].Method != "exact" || w4.Series[1].Method != "domenico" || w4.Peak.ExceedanceProbability == nil {
		t.Errorf("W-4: %+v", w4)
	}
	// The same seed gives the same bytes (reproducibility through HTTP).
	again := ts.call(t, http.MethodPost, "/v1/uncertainty", body, nil)
	if again.Body.String() != rec.Body.String() {
		t.Error("same request, different answers")
	}
	// CSV: header, then 6 receptors x (4 times x 2 methods + 2 steady + peak) rows.
	rec = ts.call(t, http.MethodPost, "/v1/uncertainty?format=csv", body, nil)
	rows, err := csv.NewReader(strings.NewReader(rec.Body.String())).ReadAll()
	if err != nil || rec.Code != 200 {
		t.Fatalf("csv %d %v", rec.Code, err)
	}
	if len(rows) != 1+6*11 || rows[0][8] != "mean_mg_per_L" || rows[1][6] != "365" {
		t.Errorf("csv rows %d, header %v, first %v", len(rows), rows[0], rows[1])
	}
	// GeoJSON.
	rec = ts.call(t, http.MethodPost, "/v1/uncertainty", body, map[string]string{"Accept": "application/geo+json"})
	if rec.Code != 200 || !strings.Contains(rec.Header().Get("Content-Type"), "geo+json") || !strings.Contains(rec.Body.String(), `"top_driver"`) {
		t.Errorf("geojson %d %s", rec.Code, rec.Header().Get("Content-Type"))
	}
}

// endpointCase is one bad request of the uncertainty, attenuation and
// calibration tables.
type endpointCase struct {
	class  string
	raw    string
	edits  map[string]any
	status int
	field  string
	prefix bool
}

func runEndpointCases(t *testing.T, ts *testServer, path string, base func(testing.TB) map[string]any, cases []endpointCase) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.class, func(t *testing.T) {
			body := []byte(tc.raw)
			if tc.raw == "" {
				m := base(t)
				for k, v := range tc.edits {
					set(m, k, v)
				}
				body = mustJSON(t, m)
			}
			rec := ts.call(t, http.MethodPost, path, body, nil)
			p := problemOf(t, rec, tc.status)
			if tc.field == "" {
				return
			}
			ok := hasField(p, tc.field)
			for _, e := range p.Errors {
				ok = ok || tc.prefix && strings.HasPrefix(e.Field, tc.field)
			}
			if !ok {
				t.Errorf("field %q not named; errors %+v", tc.field, p.Errors)
			}
		})
	}
}

// Bad input of every class of DESIGN.md section 6 against POST /v1/uncertainty.
func TestUncertaintyBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	K := "scenario.aquifer.hydraulic_conductivity"
	runEndpointCases(t, ts, "/v1/uncertainty", uncertaintyMap, []endpointCase{
		{class: "malformed/truncated", raw: `{"scenario": {`, status: 400},
		{class: "malformed/bare NaN", raw: `{"scenario": {"aquifer": {"seepage_velocity": NaN}}}`, status: 400},
		{class: "type/string realizations", edits: map[string]any{"realizations": "1000"}, status: 400, field: "realizations"},
		{class: "type/scenario string", edits: map[string]any{"scenario": "demo"}, status: 400, field: "scenario"},
		{class: "type/string p95", edits: map[string]any{K + ".p95": "25"}, status: 400, field: K + ".p95"},
		{class: "type/string in scenario", edits: map[string]any{"scenario.source.concentration": "12"}, status: 400, field: "scenario.source.concentration"},
		{class: "nan/string NaN p05", edits: map[string]any{K + ".p05": "NaN"}, status: 400, field: K + ".p05"},
		{class: "nan/string Infinity", edits: map[string]any{"scenario.source.width": "Infinity"}, status: 400, field: "scenario.source.width"},
		{class: "missing/scenario", edits: map[string]any{"scenario": deleteMarker}, status: 422, field: "scenario"},
		{class: "missing/p95", edits: map[string]any{K + ".p95": deleteMarker}, status: 422, field: K + ".p95"},
		{class: "missing/receptors", edits: map[string]any{"scenario.receptors": deleteMarker}, status: 422, field: "scenario.receptors"},
		{class: "range/zero realizations", edits: map[string]any{"realizations": 0}, status: 422, field: "realizations"},
		{class: "range/negative seed", edits: map[string]any{"seed": -1}, status: 422, field: "seed"},
		{class: "range/p95 below p05", edits: map[string]any{K + ".p95": 1}, status: 422, field: K + ".p95"},
		{class: "range/negative p05", edits: map[string]any{K + ".p05": -3}, status: 422, field: K + ".p05"},
		{class: "range/unknown distribution", edits: map[string]any{K + ".distribution": "gamma"}, status: 422, field: K + ".distribution"},
		{class: "range/porosity beyond 1", edits: map[string]any{"scenario.aquifer.effective_porosity": map[string]any{"distribution": "uniform", "min": 0.2, "max": 1.4}}, status: 422, field: "scenario.aquifer.effective_porosity"},
		{class: "range/zero concentration", edits: map[string]any{"scenario.source.concentration": 0}, status: 422, field: "scenario.source.concentration"},
		{class: "range/unknown method", edits: map[string]any{"methods": []any{"magic"}}, status: 422, field: "methods[0]"},
		{class: "range/unknown field", edits: map[string]any{"samples": 3}, status: 422, field: "samples"},
		{class: "huge/realizations", edits: map[string]any{"realizations": 20001}, status: 413, field: "realizations"},
		{class: "huge/numeric", edits: map[string]any{"methods": []any{"numeric"}, "realizations": 21}, status: 413, field: "realizations"},
		{class: "huge/receptors", edits: map[string]any{"scenario.receptors": manyReceptors(10_001)}, status: 413, field: "scenario.receptors"},
		{class: "huge/empirical values", edits: map[string]any{K: map[string]any{"distribution": "empirical", "values": manyTimes(10_001)}}, status: 422, field: K + ".values"},
		{class: "huge/workload", edits: map[string]any{"realizations": 20000, "scenario.times": manyTimes(200)}, status: 413, field: "realizations"},
	})
}

// /v1/screenings still refuses a distribution object, naming the field.
func TestScreeningsRefuseDistributions(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	set(m, "aquifer.hydraulic_conductivity", map[string]any{"distribution": "lognormal", "p05": 3, "p95": 25})
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil), 400)
	if !hasField(p, "aquifer.hydraulic_conductivity") {
		t.Errorf("errors %+v", p.Errors)
	}
}

// The new schemas match the Go types field for field.
func TestUncertaintySchemasMatchGoTypes(t *testing.T) {
	spec, err := openapi.Load()
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		typ  reflect.Type
	}{
		{"UncertaintyResult", reflect.TypeFor[uncertainty.UncertaintyResult]()},
		{"UncertaintyFeatureCollection", reflect.TypeFor[uncertaintyFeatureCollection]()},
		{"Observation", reflect.TypeFor[fit.Observation]()},
		{"AttenuationResult", reflect.TypeFor[fit.AttenuationResult]()},
		{"CalibrationResult", reflect.TypeFor[fit.CalibrationResult]()},
		{"FittedValue", reflect.TypeFor[fit.FittedValue]()},
	} {
		ref := spec.Doc.Components.Schemas[c.name]
		if ref == nil || ref.Value == nil {
			t.Fatalf("schema %s missing", c.name)
		}
		compareStruct(t, c.name, c.typ, ref.Value)
	}
}

// BenchmarkUncertaintyHTTP: the demo (6 receptors, 4 times) with three
// uncertain parameters, 1,000 realizations, exact, through the whole handler.
func BenchmarkUncertaintyHTTP(b *testing.B) {
	ts := newTestServer(b, Config{})
	m := uncertaintyMap(b)
	m["realizations"] = 1000
	body := mustJSON(b, m)
	for b.Loop() {
		rec := ts.call(b, http.MethodPost, "/v1/uncertainty", body, nil)
		if rec.Code != 200 {
			b.Fatal(rec.Body.String())
		}
	}
	_ = context.Background
}
