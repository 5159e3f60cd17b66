package api

import (
	"bytes"
	"context"
	"io"
	"net/http"
	"net/http/httptest"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"downgradient/plume"
)

// Each limit, exceeded, answers its documented status (openapi.yaml, "Errors
// and limits" in docs/errors.md) as problem+json naming the field. The limits
// are the service's own choices (no external source).
func TestLimitsExceeded(t *testing.T) {
	demo := demoMap(t)
	withRecs := func(n int) []byte {
		m := demoMap(t)
		m["receptors"] = manyReceptors(n)
		return mustJSON(t, m)
	}
	withTimes := func(n int) []byte {
		m := demoMap(t)
		m["times"] = manyTimes(n)
		return mustJSON(t, m)
	}
	padded := append(append([]byte{}, demoBody(t)...), bytes.Repeat([]byte(" "), 4096)...)
	cases := []struct {
		name   string
		cfg    Config
		method string
		target string
		body   []byte
		status int
		field  string // "" when the body as a whole is over
	}{
		{"body over MaxBodyBytes", Config{MaxBodyBytes: 2048}, http.MethodPost, "/v1/screenings", padded, 413, ""},
		{"receptors over 10,000", Config{}, http.MethodPost, "/v1/screenings", withRecs(plume.MaxReceptors + 1), 413, "receptors"},
		{"times over 1,000", Config{}, http.MethodPost, "/v1/screenings", withTimes(plume.MaxTimes + 1), 413, "times"},
		{"closed-form evaluations over the budget", Config{MaxEvaluations: 50}, http.MethodPost, "/v1/screenings", withTimes(20), 413, "receptors"},
		{"uncertainty realizations over the budget", Config{MaxEvaluations: 1000}, http.MethodPost, "/v1/uncertainty",
			mustJSON(t, map[string]any{"scenario": demo, "realizations": 5000, "methods": []any{"exact"}}), 413, "realizations"},
		{"plume-map cells over 250,000", Config{}, http.MethodPost, "/v1/plume-maps",
			mustJSON(t, map[string]any{"scenario": demo, "time": 3650, "levels": []any{0.005}, "cells": 1_000_000}), 413, "cells"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ts := newTestServer(t, tc.cfg)
			rec := ts.call(t, tc.method, tc.target, tc.body, nil)
			p := problemOf(t, rec, tc.status)
			if tc.field != "" && !hasField(p, tc.field) {
				t.Errorf("problem does not name %q: %+v", tc.field, p)
			}
		})
	}
}

// A chunked body of unknown length is cut at MaxBodyBytes too: the limit
// does not rest on Content-Length.
func TestBodyLimitChunked(t *testing.T) {
	ts := newTestServer(t, Config{MaxBodyBytes: 1024})
	body := io.MultiReader(strings.NewReader(`{"description": "`), strings.NewReader(strings.Repeat("x", 1<<20)), strings.NewReader(`"}`))
	req := httptest.NewRequest(http.MethodPost, "/v1/screenings", io.NopCloser(body))
	req.ContentLength = -1
	req.Header.Set("Content-Type", "application/json")
	rec := httptest.NewRecorder()
	ts.e.ServeHTTP(rec, req)
	problemOf(t, rec, http.StatusRequestEntityTooLarge)
}

// The numeric method's cell budget holds: over it, the method is not run
// and a caveat says so (the closed forms still answer).
func TestNumericCellBudget(t *testing.T) {
	ts := newTestServer(t, Config{CellBudget: 500})
	m := demoMap(t)
	m["methods"] = []any{"exact", "numeric"}
	rec := ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil)
	if rec.Code != 200 {
		t.Fatalf("status %d: %.500s", rec.Code, rec.Body.String())
	}
	res := decodeResult(t, rec.Body.Bytes())
	if res.Numeric != nil {
		t.Errorf("numeric ran with %d cells over a budget of 500", res.Numeric.TotalCells)
	}
	found := false
	for _, c := range res.Caveats {
		found = found || c.Code == "numeric_not_run"
	}
	if !found {
		t.Errorf("no numeric_not_run caveat: %+v", res.Caveats)
	}
}

// setHook sets a test hook of the engine path for the rest of the test.
func setHook(t *testing.T, h *atomic.Pointer[func(context.Context)], f func(context.Context)) {
	t.Helper()
	h.Store(&f)
	t.Cleanup(func() { h.Store(nil) })
}

// blockedRequest is a screening whose computation waits, holding its
// computation slot, until release is called (or its deadline passes).
func blockedRequest(t *testing.T, ts *testServer, body []byte) (release func(), done <-chan *httptest.ResponseRecorder) {
	gate := make(chan struct{})
	var first atomic.Bool
	setHook(t, &testHookCompute, func(ctx context.Context) {
		if first.CompareAndSwap(false, true) {
			select {
			case <-gate:
			case <-ctx.Done():
			}
		}
	})
	var once sync.Once
	release = func() { once.Do(func() { close(gate) }) }
	t.Cleanup(release)
	req := httptest.NewRequest(http.MethodPost, "/v1/screenings", bytes.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	ch := make(chan *httptest.ResponseRecorder, 1)
	go func() {
		rec := httptest.NewRecorder()
		ts.e.ServeHTTP(rec, req)
		ch <- rec
	}()
	return release, ch
}

// waitInFlight polls until the in-flight gauge of the handler reaches want.
func waitInFlight(t *testing.T, ts *testServer, want float64) {
	t.Helper()
	deadline := time.Now().Add(5 * time.Second)
	for time.Now().Before(deadline) {
		rec := ts.call(t, http.MethodGet, "/metrics", nil, nil)
		if metricValue(rec.Body.String(), "downgradient_heavy_requests_in_flight") == want {
			return
		}
		time.Sleep(5 * time.Millisecond)
	}
	t.Fatalf("in-flight gauge never reached %v", want)
}

// Every computation slot busy and no waiting allowed: 503 problem+json
// with Retry-After at once; light routes still answer; once the slot frees,
// the held request completes.
func TestConcurrencyLimitRefuses(t *testing.T) {
	ts := newTestServer(t, Config{MaxHeavy: 1, MaxWaiting: -1})
	release, done := blockedRequest(t, ts, demoBody(t))
	waitInFlight(t, ts, 1)

	rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil)
	p := problemOf(t, rec, http.StatusServiceUnavailable)
	if p.Type != "/problems/server-busy" || rec.Header().Get("Retry-After") != "1" {
		t.Errorf("type %q, Retry-After %q", p.Type, rec.Header().Get("Retry-After"))
	}
	rec = ts.call(t, http.MethodGet, "/v1/concentration?aquifer.seepage_velocity=0.1&aquifer.dispersivity.longitudinal=1&source.concentration=1&receptor.x=10&receptor.y=0&time=100", nil, nil)
	problemOf(t, rec, http.StatusServiceUnavailable)
	if rec := ts.call(t, http.MethodGet, "/healthz", nil, nil); rec.Code != 200 {
		t.Errorf("healthz while busy: %d", rec.Code)
	}

	release()
	if rec := <-done; rec.Code != 200 {
		t.Errorf("held request: %d %.300s", rec.Code, rec.Body.String())
	}
	if rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil); rec.Code != 200 {
		t.Errorf("after release: %d", rec.Code)
	}
}

// With a waiting line, a request waits for the slot; it gets 503 only when
// the wait times out.
func TestConcurrencyLimitWaits(t *testing.T) {
	ts := newTestServer(t, Config{MaxHeavy: 1, MaxWaiting: 4, WaitTimeout: 50 * time.Millisecond})
	release, done := blockedRequest(t, ts, demoBody(t))
	waitInFlight(t, ts, 1)
	start := time.Now()
	rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil)
	problemOf(t, rec, http.StatusServiceUnavailable)
	if waited := time.Since(start); waited < 50*time.Millisecond {
		t.Errorf("refused after %v, before the 50 ms wait", waited)
	}
	release()
	<-done
}

// A waiter gets the slot as soon as it frees.
func TestConcurrencyLimitWaiterServed(t *testing.T) {
	ts := newTestServer(t, Config{MaxHeavy: 1, MaxWaiting: 4, WaitTimeout: 10 * time.Second})
	release, done := blockedRequest(t, ts, demoBody(t))
	waitInFlight(t, ts, 1)
	got := make(chan int, 1)
	go func() {
		req := httptest.NewRequest(http.MethodPost, "/v1/screenings", bytes.NewReader(demoBody(t)))
		req.Header.Set("Content-Type", "application/json")
		r := httptest.NewRecorder()
		ts.e.ServeHTTP(r, req)
		got <- r.Code
	}()
	time.Sleep(20 * time.Millisecond)
	release()
	if c := <-got; c != 200 {
		t.Errorf("waiter: %d", c)
	}
	<-done
}

// The metrics count requests by route template and status, the numeric
// cells and the caveats by code.
func TestMetricsCount(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t) // as a 1D column (no width or depth): a cheap numeric run
	m["methods"] = []any{"exact", "numeric"}
	m["times"] = []any{365}
	set(m, "source.width", deleteMarker)
	set(m, "source.depth", deleteMarker)
	if rec := ts.call(t, http.MethodPost, "/v1/screenings", mustJSON(t, m), nil); rec.Code != 200 {
		t.Fatalf("%d %.300s", rec.Code, rec.Body.String())
	}
	res := decodeResult(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil).Body.Bytes())
	ts.call(t, http.MethodPost, "/v1/screenings", []byte("{"), nil)
	ts.call(t, http.MethodGet, "/no/such/path/12345", nil, nil)
	body := ts.call(t, http.MethodGet, "/metrics", nil, nil).Body.String()
	for _, want := range []string{
		`downgradient_http_requests_total{method="POST",route="/v1/screenings",status="200"} 2`,
		`downgradient_http_requests_total{method="POST",route="/v1/screenings",status="400"} 1`,
		`downgradient_http_requests_total{method="GET",route="unmatched",status="404"} 1`,
		`downgradient_http_request_duration_seconds_bucket{method="POST",route="/v1/screenings",status="200",le="+Inf"} 2`,
		"downgradient_heavy_requests_in_flight 0", "downgradient_heavy_requests_waiting 0",
		"go_goroutines ", "process_resident_memory_bytes ",
	} {
		if !strings.Contains(body, want) {
			t.Errorf("/metrics lacks %q", want)
		}
	}
	if metricValue(body, "downgradient_numeric_cells_solved_total") <= 0 {
		t.Errorf("numeric cells not counted:\n%s", grepLines(body, "cells"))
	}
	for _, c := range res.Caveats {
		if metricValue(body, `downgradient_caveats_total{code="`+c.Code+`"}`) < 1 {
			t.Errorf("caveat %s not counted:\n%s", c.Code, grepLines(body, "caveats"))
		}
	}
}

// metricValue is the value of the sample line starting with name (-1 when absent).
func metricValue(body, name string) float64 {
	for _, l := range strings.Split(body, "\n") {
		if v, ok := strings.CutPrefix(l, name+" "); ok {
			f, err := strconv.ParseFloat(v, 64)
			if err == nil {
				return f
			}
		}
	}
	return -1
}

func grepLines(s, sub string) string {
	var out []string
	for _, l := range strings.Split(s, "\n") {
		if strings.Contains(l, sub) {
			out = append(out, l)
		}
	}
	return strings.Join(out, "\n")
}

// The request ID: a sane incoming one is echoed, anything else replaced.
func TestRequestID(t *testing.T) {
	ts := newTestServer(t, Config{})
	cases := []struct {
		in   string
		keep bool
	}{
		{"", false},
		{"abc-123_X.y:z", true},
		{"0f8fad5b-d9cb-469f-a165-70867728950e", true},
		{strings.Repeat("a", 64), true},
		{strings.Repeat("a", 65), false},
		{"bad id with spaces", false},
		{"inject\"quote", false},
		{"ünïcode", false},
	}
	for _, tc := range cases {
		rec := ts.call(t, http.MethodGet, "/healthz", nil, map[string]string{HeaderRequestID: tc.in})
		got := rec.Header().Get(HeaderRequestID)
		switch {
		case tc.keep && got != tc.in:
			t.Errorf("%q: echoed %q", tc.in, got)
		case !tc.keep && (got == tc.in || len(got) != 32 || !saneRequestID(got)):
			t.Errorf("%q: replaced by %q, want a new 32-hex ID", tc.in, got)
		}
	}
	// Problems carry it too.
	rec := ts.call(t, http.MethodPost, "/v1/screenings", []byte("{"), map[string]string{HeaderRequestID: "req-1"})
	if rec.Header().Get(HeaderRequestID) != "req-1" {
		t.Errorf("problem response lacks the request ID")
	}
}

// A request whose body is read takes a decoding token; at most a few
// decode at once (2 per slot, at least 4), and a token is given back when
// its request asks for a computation slot or ends, so that many large
// bodies arriving together are not all expanded in memory at once.
func TestDecodingTokens(t *testing.T) {
	l := newLimiter(Config{MaxHeavy: 1, MaxWaiting: 8, WaitTimeout: time.Second}.withDefaults(), newMetrics())
	scopes := make([]*requestScope, 5)
	ctxs := make([]context.Context, 5)
	for i := range scopes {
		scopes[i] = &requestScope{}
		ctxs[i] = context.WithValue(context.Background(), scopeKey{}, scopes[i])
	}
	for i := range 4 {
		if err := l.takeDecode(ctxs[i]); err != nil {
			t.Fatal(err)
		}
	}
	fifth := make(chan error, 1)
	go func() { fifth <- l.takeDecode(ctxs[4]) }()
	select {
	case <-fifth:
		t.Fatal("a fifth request decodes while four hold the tokens")
	case <-time.After(50 * time.Millisecond):
	}
	if err := l.take(ctxs[0]); err != nil { // asks for a slot: gives its token back
		t.Fatal(err)
	}
	select {
	case err := <-fifth:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("the token given back did not reach the waiting request")
	}
	for _, sc := range scopes {
		sc.end()
	}
	if len(l.decoding) != 0 || len(l.slots) != 0 {
		t.Errorf("after every request ended: %d decoding tokens, %d slots held", len(l.decoding), len(l.slots))
	}
}
