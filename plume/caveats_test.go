package plume

import (
	"math"
	"testing"
)

// A deviation is worded readably at every size, and a comparison floor
// near the smallest float64 gives the largest finite ratio, never +Inf
// (with DOWNGRADIENT_EXTREME_N=2000, TestExtremeInputsFinite reached such
// screening levels and printed "+Inf %").
func TestDeviationWording(t *testing.T) {
	for _, c := range []struct {
		dev  float64
		want string
	}{
		{0.125, "up to 12.5 %"},
		{3, "up to 300 %"},
		{1e6, "up to 1e+08 %"},
		{2e6, "more than a factor of a million"},
		{math.MaxFloat64, "more than a factor of a million"},
	} {
		if got := deviationText(c.dev); got != c.want {
			t.Errorf("deviationText(%g) = %q, want %q", c.dev, got, c.want)
		}
	}
	dv := deviation{floor: 1e-320, max: math.Inf(-1)}
	dv.compare(0, 1)
	if dv.max != math.MaxFloat64 {
		t.Errorf("deviation with a floor of 1e-320: %v, want the largest float64", dv.max)
	}
}
