package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"net/http"
	"sort"
	"strings"
	"syscall"
	"time"
)

// worstCase is the heaviest request of an endpoint that the limits
// accept (or, where marked, one the issue found and the limits now
// refuse), built from the invented demo scenario: -worst <name> sends it
// from every client. The bodies are built here so that a run is
// reproducible from the command line.
type worstCase struct {
	method, path string
	body         func(demo map[string]any) any
	what         string
}

// worstCases are the -worst names.
var worstCases = map[string]worstCase{
	"screenings": {"POST", "/v1/screenings", func(d map[string]any) any {
		// 10,000 receptors of a source that stops after a year: each needs a
		// peak search (about a hundred exact evaluations per method).
		d["receptors"], d["times"], d["methods"] = grid(10_000), []any{365, 1825, 3650, 7300, 14600}, []any{"exact", "domenico"}
		d["source"].(map[string]any)["duration"] = 365
		return d
	}, "10,000 receptors x 5 times, exact and Domenico, a source that stops (peak searches)"},
	"screenings-413": {"POST", "/v1/screenings?format=csv", func(d map[string]any) any {
		d["receptors"], d["times"], d["methods"] = grid(10_000), times(199), []any{"domenico"}
		return d
	}, "the issue's CSV: 10,000 receptors x 199 times (now 413 before any work)"},
	"numeric": {"POST", "/v1/screenings", func(d map[string]any) any {
		d["methods"] = []any{"numeric"}
		return d
	}, "the demo with the numeric method (600,000-cell budget)"},
	"concentration": {"GET", "/v1/concentration?aquifer.seepage_velocity=0.1229&aquifer.dispersivity.longitudinal=10" +
		"&aquifer.dispersivity.transverse=1&aquifer.dispersivity.vertical=0.1&contaminant.retardation=1.37" +
		"&contaminant.half_life=720&source.concentration=12&source.width=15&source.depth=3" +
		"&receptor.x=210&receptor.y=6&receptor.z=2&time=3650&method=numeric", nil,
		"one receptor with the numeric method"},
	"uncertainty": {"POST", "/v1/uncertainty", func(d map[string]any) any {
		d["receptors"], d["times"] = grid(10), times(9)
		d["aquifer"].(map[string]any)["hydraulic_conductivity"] = map[string]any{"distribution": "lognormal", "p05": 3, "p95": 25}
		d["contaminant"].(map[string]any)["half_life"] = map[string]any{"distribution": "triangular", "min": 200, "mode": 720, "max": 1500}
		return map[string]any{"scenario": d, "realizations": 20_000, "methods": []any{"exact"}, "seed": 1}
	}, "20,000 realizations x 10 receptors x 9 times, exact (2,000,000 evaluations)"},
	"uncertainty-413": {"POST", "/v1/uncertainty", func(d map[string]any) any {
		d["receptors"], d["times"] = grid(10_000), times(199)
		return map[string]any{"scenario": d, "realizations": 1, "methods": []any{"domenico"}}
	}, "the issue's 574 MB answer: 1 realization x 10,000 receptors x 199 times (now 413 before any work)"},
	"uncertainty-numeric": {"POST", "/v1/uncertainty", func(d map[string]any) any {
		d["aquifer"].(map[string]any)["hydraulic_conductivity"] = map[string]any{"distribution": "lognormal", "p05": 3, "p95": 25}
		return map[string]any{"scenario": d, "realizations": 20, "methods": []any{"numeric"}}
	}, "20 numeric realizations of the demo (413 once the first shows they cannot finish)"},
	"plume-maps": {"POST", "/v1/plume-maps?format=csv", func(d map[string]any) any {
		return map[string]any{"scenario": d, "time": 3650, "cells": 250_000, "levels": levels(20)}
	}, "250,000 nodes, 20 levels, exact, as CSV"},
	"plots": {"POST", "/v1/plots?kind=map", func(d map[string]any) any {
		d["receptors"], d["times"] = grid(10_000), []any{3650}
		return d
	}, "the map picture of 10,000 receptors"},
	"reports": {"POST", "/v1/reports", func(d map[string]any) any {
		d["receptors"], d["times"] = grid(10_000), times(99)
		return d
	}, "10,000 receptors x 99 times, exact and Domenico"},
	"attenuation": {"POST", "/v1/attenuation", func(d map[string]any) any {
		delete(d, "receptors")
		return map[string]any{"scenario": d, "observations": observations(10_000)}
	}, "10,000 observations"},
	"calibrations": {"POST", "/v1/calibrations", func(d map[string]any) any {
		delete(d, "receptors")
		return map[string]any{"scenario": d, "observations": observations(10_000),
			"fit": []any{"source.concentration", "contaminant.half_life", "aquifer.dispersivity.longitudinal", "aquifer.seepage_velocity"}}
	}, "10,000 observations, four parameters fitted"},
}

// worstNames lists the -worst names.
func worstNames() string {
	names := make([]string, 0, len(worstCases))
	for n := range worstCases {
		names = append(names, n)
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

// worstRequest builds the request of a worst case from the demo body.
func worstRequest(name string, scenario []byte) (method, path string, body []byte, err error) {
	wc, ok := worstCases[name]
	if !ok {
		return "", "", nil, fmt.Errorf("-worst %q: one of %s", name, worstNames())
	}
	if wc.body == nil {
		return wc.method, wc.path, nil, nil
	}
	var demo map[string]any
	if err := json.Unmarshal(scenario, &demo); err != nil {
		return "", "", nil, err
	}
	body, err = json.Marshal(wc.body(demo))
	return wc.method, wc.path, body, err
}

// grid is n receptors downgradient of the demo's source, 10 m apart.
func grid(n int) []any {
	out := make([]any, n)
	for i := range out {
		out[i] = map[string]any{"id": fmt.Sprintf("R%d", i), "x": 1260 + float64(i%100)*10, "y": 700 + float64(i/100)*2}
	}
	return out
}

// times is n times, 100 d apart.
func times(n int) []any {
	out := make([]any, n)
	for i := range out {
		out[i] = float64(100 * (i + 1))
	}
	return out
}

// levels is n outline levels from 1e-4 to 10 mg/L.
func levels(n int) []any {
	out := make([]any, n)
	for i := range out {
		out[i] = 1e-4 * math.Pow(1e5, float64(i)/float64(n-1))
	}
	return out
}

// observations are n invented monitoring results on the demo's plume
// (decaying along the flow), in ten rounds.
func observations(n int) []any {
	out := make([]any, n)
	for i := range out {
		x := 1260 + float64(i%100)*5
		out[i] = map[string]any{"well_id": fmt.Sprintf("W%d", i%100), "x": x, "y": 830 - (x-1250)*0.36,
			"time": float64(365 * (1 + i/1000)), "concentration": 10 * math.Exp(-(x-1250)/80)}
	}
	return out
}

// cpuSeconds is the CPU time the process has used, user plus system, s.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()).Seconds()
}

// idleAfter measures the CPU the process uses in each of the n seconds
// after the last answer, as a fraction of one core.
func idleAfter(n int) []float64 {
	out := make([]float64, n)
	prev := cpuSeconds()
	for i := range out {
		time.Sleep(time.Second)
		now := cpuSeconds()
		out[i] = now - prev
		prev = now
	}
	return out
}

// worstSpec is the one request of a -worst run.
type worstSpec struct {
	method, path string
	body         []byte
}

func (ws worstSpec) request(ctx context.Context, base string) (*http.Request, error) {
	var r io.Reader
	if ws.body != nil {
		r = bytes.NewReader(ws.body)
	}
	req, err := http.NewRequestWithContext(ctx, ws.method, base+ws.path, r)
	if err == nil && ws.body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	return req, err
}
