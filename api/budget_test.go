package api

import (
	"bytes"
	"compress/gzip"
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"downgradient/plume"
	"downgradient/plume/maps"
)

// bigScenario is the demo scenario with n receptors, nt times and the
// given methods.
func bigScenario(t testing.TB, n, nt int, methods ...any) map[string]any {
	m := demoMap(t)
	m["receptors"] = manyReceptors(n)
	m["times"] = manyTimes(nt)
	m["methods"] = methods
	return m
}

// Issue 12, item 2: the output budget is known before the work starts. The
// requests of the issue (an uncertainty run of 1 realization for 10,000
// receptors and 199 times, 574 MB of JSON; the same screening as CSV, 262
// MB) answer 413 naming what to reduce, at once, without any engine call.
// Before, they ran and wrote hundreds of MB.
func TestOutputBudgetKnownBeforeWork(t *testing.T) {
	var calls atomic.Int64
	setHook(t, &testHookCompute, func(context.Context) { calls.Add(1) })
	issue := bigScenario(t, 10_000, 199, "domenico")
	small := bigScenario(t, 200, 40, "exact") // about 1 MB of JSON
	cases := []struct {
		name   string
		cfg    Config
		target string
		body   []byte
		fields []string
	}{
		{"uncertainty, 10,000 receptors x 199 times", Config{}, "/v1/uncertainty",
			mustJSON(t, map[string]any{"scenario": issue, "realizations": 1, "methods": []any{"domenico"}}), []string{"scenario.receptors", "scenario.times"}},
		{"screening CSV, 10,000 receptors x 199 times", Config{}, "/v1/screenings?format=csv", mustJSON(t, issue), []string{"receptors", "times"}},
		{"screening JSON over a 256 KiB budget", Config{MaxOutputBytes: 256 << 10}, "/v1/screenings", mustJSON(t, small), []string{"receptors", "times"}},
		{"uncertainty CSV over a 256 KiB budget", Config{MaxOutputBytes: 256 << 10}, "/v1/uncertainty?format=csv",
			mustJSON(t, map[string]any{"scenario": small, "realizations": 2}), []string{"scenario.receptors", "scenario.times"}},
		{"plume-map CSV over a 256 KiB budget", Config{MaxOutputBytes: 256 << 10}, "/v1/plume-maps?format=csv",
			mustJSON(t, map[string]any{"scenario": demoMap(t), "time": 3650, "cells": 20_000}), []string{"cells"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ts := newTestServer(t, tc.cfg)
			calls.Store(0)
			start := time.Now()
			rec := ts.call(t, http.MethodPost, tc.target, tc.body, nil)
			p := problemOf(t, rec, http.StatusRequestEntityTooLarge)
			for _, f := range tc.fields {
				if !hasField(p, f) {
					t.Errorf("the problem does not name %q: %+v", f, p)
				}
			}
			if n := calls.Load(); n != 0 {
				t.Errorf("%d engine calls before the 413", n)
			}
			t.Logf("413 after %v: %s", time.Since(start).Round(time.Millisecond), p.Detail)
		})
	}
}

// Issue 12, item 2: encoding runs under the request's deadline: an
// encoding that would end after the deadline is answered 503 at the
// deadline. Before, the result was encoded after the computation's
// deadline, and one answer of the issue arrived at 34.9 s.
func TestEncodingUnderDeadline(t *testing.T) {
	const deadline = 300 * time.Millisecond
	setHook(t, &testHookEncode, func(ctx context.Context) {
		select { // an encoding that takes 10 deadlines
		case <-time.After(10 * deadline):
		case <-ctx.Done():
		}
	})
	ts := newTestServer(t, Config{RequestTimeout: deadline})
	for _, target := range []string{"/v1/screenings", "/v1/screenings?format=csv", "/v1/screenings?format=geojson"} {
		start := time.Now()
		rec := ts.call(t, http.MethodPost, target, demoBody(t), nil)
		took := time.Since(start)
		p := problemOf(t, rec, http.StatusServiceUnavailable)
		if p.Type != "/problems/deadline-exceeded" || took > deadline+time.Second {
			t.Errorf("%s: %s after %v with a deadline of %v", target, p.Type, took, deadline)
		}
	}
}

// Issue 12, items 3 and 4: one deadline per request, set when it arrives,
// for everything it does: the report and the plots run their screening and
// their figures under the same deadline (before, each of the two stages
// started a fresh one, so a report could run for twice the deadline).
func TestOneDeadlinePerRequest(t *testing.T) {
	const timeout = 20 * time.Second
	var mu sync.Mutex
	var deadlines []time.Time
	setHook(t, &testHookCompute, func(ctx context.Context) {
		d, _ := ctx.Deadline()
		mu.Lock()
		deadlines = append(deadlines, d)
		mu.Unlock()
		time.Sleep(5 * time.Millisecond) // a later fresh deadline would differ
	})
	ts := newTestServer(t, Config{RequestTimeout: timeout})
	for _, target := range []string{"/v1/reports", "/v1/plots?kind=map", "/v1/plots?kind=breakthrough", "/v1/screenings"} {
		mu.Lock()
		deadlines = nil
		mu.Unlock()
		before := time.Now()
		req := httptest.NewRequest(http.MethodPost, target, bytes.NewReader(demoBody(t)))
		req.Header.Set("Content-Type", "application/json")
		rec := httptest.NewRecorder()
		ts.e.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			t.Fatalf("%s: %d %.300s", target, rec.Code, rec.Body.String())
		}
		mu.Lock()
		got := append([]time.Time(nil), deadlines...)
		mu.Unlock()
		if len(got) == 0 {
			t.Fatalf("%s: no engine call", target)
		}
		for _, d := range got {
			if !d.Equal(got[0]) || d.Before(before.Add(timeout)) || d.After(before.Add(timeout+time.Second)) {
				t.Errorf("%s: engine deadlines %v, want one, the request's arrival + %v (%v)", target, got, timeout, before.Add(timeout))
				break
			}
		}
	}
}

// The output estimates bound the encoded answers from above (so the 413
// is never too late) and are within a small factor of them for large
// answers (so it is not needlessly early). Shapes: long ids that need
// escaping, many receptors and times, every format and route.
func TestOutputEstimatesBound(t *testing.T) {
	ts := newTestServer(t, Config{})
	long := bigScenario(t, 120, 30, "exact", "domenico")
	for i, r := range long["receptors"].([]any) {
		r.(map[string]any)["id"] = fmt.Sprintf(`well "%d" \ north & <east> %s`, i, strings.Repeat("é", i%7))
	}
	unc := bigScenario(t, 60, 25, "exact", "domenico")
	set(unc, "aquifer.hydraulic_conductivity", map[string]any{"distribution": "lognormal", "p05": 3, "p95": 25})
	set(unc, "contaminant.half_life", map[string]any{"distribution": "uniform", "min": 300, "max": 900})
	type tcase struct {
		name     string
		target   string
		body     []byte
		estimate func() float64
		large    bool // large enough that the estimate should be tight
	}
	scen := func(m map[string]any) plume.Scenario {
		sc, p := decodeScenario(mustJSON(t, m))
		if p != nil {
			t.Fatal(p)
		}
		return sc
	}
	var cases []tcase
	dry := func(n, nt int) map[string]any {
		b, err := os.ReadFile("../testdata/demo/dry-cleaner.json")
		if err != nil {
			t.Fatal(err)
		}
		var m map[string]any
		if err := json.Unmarshal(b, &m); err != nil {
			t.Fatal(err)
		}
		if n > 0 {
			m["receptors"], m["times"] = manyReceptors(n), manyTimes(nt)
		}
		m["methods"] = []any{"exact", "domenico"} // the coupled numeric chain takes minutes under -race
		return m
	}
	for _, m := range []map[string]any{demoMap(t), long, bigScenario(t, 400, 60, "exact"), dry(0, 0), dry(100, 20)} {
		sc := scen(m)
		// Compounds without closed forms give fewer rows than the bound
		// (every method for every compound) counts.
		large := len(sc.Receptors) >= 100 && len(sc.Contaminants) == 0
		for _, f := range []outputFormat{formatJSON, formatCSV, formatGeoJSON} {
			cases = append(cases, tcase{fmt.Sprintf("screening %d x %d as %s", len(sc.Receptors), len(sc.Times), formatName[f]),
				"/v1/screenings?format=" + map[outputFormat]string{formatJSON: "json", formatCSV: "csv", formatGeoJSON: "geojson"}[f],
				mustJSON(t, m), func() float64 { return screeningSize(sc, f) }, large})
		}
	}
	uncTemplate := scen(func() map[string]any {
		m := demoMap(t)
		m["receptors"], m["times"] = unc["receptors"], unc["times"]
		return m
	}())
	for _, f := range []outputFormat{formatJSON, formatCSV, formatGeoJSON} {
		cases = append(cases, tcase{"uncertainty 60 x 25 as " + formatName[f],
			"/v1/uncertainty?format=" + map[outputFormat]string{formatJSON: "json", formatCSV: "csv", formatGeoJSON: "geojson"}[f],
			mustJSON(t, map[string]any{"scenario": unc, "realizations": 20, "methods": []any{"exact", "domenico"}}),
			func() float64 { return uncertaintySize(uncTemplate, 2, 2, f) }, true})
	}
	for _, f := range []string{"grid", "csv", "geojson"} {
		cells := 5000
		cases = append(cases, tcase{"plume map as " + f, "/v1/plume-maps?format=" + f,
			mustJSON(t, map[string]any{"scenario": demoMap(t), "time": 3650, "cells": cells}),
			func() float64 { return mapSize(maps.MapOptions{Cells: &cells}, f) }, false})
	}
	cases = append(cases, tcase{"attenuation", "/v1/attenuation", mustJSON(t, attenuationMap(t)),
		func() float64 { return fitSize(len(attenuationMap(t)["observations"].([]any)), nil, nil) }, false})
	calib := mustJSON(t, calibrationMap(t))
	cases = append(cases, tcase{"calibration", "/v1/calibrations", calib, func() float64 {
		m := calibrationMap(t)
		tree := m["scenario"].(map[string]any)
		if _, ok := tree["receptors"]; !ok {
			t.Skip("calibration body without receptors")
		}
		sc := scen(tree)
		return fitSize(len(m["observations"].([]any)), calib, &sc)
	}, false})
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rec := ts.call(t, http.MethodPost, tc.target, tc.body, nil)
			if rec.Code != http.StatusOK {
				t.Fatalf("status %d: %.300s", rec.Code, rec.Body.String())
			}
			actual, est := float64(rec.Body.Len()), tc.estimate()
			t.Logf("answer %.0f bytes, estimate %.0f (x%.2f)", actual, est, est/actual)
			if actual > est {
				t.Errorf("answer of %.0f bytes over its estimate of %.0f", actual, est)
			}
			if tc.large && est > 3*actual {
				t.Errorf("estimate %.0f over 3 x the answer of %.0f bytes", est, actual)
			}
		})
	}
}

// Issue 12, item 8: X-Content-Type-Options: nosniff on every response, and
// a restrictive Content-Security-Policy on the SVG pictures and the HTML
// report. Before, no response had nosniff and the SVG had no policy.
func TestSecurityHeaders(t *testing.T) {
	ts := newTestServer(t, Config{})
	cases := []struct {
		method, target string
		body           []byte
		csp            bool
	}{
		{http.MethodGet, "/healthz", nil, false},
		{http.MethodGet, "/openapi.yaml", nil, false},
		{http.MethodGet, "/v1/contaminants", nil, false},
		{http.MethodGet, "/no/such/route", nil, false},
		{http.MethodPost, "/v1/screenings", demoBody(t), false},
		{http.MethodPost, "/v1/screenings", []byte("{"), false},
		{http.MethodPost, "/v1/plots?kind=breakthrough", demoBody(t), true},
		{http.MethodPost, "/v1/plots?kind=map", demoBody(t), true},
		{http.MethodPost, "/v1/reports", demoBody(t), true},
	}
	for _, tc := range cases {
		var r *bytes.Reader
		if tc.body != nil {
			r = bytes.NewReader(tc.body)
		}
		req := httptest.NewRequest(tc.method, tc.target, nil)
		if r != nil {
			req = httptest.NewRequest(tc.method, tc.target, r)
			req.Header.Set("Content-Type", "application/json")
		}
		rec := httptest.NewRecorder()
		ts.e.ServeHTTP(rec, req)
		if got := rec.Header().Get("X-Content-Type-Options"); got != "nosniff" {
			t.Errorf("%s %s -> %d: X-Content-Type-Options %q", tc.method, tc.target, rec.Code, got)
		}
		csp := rec.Header().Get("Content-Security-Policy")
		if tc.csp && (!strings.Contains(csp, "default-src 'none'") || strings.Contains(csp, "script-src")) {
			t.Errorf("%s %s: Content-Security-Policy %q", tc.method, tc.target, csp)
		}
	}
}

// Issue 12, item 8: a compressed body (Content-Encoding gzip or deflate)
// is refused with 415 naming Content-Encoding. Before, gzip got "malformed
// JSON" and deflate over a plain body was read as plain.
func TestContentEncodingRefused(t *testing.T) {
	ts := newTestServer(t, Config{})
	var gz bytes.Buffer
	w := gzip.NewWriter(&gz)
	_, _ = w.Write(demoBody(t))
	_ = w.Close()
	cases := []struct {
		encoding string
		body     []byte
	}{{"gzip", gz.Bytes()}, {"deflate", demoBody(t)}, {"br", demoBody(t)}}
	for _, tc := range cases {
		rec := ts.call(t, http.MethodPost, "/v1/screenings", tc.body, map[string]string{"Content-Encoding": tc.encoding})
		p := problemOf(t, rec, http.StatusUnsupportedMediaType)
		if !hasField(p, "Content-Encoding") {
			t.Errorf("%s: the problem does not name Content-Encoding: %+v", tc.encoding, p)
		}
	}
	if rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), map[string]string{"Content-Encoding": "identity"}); rec.Code != 200 {
		t.Errorf("identity: %d", rec.Code)
	}
}

// Issue 12, item 8: field names are JSON paths, never Go struct names: a
// map's "cells": 1e20 names "cells" (before: "MapOptions.cells"), and a
// number beyond float64 inside the scenario of the uncertainty, attenuation
// and calibration bodies names its field (before: "the body must be a JSON
// object" with no field).
func TestOverflowingNumbersNamed(t *testing.T) {
	ts := newTestServer(t, Config{})
	rec := ts.call(t, http.MethodPost, "/v1/plume-maps", mustJSON(t, map[string]any{"scenario": demoMap(t), "time": 3650, "cells": 1e20}), nil)
	if p := problemOf(t, rec, rec.Code); rec.Code < 400 || !hasField(p, "cells") {
		t.Errorf("cells 1e20: %d %+v", rec.Code, p)
	}
	for _, tc := range []struct {
		target string
		body   map[string]any
	}{
		{"/v1/uncertainty", map[string]any{"scenario": demoMap(t), "realizations": 10}},
		{"/v1/attenuation", attenuationMap(t)},
		{"/v1/calibrations", calibrationMap(t)},
	} {
		set(tc.body, "scenario.aquifer.hydraulic_gradient", 12345.5)
		body := strings.Replace(string(mustJSON(t, tc.body)), "12345.5", "1e400", 1)
		rec := ts.call(t, http.MethodPost, tc.target, []byte(body), nil)
		p := problemOf(t, rec, http.StatusUnprocessableEntity)
		if !hasField(p, "scenario.aquifer.hydraulic_gradient") {
			t.Errorf("%s: 1e400 not named: %+v", tc.target, p)
		}
	}
}
