package api

import (
	"bytes"
	"net/http"
	"net/http/httptest"
	"testing"
)

// BenchmarkScreeningsDemo: the invented demo request (testdata/demo/
// scenario.json: 6 receptors x 4 times, exact and Domenico) through the
// whole handler, as a client sends it. Issue 17 measures its time and
// allocations against the figures before the speed work.
func BenchmarkScreeningsDemo(b *testing.B) {
	ts := newTestServer(b, Config{})
	body := demoBody(b)
	b.ReportAllocs()
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
