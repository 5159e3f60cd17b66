package analytic

import (
	"math"
	"testing"
)

// Identities of the mathematics: Erfcx(0) = 1 and, for moderate x, the
// unscaled definition exp(x^2) erfc(x); continuity across the switch to the
// asymptotic series at x = 26.
func TestErfcxIdentities(t *testing.T) {
	if got := Erfcx(0); got != 1 {
		t.Fatalf("Erfcx(0) = %v, want 1", got)
	}
	for _, x := range []float64{-3, -0.5, 0.1, 0.7, 2, 5} {
		want := math.Exp(x*x) * math.Erfc(x)
		if got := Erfcx(x); math.Abs(got-want) > 1e-13*want {
			t.Errorf("Erfcx(%v) = %v, want %v", x, got, want)
		}
	}
	lo, hi := Erfcx(math.Nextafter(26, 0)), Erfcx(26)
	if math.Abs(lo-hi) > 1e-14*hi {
		t.Errorf("Erfcx jumps at 26: %v vs %v", lo, hi)
	}
}
