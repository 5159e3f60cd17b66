package analytic

import (
	"math"
	"testing"
)

// logSub at powers of two, where ln(2^k) = k ln 2 exactly (the smallest
// subnormal is 2^-1074), and at normal numbers as math.Log.
func TestLogSub(t *testing.T) {
	for _, k := range []int{-1074, -1060, -1040, -1023, -1022, -1000, 0, 10} {
		x := math.Ldexp(1, k)
		want := float64(k) * math.Ln2
		if got := logSub(x); math.Abs(got-want) > 4e-16*math.Abs(want)+1e-300 {
			t.Errorf("logSub(2^%d) = %.17g, want %.17g", k, got, want)
		}
	}
	for _, x := range []float64{1e-300, 0.5, 3, 1e300} {
		if logSub(x) != math.Log(x) {
			t.Errorf("logSub(%v) = %v, math.Log %v", x, logSub(x), math.Log(x))
		}
	}
	if !math.IsInf(logSub(0), -1) || !math.IsNaN(logSub(-1)) {
		t.Errorf("logSub(0) = %v, logSub(-1) = %v", logSub(0), logSub(-1))
	}
}
