package api

import (
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"
)

// benchReport posts body to /v1/reports b.N times and fails the benchmark
// when the mean time per report is over limit (the targets of issue 16:
// absolute times on the 2-core development machine).
func benchReport(b *testing.B, body []byte, limit time.Duration) {
	ts := newTestServer(b, Config{})
	for b.Loop() {
		req := httptest.NewRequest(http.MethodPost, "/v1/reports", strings.NewReader(string(body)))
		req.Header.Set("Content-Type", "application/json")
		rec := httptest.NewRecorder()
		ts.e.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			b.Fatalf("%d %.300s", rec.Code, rec.Body.String())
		}
	}
	if per := b.Elapsed() / time.Duration(b.N); per > limit {
		b.Errorf("%v per report, target under %v", per, limit)
	}
}

// BenchmarkReportDemo: the memo of the demo scenario (screening, dense
// breakthrough curves, map, section, profile, eight SVG pictures).
func BenchmarkReportDemo(b *testing.B) { benchReport(b, demoBody(b), time.Second) }

// BenchmarkReportDemoUncertainty: the memo of the demo with the
// uncertainty section, 1,000 realizations of the demo's closed forms
// (exact and Domenico) with three uncertain inputs; target under 1 s.
func BenchmarkReportDemoUncertainty(b *testing.B) {
	env := uncertaintyMap(b)
	env["realizations"] = 1000
	benchReport(b, mustJSON(b, env), time.Second)
}

// BenchmarkReportLayer500: the memo of a 500-receptor layer; target under 3 s.
func BenchmarkReportLayer500(b *testing.B) {
	benchReport(b, mustJSON(b, layerMap(b, 500)), 3*time.Second)
}
