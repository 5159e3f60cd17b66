package api

import (
	"net/http"
	"testing"
	"time"

	"go.uber.org/goleak"
)

// The per-request deadline passes mid-computation: the answer is 503
// problem+json with Retry-After, and the work stops, measured by goleak:
// no goroutine of the request (the engine runs in its own) is left running
// shortly after the answer (the time it took is logged). Each case would compute for seconds without
// the deadline (closed forms: about 10 us per evaluation, times the
// evaluations listed).
func TestDeadlineStopsWork(t *testing.T) {
	demo := demoMap(t)
	bigClosed := demoMap(t)
	bigClosed["receptors"] = manyReceptors(4000)
	bigClosed["times"] = manyTimes(50)
	bigClosed["methods"] = []any{"exact", "domenico"} // 4000 x 51 x 2 = 408,000 evaluations
	numericOnly := demoMap(t)
	numericOnly["methods"] = []any{"numeric"}
	numericOnly["times"] = []any{365, 1825, 3650, 7300}
	cases := []struct {
		name   string
		cfg    Config
		target string
		body   []byte
	}{
		{"closed forms, many receptors", Config{RequestTimeout: 40 * time.Millisecond}, "/v1/screenings", mustJSON(t, bigClosed)},
		{"numeric solver", Config{RequestTimeout: 40 * time.Millisecond, CellBudget: 2_000_000}, "/v1/screenings", mustJSON(t, numericOnly)},
		{"Monte Carlo", Config{RequestTimeout: 40 * time.Millisecond}, "/v1/uncertainty",
			mustJSON(t, map[string]any{"scenario": bigClosedWith(t, demo, 5), "realizations": 5000, "methods": []any{"exact"}})},
		{"plume map", Config{RequestTimeout: 20 * time.Millisecond}, "/v1/plume-maps",
			mustJSON(t, map[string]any{"scenario": demo, "time": 3650, "levels": []any{0.005, 0.05}, "cells": 250_000})},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			ts := newTestServer(t, tc.cfg)
			baseline := goleak.IgnoreCurrent()
			start := time.Now()
			rec := ts.call(t, http.MethodPost, tc.target, tc.body, nil)
			took := time.Since(start)
			p := problemOf(t, rec, http.StatusServiceUnavailable)
			if p.Type != "/problems/deadline-exceeded" || rec.Header().Get("Retry-After") == "" {
				t.Errorf("type %q, Retry-After %q", p.Type, rec.Header().Get("Retry-After"))
			}
			if took > 5*time.Second {
				t.Errorf("answer after %v with a deadline of %v", took, tc.cfg.RequestTimeout)
			}
			// The engine goroutine must end soon after the answer. goleak
			// retries up to about 10 s here: the numeric solver checks the
			// deadline every few time steps, and one step of a large grid
			// takes a long time under the race detector.
			answered := time.Now()
			for time.Since(answered) < 10*time.Second && goleak.Find(baseline) != nil {
				time.Sleep(20 * time.Millisecond)
			}
			goleak.VerifyNone(t, baseline)
			t.Logf("answered after %v; engine stopped %v after the answer", took.Round(time.Millisecond), time.Since(answered).Round(time.Millisecond))
		})
	}
}

// bigClosedWith is the demo scenario with n receptors and 50 times.
func bigClosedWith(t *testing.T, demo map[string]any, n int) map[string]any {
	m := map[string]any{}
	for k, v := range demo {
		m[k] = v
	}
	m["receptors"] = manyReceptors(n)
	m["times"] = manyTimes(50)
	delete(m, "methods")
	return m
}
