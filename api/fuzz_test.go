package api

import (
	"bytes"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"sync"
	"testing"
	"time"
)

// Fuzz targets of request decoding and validation, one per endpoint. Each
// sends the fuzzed body (or query) through the whole handler and checks:
// no 500 and no status outside the documented ones; every error is a
// well-formed problem+json whose status matches; every answer matches the
// OpenAPI document (ts.call validates the response). Seeds are the f.Add
// calls below plus testdata/fuzz/FuzzXxx; run one longer with
//
//	go test ./api -run XXX -fuzz FuzzScreenings -fuzztime 5m
//
// The server is configured small (short deadline, small budgets) so that
// each input runs in milliseconds; 503 at the deadline is a documented answer.

// fuzzConfig keeps every fuzz input cheap.
var fuzzConfig = Config{RequestTimeout: 2 * time.Second, MaxEvaluations: 20_000, CellBudget: 20_000}

var (
	fuzzOnce sync.Once
	fuzzTS   *testServer
)

// fuzzServer is one handler shared by every input of a fuzz run.
func fuzzServer(t testing.TB) *testServer {
	fuzzOnce.Do(func() { fuzzTS = newTestServer(t, fuzzConfig) })
	return fuzzTS
}

// fuzzAccepts are the Accept headers a fuzz input picks from.
var fuzzAccepts = []string{"", "application/json", "text/csv", "application/geo+json", "text/html", "image/svg+xml", "*/*", "application/xml"}

// documentedStatus are the statuses the OpenAPI document allows a request.
var documentedStatus = map[int]bool{200: true, 400: true, 406: true, 413: true, 415: true, 422: true, 503: true}

// checkFuzzResponse fails on a 500, an undocumented status or a broken problem.
func checkFuzzResponse(t *testing.T, rec *httptest.ResponseRecorder, what string) {
	t.Helper()
	if !documentedStatus[rec.Code] {
		t.Fatalf("%s: status %d: %.1000s", what, rec.Code, rec.Body.String())
	}
	if rec.Code == 200 {
		return
	}
	if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "application/problem+json") {
		t.Fatalf("%s: %d with Content-Type %q", what, rec.Code, ct)
	}
	var p Problem
	if err := json.Unmarshal(rec.Body.Bytes(), &p); err != nil {
		t.Fatalf("%s: problem body does not decode: %v: %.500s", what, err, rec.Body.String())
	}
	if p.Status != rec.Code || p.Type == "" || p.Title == "" || p.Detail == "" {
		t.Fatalf("%s: incomplete problem %+v", what, p)
	}
	if rec.Code == 503 && rec.Header().Get("Retry-After") == "" {
		t.Fatalf("%s: 503 without Retry-After", what)
	}
}

// fuzzCall is ts.call, validating the response against the document only
// for the JSON media types and text/plain (the validator has no decoder
// for HTML and SVG; those are checked by the endpoints' own tests).
func fuzzCall(t *testing.T, ts *testServer, method, target string, body []byte, header map[string]string) *httptest.ResponseRecorder {
	t.Helper()
	req := httptest.NewRequest(method, target, bytes.NewReader(body))
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	for k, v := range header {
		if v != "" {
			req.Header.Set(k, v)
		}
	}
	rec := httptest.NewRecorder()
	ts.e.ServeHTTP(rec, req)
	ct := rec.Header().Get("Content-Type")
	if strings.Contains(ct, "json") || strings.HasPrefix(ct, "text/plain") || strings.HasPrefix(ct, "text/csv") {
		ts.validateResponse(t, method, req, rec)
	}
	return rec
}

// fuzzPost is the body of every POST fuzz target.
func fuzzPost(f *testing.F, target string, seeds ...[]byte) {
	for _, s := range seeds {
		for i := range uint8(3) {
			f.Add(s, i)
		}
	}
	f.Add([]byte(`{`), uint8(0))
	f.Add([]byte(`null`), uint8(0))
	f.Add([]byte(`{"scenario": {"receptors": [{"x": 1e999}]}}`), uint8(0))
	f.Fuzz(func(t *testing.T, body []byte, accept uint8) {
		ts := fuzzServer(t)
		hdr := map[string]string{"Accept": fuzzAccepts[int(accept)%len(fuzzAccepts)]}
		rec := fuzzCall(t, ts, http.MethodPost, target, body, hdr)
		checkFuzzResponse(t, rec, "POST "+target)
	})
}

// fuzzDemo is the demo scenario (invented data, testdata/demo) as a tree.
func fuzzDemo(f *testing.F) map[string]any { return demoMap(f) }

func FuzzScreenings(f *testing.F) {
	small := fuzzDemo(f)
	small["methods"] = []any{"exact", "numeric"}
	small["times"] = []any{100}
	fuzzPost(f, "/v1/screenings", demoBody(f), mustJSON(f, small))
}

func FuzzUncertainty(f *testing.F) {
	sc := fuzzDemo(f)
	set(sc, "aquifer.hydraulic_conductivity", map[string]any{"distribution": "lognormal", "p05": 2, "p95": 20})
	fuzzPost(f, "/v1/uncertainty", mustJSON(f, map[string]any{"scenario": sc, "realizations": 50, "seed": 7}))
}

func FuzzPlumeMaps(f *testing.F) {
	fuzzPost(f, "/v1/plume-maps", mustJSON(f, map[string]any{"scenario": fuzzDemo(f), "time": 3650, "levels": []any{0.005}, "cells": 400}))
}

func FuzzAttenuation(f *testing.F) { fuzzPost(f, "/v1/attenuation", mustJSON(f, attenuationMap(f))) }

func FuzzCalibrations(f *testing.F) { fuzzPost(f, "/v1/calibrations", mustJSON(f, calibrationMap(f))) }

func FuzzReports(f *testing.F) { fuzzPost(f, "/v1/reports", demoBody(f)) }

func FuzzPlots(f *testing.F) { fuzzPost(f, "/v1/plots?kind=breakthrough", demoBody(f)) }

// FuzzConcentration fuzzes the query string of GET /v1/concentration.
func FuzzConcentration(f *testing.F) {
	f.Add("aquifer.seepage_velocity=0.3&aquifer.dispersivity.longitudinal=10&source.concentration=12&receptor.x=210&receptor.y=6&time=3650")
	f.Add("aquifer.seepage_velocity=0.3&aquifer.dispersivity.longitudinal=10&source.concentration=12&source.width=15&source.depth=3&receptor.x=210&receptor.y=6&receptor.z=2&time=steady&method=domenico")
	f.Add("aquifer.seepage_velocity=NaN&receptor.x=1e999&time=-1")
	f.Add("time=steady&time=1&receptor.x=%zz")
	f.Fuzz(func(t *testing.T, query string) {
		ts := fuzzServer(t)
		target := "/v1/concentration?" + query
		if _, err := url.ParseRequestURI(target); err != nil || strings.ContainsAny(query, " \t\r\n#") {
			return // not a request line a client could send
		}
		rec := fuzzCall(t, ts, http.MethodGet, target, nil, nil)
		checkFuzzResponse(t, rec, "GET "+target)
		if rec.Code == 200 && strings.ContainsAny(rec.Body.String(), "NnIi") {
			t.Fatalf("non-finite answer %q", rec.Body.String())
		}
	})
}
