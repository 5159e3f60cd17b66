package plume

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"strconv"
	"testing"
)

// The first exceedance found by Newton's method in the probit variable
// (crossing) is the root of C(t) = level: against bisection of the exact
// value to 60 halvings, for 100 receptors of the demo aquifer (one source,
// and ten sources whose sum is searched), within the documented 1e-7 of
// the bracket's upper end (the latest requested time). A self-consistency
// check of the search; the exact values themselves are checked against
// 40-digit references in the analytic package.
func TestFirstExceedanceIsTheCrossing(t *testing.T) {
	one, ten := tenSourceLayer()
	one.Methods, ten.Methods = []string{MethodExact}, []string{MethodExact}
	for name, sc := range map[string]Scenario{"one source": one, "ten sources": ten} {
		res, err := Screen(context.Background(), sc, Options{})
		if err != nil {
			t.Fatal(err)
		}
		md, err := Prepare(sc)
		if err != nil {
			t.Fatal(err)
		}
		level := *sc.Contaminant.ScreeningLevel
		found, worst := 0, 0.0
		for i, p := range md.Receptors() {
			fet := res.Receptors[i].FirstExceedanceTime
			if fet == nil {
				continue
			}
			found++
			lo, hi := 0.0, 2**fet+1
			for range 60 {
				mid := (lo + hi) / 2
				if md.Value(MethodExact, p, mid) >= level {
					hi = mid
				} else {
					lo = mid
				}
			}
			d := math.Abs(*fet - hi)
			worst = math.Max(worst, d)
			if d > 1e-7*7300+1e-9*hi {
				t.Errorf("%s, %s: first exceedance %.12g d, the crossing %.12g d", name, p.ID, *fet, hi)
			}
		}
		t.Logf("%s: %d first exceedances, worst difference from bisection %.3g d", name, found, worst)
		if found < 50 {
			t.Errorf("%s: only %d receptors exceed; the test no longer covers the search", name, found)
		}
	}
}

// probit against erfcinv at 40 digits (mpmath root finding,
// testdata/reference/gen_probit.py, probit.json), from the smallest
// normal float64 to 2, and strictly monotone across its switch at 1e-3.
func TestProbit(t *testing.T) {
	b, err := os.ReadFile("../testdata/reference/probit.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct{ Y, W string } `json:"cases"`
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) < 10 {
		t.Fatalf("only %d reference cases", len(ref.Cases))
	}
	for _, c := range ref.Cases {
		y, _ := strconv.ParseFloat(c.Y, 64)
		want, _ := strconv.ParseFloat(c.W, 64)
		if got := probit(y); math.Abs(got-want) > 4e-15*math.Max(math.Abs(want), 1) {
			t.Errorf("probit(%v) = %.17g, want %.17g (mpmath)", y, got, want)
		}
	}
	prev := probit(1e-3 * (1 - 1.001e-9))
	for k := -1000; k <= 1000; k++ {
		w := probit(1e-3 * (1 + float64(k)*1e-12))
		if !(w < prev) {
			t.Fatalf("probit not decreasing at 1e-3 (1 + %d e-12): %.17g after %.17g", k, w, prev)
		}
		prev = w
	}
}
