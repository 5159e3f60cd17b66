package analytic

import (
	"math"
	"testing"
)

// erfFast and erfcFast against erf and erfc at 60 digits (mpmath; the
// values in testdata/reference/erf_fast.json are written by
// testdata/reference/gen_erf_table.py) on a grid of step 0.01 over
// [0, 28] and 200 more points across the tables.
func TestErfFast(t *testing.T) {
	var f struct {
		Cases []struct {
			X    refNum `json:"x"`
			Erf  refNum `json:"erf"`
			Erfc refNum `json:"erfc"`
		} `json:"cases"`
	}
	refLoad(t, "erf_fast.json", &f)
	if len(f.Cases) < 3000 {
		t.Fatalf("reference file too short: %d cases", len(f.Cases))
	}
	worstErf, worstErfc := 0.0, 0.0
	for _, c := range f.Cases {
		x := float64(c.X)
		// erf: absolute error (the transverse factors add and subtract
		// values near 1).
		if e := math.Abs(erfFast(x) - float64(c.Erf)); e > worstErf {
			worstErf = e
		}
		if want := float64(c.Erfc); want > 1e-300 {
			if e := math.Abs(erfcFast(x)-want) / want; e > worstErfc {
				worstErfc = e
			}
		} else if got := erfcFast(x); got < 0 || got > 1e-300 {
			t.Errorf("erfcFast(%v) = %v, want below 1e-300", x, got)
		}
	}
	t.Logf("erfFast worst absolute error %.2g, erfcFast worst relative error %.2g over %d points", worstErf, worstErfc, len(f.Cases))
	if worstErf > 3e-16 || worstErfc > 3e-15 {
		t.Errorf("erfFast %.2g (limit 3e-16), erfcFast %.2g (limit 3e-15)", worstErf, worstErfc)
	}
}

// The tables join continuously: at every piece boundary the two
// neighbouring pieces agree to a few units of rounding.
func TestErfFastContinuous(t *testing.T) {
	for i := 1; i < len(erfPieces); i++ {
		x := erfTableLo + float64(i)/4
		left := poly10(&erfPieces[i-1], 1)
		right := poly10(&erfPieces[i], -1)
		if math.Abs(left-right) > 4e-16 {
			t.Errorf("erf pieces %d/%d at %v: %v vs %v", i-1, i, x, left, right)
		}
		l2, r2 := poly10(&erfcxPieces[i-1], 1), poly10(&erfcxPieces[i], -1)
		if math.Abs(l2-r2) > 5e-16*r2 {
			t.Errorf("erfcx pieces %d/%d at %v: %v vs %v", i-1, i, x, l2, r2)
		}
	}
}

// A NaN argument (degenerate inputs upstream) gives NaN, as math.Erf does,
// never an index out of range (found by plume's TestExtremeInputsFinite).
func TestErfFastNaN(t *testing.T) {
	nan := math.NaN()
	if v := erfFast(nan); !math.IsNaN(v) {
		t.Errorf("erfFast(NaN) = %g", v)
	}
	if v := erfcFast(nan); !math.IsNaN(v) {
		t.Errorf("erfcFast(NaN) = %g", v)
	}
}
