package api

import (
	"bytes"
	"net/http"
	"net/http/httptest"
	"runtime/debug"
	"slices"
	"testing"
)

// demoAllocsCeiling is the most allocations the demo screening may take
// through the handler (BenchmarkScreeningsDemo; 516-518 measured, 706
// before the speed work): a guard against losing the allocation work, with
// room for the runtime's pools.
const demoAllocsCeiling = 560

// TestDemoAllocations: the demo request (testdata/demo/scenario.json)
// through the whole handler stays under demoAllocsCeiling allocations.
func TestDemoAllocations(t *testing.T) {
	if raceDetector() {
		t.Skip("allocation counts differ under the race detector (sync.Pool drops items at random)")
	}
	ts := newTestServer(t, Config{})
	body := demoBody(t)
	serve := func() {
		req := httptest.NewRequest(http.MethodPost, "/v1/screenings", bytes.NewReader(body))
		req.Header.Set("Content-Type", "application/json")
		rec := httptest.NewRecorder()
		ts.e.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			t.Fatalf("status %d: %s", rec.Code, rec.Body)
		}
	}
	serve() // types cached, pools filled
	if n := testing.AllocsPerRun(50, serve); n > demoAllocsCeiling {
		t.Errorf("the demo screening takes %.0f allocations, over %d", n, demoAllocsCeiling)
	}
}

// raceDetector reports whether the test binary was built with -race (its
// build settings say so).
func raceDetector() bool {
	bi, ok := debug.ReadBuildInfo()
	return ok && slices.Contains(bi.Settings, debug.BuildSetting{Key: "-race", Value: "true"})
}
