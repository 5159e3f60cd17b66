package api

import (
	"bytes"
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"testing"

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
