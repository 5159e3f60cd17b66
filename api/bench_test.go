package api

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"net/http"
	"net/http/httptest"
	"testing"
	"time"

	"downgradient/plume"
)

// benchScenario is the invented demo with 10 receptors (the demo's six
// plus four more along and across the flow) and 10 times, exact and
// domenico only.
func benchScenario(t testing.TB) []byte {
	m := demoMap(t)
	recs := m["receptors"].([]any)
	for i, xy := range [][2]float64{{1300, 790}, {1400, 770}, {1500, 720}, {1700, 680}} {
		recs = append(recs, map[string]any{"id": fmt.Sprintf("B-%d", i+1), "x": xy[0], "y": xy[1], "z": 2})
	}
	m["receptors"] = recs
	m["times"] = []any{30, 90, 180, 365, 730, 1095, 1825, 3650, 7300, 18250}
	m["methods"] = []any{"exact", "domenico"}
	return mustJSON(t, m)
}

// BenchmarkScreeningsClosedForm: POST /v1/screenings through the whole
// handler (validation, decoding, screening, JSON encoding) for 10 receptors
// x 10 times, exact and domenico. Target (issue 4): under 2 ms per request.
func BenchmarkScreeningsClosedForm(b *testing.B) {
	ts := newTestServer(b, Config{})
	body := benchScenario(b)
	// One checked call first.
	if rec := ts.call(b, http.MethodPost, "/v1/screenings", body, nil); rec.Code != 200 {
		b.Fatalf("%d %s", rec.Code, rec.Body.String())
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		req := httptest.NewRequest(http.MethodPost, "/v1/screenings", bytes.NewReader(body))
		req.Header.Set("Content-Type", "application/json")
		rec := httptest.NewRecorder()
		ts.e.ServeHTTP(rec, req)
		if rec.Code != 200 {
			b.Fatal(rec.Code)
		}
	}
}

// BenchmarkScreenEngineOnly is the same scenario through plume.Screen alone:
// the difference to BenchmarkScreeningsClosedForm is the cost of the HTTP
// layer (validation, decoding, encoding).
func BenchmarkScreenEngineOnly(b *testing.B) {
	sc, p := decodeScenario(benchScenario(b))
	if p != nil {
		b.Fatal(p)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := plume.Screen(context.Background(), sc, plume.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkDryCleanerDemo: the invented dry-cleaner demo (four chlorinated
// ethenes, three receptors, four times) through POST /v1/screenings with
// the closed forms: as published (distinct retardation factors, so the
// closed forms give PCE only) and with one retardation factor (every
// compound by the chain's closed forms). Issue 13 target for the demo as
// published: under 10 ms per request, which is 5 times the 2 ms target of
// BenchmarkScreeningsClosedForm; asserted as at most 5 times that request
// measured in the same run. The equal-retardation variant is reported, not
// asserted: its first-exceedance searches evaluate the chain at the plume
// front, where the decoupled terms cancel and analytic falls back to the
// age integral of the Bateman weights (accurate, about 60 single values).
func BenchmarkDryCleanerDemo(b *testing.B) {
	ts := newTestServer(b, Config{})
	call := func(body []byte) func() {
		return func() {
			req := httptest.NewRequest(http.MethodPost, "/v1/screenings", bytes.NewReader(body))
			req.Header.Set("Content-Type", "application/json")
			rec := httptest.NewRecorder()
			ts.e.ServeHTTP(rec, req)
			if rec.Code != 200 {
				b.Fatalf("%d %s", rec.Code, rec.Body.String())
			}
		}
	}
	distinct := dryCleanerMapB(b)
	equal := dryCleanerMapB(b)
	equalRChain(equal)
	floor := call(benchScenario(b))
	for _, v := range []struct {
		name   string
		m      map[string]any
		assert bool
	}{{"distinct_R", distinct, true}, {"equal_R", equal, false}} {
		b.Run(v.name, func(b *testing.B) {
			chain := call(mustJSON(b, v.m))
			chain()
			one := fastestOf(floor)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				chain()
			}
			b.StopTimer()
			per := b.Elapsed() / time.Duration(b.N)
			b.ReportMetric(float64(per)/float64(one), "x-demo-request")
			b.ReportMetric(float64(per)/1e6, "ms/request")
			if v.assert && per > 5*one {
				b.Errorf("dry-cleaner demo %v, %.1f times the demo request (%v); target at most 5", per, float64(per)/float64(one), one)
			}
		})
	}
}

// fastestOf is the fastest of 20 timed runs of f (a floor for ratios,
// robust to other work on a shared machine).
func fastestOf(f func()) time.Duration {
	best := time.Duration(math.MaxInt64)
	for range 20 {
		t0 := time.Now()
		f()
		best = min(best, time.Since(t0))
	}
	return best
}
