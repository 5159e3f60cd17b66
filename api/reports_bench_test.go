package api

import (
	"fmt"
	"math"
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

// layerMap is the demo scenario with a layer of n receptors (parcel
// corners, invented) on a jittered grid around the plume: from 100 m
// upgradient to 1,100 m downgradient of the source and 240 m either side
// of the flow line, in site coordinates to one decimal.
func layerMap(t testing.TB, n int) map[string]any {
	t.Helper()
	m := demoMap(t)
	cols := int(math.Ceil(math.Sqrt(float64(n) * 2.5)))
	rows := (n + cols - 1) / cols
	az := 110 * math.Pi / 180
	fx, fy := math.Sin(az), math.Cos(az) // flow direction in site x, y
	recs := make([]any, 0, n)
	for k := 0; k < n; k++ {
		i, j := k%cols, k/cols
		// A fixed jitter from the index (no random stream: the layer is the same on every run).
		jx := 0.3 * math.Sin(float64(7*k+1))
		jy := 0.3 * math.Cos(float64(11*k+3))
		along := -100 + 1200*(float64(i)+0.5+jx)/float64(cols)
		across := -240 + 480*(float64(j)+0.5+jy)/float64(rows)
		x := 1250 + along*fx - across*fy
		y := 830 + along*fy + across*fx
		recs = append(recs, map[string]any{"id": fmt.Sprintf("L-%03d", k+1),
			"x": math.Round(x*10) / 10, "y": math.Round(y*10) / 10, "z": 0})
	}
	m["receptors"] = recs
	return m
}
