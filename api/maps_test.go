package api

import (
	"encoding/csv"
	"encoding/json"
	"net/http"
	"strings"
	"testing"
)

// mapRequest wraps the demo scenario in a plume-map body with extra fields.
func mapRequest(t testing.TB, extra map[string]any) map[string]any {
	t.Helper()
	m := map[string]any{"scenario": demoMap(t)}
	for k, v := range extra {
		m[k] = v
	}
	return m
}

// POST /v1/plume-maps in its three representations; every response is
// validated against the OpenAPI document by ts.call.
func TestPlumeMapsFormats(t *testing.T) {
	ts := newTestServer(t, Config{})
	body := mustJSON(t, mapRequest(t, map[string]any{"cells": 5000}))

	rec := ts.call(t, http.MethodPost, "/v1/plume-maps", body, nil)
	if rec.Code != 200 || rec.Header().Get("Content-Type") != mimeGeoJSON {
		t.Fatalf("geojson: %d %s %.300s", rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
	}
	var fc struct {
		Type     string `json:"type"`
		Features []struct {
			Geometry struct {
				Type        string          `json:"type"`
				Coordinates [][][][]float64 `json:"coordinates"`
			} `json:"geometry"`
			Properties map[string]float64 `json:"properties"`
		} `json:"features"`
		Grid              gridInfo `json:"grid"`
		SteadyPlumeLength struct {
			Length *float64 `json:"length"`
		} `json:"steady_plume_length"`
	}
	if err := json.Unmarshal(rec.Body.Bytes(), &fc); err != nil {
		t.Fatal(err)
	}
	if len(fc.Features) != 3 || fc.Features[0].Properties["level"] != 0.005 || fc.Features[0].Geometry.Type != "MultiPolygon" {
		t.Fatalf("features: %+v", fc.Features)
	}
	if fc.SteadyPlumeLength.Length == nil || *fc.SteadyPlumeLength.Length < 400 || fc.Grid.NX*fc.Grid.NY > 5000 {
		t.Errorf("plume length %v, grid %+v", fc.SteadyPlumeLength.Length, fc.Grid)
	}
	ring := fc.Features[0].Geometry.Coordinates[0][0]
	if ring[0][0] != ring[len(ring)-1][0] || ring[0][1] != ring[len(ring)-1][1] {
		t.Error("ring not closed")
	}

	rec = ts.call(t, http.MethodPost, "/v1/plume-maps?format=grid", body, nil)
	var gd gridDoc
	if err := json.Unmarshal(rec.Body.Bytes(), &gd); err != nil || rec.Code != 200 {
		t.Fatalf("grid: %d %v", rec.Code, err)
	}
	if len(gd.Values) != gd.NY || len(gd.Values[0]) != gd.NX || gd.Axes != [2]string{"x", "y"} {
		t.Errorf("grid %d x %d with %d rows", gd.NX, gd.NY, len(gd.Values))
	}

	for _, hdr := range []map[string]string{nil, {"Accept": "text/csv"}} {
		target := "/v1/plume-maps?format=csv"
		if hdr != nil {
			target = "/v1/plume-maps"
		}
		rec = ts.call(t, http.MethodPost, target, body, hdr)
		rows, err := csv.NewReader(strings.NewReader(rec.Body.String())).ReadAll()
		if err != nil || rec.Code != 200 {
			t.Fatalf("csv: %d %v", rec.Code, err)
		}
		if strings.Join(rows[0], ",") != "x_m,y_m,concentration_mg_per_L" || len(rows) != gd.NX*gd.NY+1 {
			t.Errorf("csv header %v, %d rows", rows[0], len(rows))
		}
	}

	// A section along the centreline at a time, with explicit levels.
	sec := mustJSON(t, mapRequest(t, map[string]any{"view": "section", "time": 3650, "levels": []any{0.01, 1}, "cells": 3000}))
	rec = ts.call(t, http.MethodPost, "/v1/plume-maps?format=grid", sec, nil)
	if err := json.Unmarshal(rec.Body.Bytes(), &gd); err != nil || rec.Code != 200 {
		t.Fatalf("section: %d %v", rec.Code, err)
	}
	if gd.Axes != [2]string{"plume_x", "depth"} || gd.Origin[1] != 0 || gd.View != "section" {
		t.Errorf("section grid %+v", gd.Axes)
	}
	// Not acceptable.
	rec = ts.call(t, http.MethodPost, "/v1/plume-maps", body, map[string]string{"Accept": "image/png"})
	problemOf(t, rec, http.StatusNotAcceptable)
}

// Bad input of the classes of DESIGN.md section 6 plus the map's own
// limits: status, problem+json and the named field.
func TestPlumeMapsBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	levels21 := make([]any, 21)
	for i := range levels21 {
		levels21[i] = 0.01 * float64(i+1)
	}
	cases := []struct {
		name   string
		raw    string
		extra  map[string]any
		edit   func(m map[string]any)
		status int
		field  string
	}{
		{name: "malformed JSON", raw: `{"scenario": {`, status: 400, field: ""},
		{name: "grid too large", extra: map[string]any{"cells": 300_000}, status: 413, field: "cells"},
		{name: "spacing too fine", extra: map[string]any{"spacing": 0.01}, status: 413, field: "spacing"},
		{name: "too many levels", extra: map[string]any{"levels": levels21}, status: 413, field: "levels"},
		{name: "level zero", extra: map[string]any{"levels": []any{0.005, 0}}, status: 422, field: "levels[1]"},
		{name: "level negative", extra: map[string]any{"levels": []any{-0.005}}, status: 422, field: "levels[0]"},
		{name: "negative time", extra: map[string]any{"time": -1}, status: 422, field: "time"},
		{name: "time not steady", extra: map[string]any{"time": "soon"}, status: 422, field: "time"},
		{name: "negative depth", extra: map[string]any{"depth": -2}, status: 422, field: "depth"},
		{name: "depth interval upside down", extra: map[string]any{"depth": 5, "depth_bottom": 2}, status: 422, field: "depth_bottom"},
		{name: "unknown view", extra: map[string]any{"view": "oblique"}, status: 422, field: "view"},
		{name: "unknown field", extra: map[string]any{"resolution": 5}, status: 422, field: "resolution"},
		{name: "wrong type", extra: map[string]any{"cells": "many"}, status: 400, field: "cells"},
		{name: "NaN string", extra: map[string]any{"depth": "NaN"}, status: 400, field: "depth"},
		{name: "extent inverted", extra: map[string]any{"extent": map[string]any{"x_min": 10, "x_max": 0, "y_min": 0, "y_max": 5}}, status: 422, field: "extent.x_max"},
		{name: "missing scenario", raw: `{"time": "steady"}`, status: 422, field: "scenario"},
		{name: "scenario zero porosity", edit: func(m map[string]any) { set(m, "scenario.aquifer.effective_porosity", 0) }, status: 422, field: "scenario.aquifer.effective_porosity"},
		{name: "no level known", edit: func(m map[string]any) {
			set(m, "scenario.contaminant", map[string]any{"name": "unobtainium", "koc": 10, "half_life": 720})
		}, status: 422, field: "levels"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var body []byte
			if tc.raw != "" {
				body = []byte(tc.raw)
			} else {
				m := mapRequest(t, tc.extra)
				if tc.edit != nil {
					tc.edit(m)
				}
				body = mustJSON(t, m)
			}
			rec := ts.call(t, http.MethodPost, "/v1/plume-maps", body, nil)
			p := problemOf(t, rec, tc.status)
			if tc.field != "" && !hasField(p, tc.field) {
				t.Errorf("problem does not name %q: %+v", tc.field, p.Errors)
			}
		})
	}
}

// Issue 12, item 6: the extent of the issue (-1e308..1e308 in x and y)
// answers 422 naming the extent in every format. Before, it answered 500
// "could not be encoded" (GeoJSON, grid) and 200 with NaN rows (CSV).
func TestPlumeMapsHugeExtent(t *testing.T) {
	ts := newTestServer(t, Config{})
	body := mustJSON(t, map[string]any{"scenario": demoMap(t), "time": 3650,
		"extent": map[string]any{"x_min": -1e308, "x_max": 1e308, "y_min": -1e308, "y_max": 1e308}})
	for _, format := range []string{"geojson", "grid", "csv"} {
		rec := ts.call(t, http.MethodPost, "/v1/plume-maps?format="+format, body, nil)
		p := problemOf(t, rec, http.StatusUnprocessableEntity)
		if !hasField(p, "extent.x_max") || !hasField(p, "extent.y_max") {
			t.Errorf("%s: %+v", format, p)
		}
	}
}
