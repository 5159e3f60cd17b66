package api

import (
	"net/http"
	"testing"
	"time"

	"go.uber.org/goleak"
)

// Issue 12, items 1 and 5, at the HTTP level. The fixes are in numeric/
// (the step count computed in float64 and checked against a budget, the
// context checked in every loop, the grid design counted before it is
// built) and came with main; these tests pin the service's side: the
// request answers within its deadline plus 1 s, and no goroutine of it
// (hence no CPU) is left 1 s after the answer. Before: "times": [1e300]
// with the numeric method answered 503 at the deadline and left a
// goroutine spinning on a core forever (the step count overflowed int);
// the receptor at x = 4e9 of FuzzSolverInputs' fifth seed kept the grid
// design running about 35 s after the 503.
func TestNumericWorkStopsAtDeadline(t *testing.T) {
	const deadline = time.Second
	timeBig := demoMap(t)
	timeBig["methods"], timeBig["times"] = []any{"numeric"}, []any{1e300}
	// FuzzSolverInputs' fifth seed with the receptor at x = 4e9: a fast,
	// barely dispersive, strongly retarded and decaying flow from a tiny
	// source (v = 1e6 m/d, D = 1e-9 m^2/d, R = 1e9, mu = 1e3 /d).
	far := map[string]any{
		"aquifer": map[string]any{"seepage_velocity": 1e6,
			"dispersivity": map[string]any{"longitudinal": 1e-15, "transverse": 1e-15, "vertical": 1e-15}},
		"contaminant": map[string]any{"retardation": 1e9, "half_life": 6.931471805599453e-4},
		"source":      map[string]any{"concentration": 1, "width": 1e-3, "depth": 1e-3, "x": 0, "y": 0, "flow_azimuth_deg": 90},
		"receptors":   []any{map[string]any{"id": "far", "x": 4e9, "y": -1e9, "screen_top": 0, "screen_bottom": 1e9}},
		"times":       []any{1e-9, 1e12},
		"methods":     []any{"numeric"},
	}
	cases := []struct {
		name, method, target string
		body                 []byte
	}{
		{"numeric at time 1e300", http.MethodPost, "/v1/screenings", mustJSON(t, timeBig)},
		{"GET numeric at time 1e20", http.MethodGet, "/v1/concentration?aquifer.seepage_velocity=0.3&aquifer.dispersivity.longitudinal=10" +
			"&contaminant.retardation=1&source.concentration=12&source.width=15&source.depth=3&receptor.x=210&receptor.y=6&method=numeric&time=1e20", nil},
		{"receptor at x = 4e9", http.MethodPost, "/v1/screenings", mustJSON(t, far)},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ts := newTestServer(t, Config{RequestTimeout: deadline})
			baseline := goleak.IgnoreCurrent()
			start := time.Now()
			rec := ts.call(t, tc.method, tc.target, tc.body, nil)
			took := time.Since(start)
			if !documentedStatus[rec.Code] {
				t.Errorf("status %d: %.300s", rec.Code, rec.Body.String())
			}
			if took > deadline+time.Second {
				t.Errorf("answered after %v with a deadline of %v", took, deadline)
			}
			answered := time.Now()
			for time.Since(answered) < time.Second && goleak.Find(baseline) != nil {
				time.Sleep(10 * time.Millisecond)
			}
			if err := goleak.Find(baseline); err != nil {
				t.Errorf("goroutines still running 1 s after the answer: %v", err)
			}
			t.Logf("%d after %v; the work stopped %v after the answer", rec.Code, took.Round(time.Millisecond), time.Since(answered).Round(time.Millisecond))
		})
	}
}
