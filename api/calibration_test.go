package api

import (
	"context"
	"encoding/json"
	"net/http"
	"testing"

	"downgradient/plume"
	"downgradient/plume/fit"
)

// monitoringRounds samples the demo scenario's exact solution at its six
// point receptors at 1825 and 3650 d (invented data): the upgradient well, where
// the model gives 0, becomes a non-detect at 0.001 mg/L.
func monitoringRounds(t testing.TB) []any {
	t.Helper()
	var sc plume.Scenario // the demo's description member is ignored
	if err := json.Unmarshal(demoBody(t), &sc); err != nil {
		t.Fatal(err)
	}
	sc.Times = []float64{1825, 3650}
	sc.Methods = []string{"exact"}
	res, err := plume.Screen(context.Background(), sc, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var obs []any
	for i, rr := range res.Receptors {
		r := sc.Receptors[i]
		if rr.ScreenTop != nil {
			continue // a screen average is not a point sample
		}
		for _, sp := range rr.Series {
			o := map[string]any{"well_id": rr.ID, "x": *r.X, "y": *r.Y, "z": rr.Z, "time": sp.Time}
			if c := *sp.Exact; c > 1e-6 {
				o["concentration"] = c
			} else {
				o["detected"], o["detection_limit"] = false, 0.001
			}
			obs = append(obs, o)
		}
	}
	return obs
}

func calibrationMap(t testing.TB) map[string]any {
	t.Helper()
	sc := demoMap(t)
	set(sc, "source.concentration", 5)
	set(sc, "contaminant.half_life", 300)
	return map[string]any{"scenario": sc, "observations": monitoringRounds(t), "fit": []any{"source.concentration", "contaminant.half_life"}}
}

func attenuationMap(t testing.TB) map[string]any {
	t.Helper()
	sc := demoMap(t)
	delete(sc, "receptors")
	return map[string]any{"scenario": sc, "observations": monitoringRounds(t), "time": 3650}
}

// A calibration end to end recovers the demo's values from its own exact
// solution (noise-free: the optimum is the truth) and recomputes the screening.
func TestCalibrationsEndToEnd(t *testing.T) {
	ts := newTestServer(t, Config{})
	rec := ts.call(t, http.MethodPost, "/v1/calibrations", mustJSON(t, calibrationMap(t)), nil)
	if rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	var res fit.CalibrationResult
	if err := json.Unmarshal(rec.Body.Bytes(), &res); err != nil {
		t.Fatal(err)
	}
	for p, want := range map[string]float64{"source.concentration": 12, "contaminant.half_life": 720} {
		if got := res.Fitted[p].Value; got < want*0.999 || got > want*1.001 {
			t.Errorf("%s = %g, want %g", p, got, want)
		}
	}
	if res.Screening == nil || len(res.Screening.Receptors) != 6 || len(res.Residuals) != 10 {
		t.Errorf("screening %v, %d residuals", res.Screening != nil, len(res.Residuals))
	}
}

// Attenuation end to end; the scenario's receptors may be omitted.
func TestAttenuationEndToEnd(t *testing.T) {
	ts := newTestServer(t, Config{})
	rec := ts.call(t, http.MethodPost, "/v1/attenuation", mustJSON(t, attenuationMap(t)), nil)
	if rec.Code != 200 {
		t.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	var res fit.AttenuationResult
	if err := json.Unmarshal(rec.Body.Bytes(), &res); err != nil {
		t.Fatal(err)
	}
	if !(res.BulkAttenuationRate > 0) || res.BiodegradationRate == nil || len(res.WellsUsed) < 3 {
		t.Errorf("result %+v", res)
	}
}

// Bad input of every class against POST /v1/calibrations.
func TestCalibrationsBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	runEndpointCases(t, ts, "/v1/calibrations", calibrationMap, []endpointCase{
		{class: "malformed/truncated", raw: `{"scenario": {}, "observations": [`, status: 400},
		{class: "malformed/bare Infinity", raw: `{"fit": [Infinity]}`, status: 400},
		{class: "type/fit string", edits: map[string]any{"fit": "source.concentration"}, status: 400, field: "fit"},
		{class: "type/observation x string", edits: map[string]any{"observations.0.x": "1287"}, status: 400, field: "observations[0].x"},
		{class: "type/detected number", edits: map[string]any{"observations.1.detected": 0}, status: 400, field: "observations[1].detected"},
		{class: "nan/string NaN concentration", edits: map[string]any{"observations.0.concentration": "NaN"}, status: 400, field: "observations[0].concentration"},
		{class: "nan/string Infinity in scenario", edits: map[string]any{"scenario.aquifer.effective_porosity": "Infinity"}, status: 400, field: "scenario.aquifer.effective_porosity"},
		{class: "missing/fit", edits: map[string]any{"fit": deleteMarker}, status: 422, field: "fit"},
		{class: "missing/observations", edits: map[string]any{"observations": deleteMarker}, status: 422, field: "observations"},
		{class: "missing/time", edits: map[string]any{"observations.0.time": deleteMarker}, status: 422, field: "observations[0].time"},
		{class: "missing/detection limit", edits: map[string]any{"observations.0.detected": false}, status: 422, field: "observations[0].detection_limit"},
		{class: "missing/scenario source", edits: map[string]any{"scenario.source": deleteMarker}, status: 422, field: "scenario.source"},
		{class: "range/zero concentration", edits: map[string]any{"observations.0.concentration": 0}, status: 422, field: "observations[0].concentration"},
		{class: "range/negative time", edits: map[string]any{"observations.0.time": -1}, status: 422, field: "observations[0].time"},
		{class: "range/unknown parameter", edits: map[string]any{"fit": []any{"aquifer.bulk_density"}}, status: 422, field: "fit[0]"},
		{class: "range/bad bounds", edits: map[string]any{"bounds": map[string]any{"source.concentration": []any{10, 1}}}, status: 422, field: "bounds.source.concentration"},
		{class: "range/negative half-life", edits: map[string]any{"scenario.contaminant.half_life": -720}, status: 422, field: "scenario.contaminant.half_life"},
		{class: "range/under-determined", edits: map[string]any{"observations": monitoringRoundsFirst(t, 2)}, status: 422, field: "observations"},
		{class: "huge/observations", edits: map[string]any{"observations": manyObservations(10_001)}, status: 413, field: "observations"},
	})
}

// Bad input of every class against POST /v1/attenuation.
func TestAttenuationBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	runEndpointCases(t, ts, "/v1/attenuation", attenuationMap, []endpointCase{
		{class: "malformed/truncated", raw: `{"scenario": `, status: 400},
		{class: "malformed/single quotes", raw: `{'scenario': {}}`, status: 400},
		{class: "type/time string", edits: map[string]any{"time": "3650"}, status: 400, field: "time"},
		{class: "type/observations object", edits: map[string]any{"observations": map[string]any{}}, status: 400, field: "observations"},
		{class: "nan/string NaN y", edits: map[string]any{"observations.2.y": "NaN"}, status: 400, field: "observations[2].y"},
		{class: "missing/scenario", edits: map[string]any{"scenario": deleteMarker}, status: 422, field: "scenario"},
		{class: "missing/x", edits: map[string]any{"observations.0.x": deleteMarker}, status: 422, field: "observations[0].x"},
		{class: "missing/no observations", edits: map[string]any{"observations": []any{}}, status: 422, field: "observations"},
		{class: "range/negative time", edits: map[string]any{"time": -5}, status: 422, field: "time"},
		{class: "range/zero porosity", edits: map[string]any{"scenario.aquifer.effective_porosity": 0}, status: 422, field: "scenario.aquifer.effective_porosity"},
		{class: "range/negative detection limit", edits: map[string]any{"observations.0.detected": false, "observations.0.detection_limit": -1}, status: 422, field: "observations[0].detection_limit"},
		{class: "range/no round at that time", edits: map[string]any{"time": 999}, status: 422, field: "observations"},
		{class: "range/unknown field", edits: map[string]any{"observations.0.depth": 3}, status: 422, field: "observations[0].depth"},
		{class: "huge/observations", edits: map[string]any{"observations": manyObservations(10_001)}, status: 413, field: "observations"},
	})
}

func monitoringRoundsFirst(t testing.TB, n int) []any {
	obs := monitoringRounds(t)
	return obs[:n]
}

func manyObservations(n int) []any {
	out := make([]any, n)
	for i := range out {
		out[i] = map[string]any{"x": float64(i), "y": 0, "time": 1, "concentration": 1}
	}
	return out
}

// BenchmarkCalibrationHTTP: two parameters fitted to the demo's 12
// observations through the whole handler, including the recomputed screening.
func BenchmarkCalibrationHTTP(b *testing.B) {
	ts := newTestServer(b, Config{})
	body := mustJSON(b, calibrationMap(b))
	for b.Loop() {
		if rec := ts.call(b, http.MethodPost, "/v1/calibrations", body, nil); rec.Code != 200 {
			b.Fatal(rec.Body.String())
		}
	}
}
