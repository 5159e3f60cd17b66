package numeric

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"
)

// FuzzSolverInputs feeds arbitrary float64s (NaN, Inf, negative, huge and
// tiny included) to the input checks of Screen3D and Screen1D, with a small
// cell budget and a short deadline so each input runs in milliseconds. It
// fails when the solver panics, returns an error that is none of its
// documented kinds (ErrInvalid, ErrBudget (wrapped by every BudgetError,
// the work budget's included), ErrNotConverged, the context's error),
// outlives its deadline by more than 2 s, accepts a non-finite parameter,
// or returns a concentration that is not finite or lies outside [0, 1]
// relative to the source (by more than 1e-6: the scheme is bounded, see
// tvd.go). Seeds are below and in
// testdata/fuzz/FuzzSolverInputs; run longer with
//
//	go test ./numeric -run XXX -fuzz FuzzSolverInputs -fuzztime 5m
func FuzzSolverInputs(f *testing.F) {
	// The package's own good problem (validate_test.go) and edge cases.
	f.Add(0.1, 1.0, 0.1, 0.01, 1.0, 0.0, 15.0, 3.0, 100.0, 0.0, 0.0, 0.0, 365.0, 730.0, 0.0, 0.0, uint16(3000), false, false)
	f.Add(0.1, 1.0, 0.1, 0.01, 1.4, 1e-3, 15.0, 3.0, 50.0, 6.0, 2.0, 8.0, 100.0, 200.0, 50.0, 0.0, uint16(65535), true, false)
	f.Add(0.1, 1.0, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 20.0, 0.0, 0.0, 0.0, 10.0, math.Inf(1), 0.0, 1e-3, uint16(800), false, true)
	f.Add(math.NaN(), 1.0, 0.1, 0.01, 1.0, 0.0, 15.0, 3.0, 100.0, 0.0, 0.0, 0.0, 365.0, 730.0, 0.0, 0.0, uint16(3000), false, false)
	f.Add(1e6, 1e-9, 1e-9, 1e-9, 1e9, 1e3, 1e-3, 1e-3, 1e9, -1e9, 0.0, 1e9, 1e-9, 1e12, math.Inf(1), 0.0, uint16(65535), false, false)
	f.Fuzz(func(t *testing.T, v, dx, dy, dz, r, mu, width, depth, x, y, top, bot, t1, t2, dur, dep float64, budget uint16, steady, oneD bool) {
		times := []float64{t1, t2}
		if steady {
			times = append(times, math.Inf(1))
		}
		const deadline = 200 * time.Millisecond
		ctx, cancel := context.WithTimeout(context.Background(), deadline)
		defer cancel()
		start := time.Now()
		// Every loop that can run long checks the context or is bounded by
		// a budget counted first, so no input may outlive the deadline by
		// much (the margin allows for a loaded machine and the race
		// detector).
		defer func() {
			if took := time.Since(start); took > deadline+2*time.Second {
				t.Errorf("took %v against a deadline of %v", took, deadline)
			}
		}()
		hist := History{Duration: dur, Depletion: dep}
		var c [][]float64
		var err error
		params := []float64{v, dx, r, mu, x, t1, t2, dep}
		if oneD {
			var res *Result1D
			res, err = Screen1D(ctx, Problem1D{V: v, Dx: dx, R: r, Mu: mu, History: hist,
				Receptors: []float64{x}, Times: times, CellBudget: int(budget) + 1})
			if res != nil {
				c = res.C
			}
		} else {
			var res *Result3D
			res, err = Screen3D(ctx, Problem3D{V: v, Dx: dx, Dy: dy, Dz: dz, R: r, Mu: mu,
				Width: width, Depth: depth, History: hist,
				Receptors: []Receptor{{X: x, Y: y, Top: top, Bottom: bot}}, Times: times, CellBudget: int(budget) + 1})
			if res != nil {
				c = res.C
			}
			params = append(params, dy, dz, width, depth, y, top, bot)
		}
		if err != nil {
			if !errors.Is(err, ErrInvalid) && !errors.Is(err, ErrBudget) && !errors.Is(err, ErrNotConverged) &&
				!errors.Is(err, context.DeadlineExceeded) && !errors.Is(err, context.Canceled) {
				t.Fatalf("undocumented error kind: %v", err)
			}
			return
		}
		for _, p := range params {
			if math.IsNaN(p) {
				t.Fatalf("accepted a NaN parameter: %v", params)
			}
		}
		for _, row := range c {
			for _, v := range row {
				if math.IsNaN(v) || math.IsInf(v, 0) || v < -1e-6 || v > 1+1e-6 {
					t.Fatalf("C/C0 = %v out of [0, 1]: %v", v, c)
				}
			}
		}
	})
}

// TestRegressionGradedAxisUnbounded is the crasher FuzzSolverInputs found
// (seed 5 of the target): Screen3D with a fast, barely dispersive flow, a
// 1 mm source and a receptor 1e9 m away. designGrid3 builds each graded
// axis face by face (gradedAxis, now in graded.go) before designFor compares the
// cell count with CellBudget, so the axis grows without bound: the process
// runs out of memory within seconds, and the context is not checked during
// the design. The same input reaches the solver through POST /v1/screenings
// (seepage_velocity 1e6, dispersivities 1e-9, width and depth 1e-3,
// receptor x 1e9, methods ["numeric"]): one request exhausts the server's
// memory. Fixed: a graded axis is counted in float64 (sum of ceil(phi)
// over its segments) before it is built, and the grid is built only when
// the count fits the budget (graded.go, designFor). The same input with the
// receptor at 4e9 m, which still took 4.7 s in the budget search, is
// TestDeadlineGridDesign.
func TestRegressionGradedAxisUnbounded(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), time.Second)
	defer cancel()
	_, err := Screen3D(ctx, Problem3D{V: 1e6, Dx: 1e-9, Dy: 1e-9, Dz: 1e-9, R: 1e9, Mu: 1e3, Width: 1e-3, Depth: 1e-3,
		History: History{Duration: math.Inf(1)}, Receptors: []Receptor{{X: 1e9, Y: -1e9, Bottom: 1e9}},
		Times: []float64{1e-9, 1e12}, CellBudget: 65536})
	if !errors.Is(err, ErrBudget) && !errors.Is(err, context.DeadlineExceeded) {
		t.Fatalf("want ErrBudget (or the deadline), got %v", err)
	}
}
