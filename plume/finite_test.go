package plume

import (
	"context"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"
)

// Issue 12, items 1 and 8: every scenario that validates gives finite
// output without a panic, and no caveat prints +Inf or NaN. The cases
// below were found by a random search over extreme values (before: a
// decay-rate caveat printing "+Inf per d" for a half-life of 5e-324 d, a
// seepage-velocity caveat printing "+Inf m/d" for a porosity of 5e-324, and
// a makeslice panic in the peak search, whose sample count overflowed int
// for a conductivity of 1e-308). Inputs whose derived values overflow are
// refused naming the input instead.
func TestExtremeInputsFinite(t *testing.T) {
	cases := []map[string]float64{
		{"contaminant.half_life": 5e-324},
		{"aquifer.effective_porosity": 5e-324},
		{"aquifer.hydraulic_conductivity": 1e-308, "contaminant.koc": 1e-300, "source.half_life": 1e300},
		{"aquifer.hydraulic_conductivity": 1e-308},
		{"source.half_life": 5e-324},
		{"source.x": -1e308, "receptors.0.x": 1e308},
		{"aquifer.dispersivity.longitudinal": 1e308, "aquifer.hydraulic_conductivity": 1e308},
		{"source.duration": 1e-300},
		{"times.0": 1e308},
	}
	for _, c := range cases {
		checkExtreme(t, c, "")
	}
	// Times given in years that overflow in days.
	checkExtreme(t, map[string]float64{"times.0": 1e308}, TimeYear)
	checkExtreme(t, map[string]float64{"source.duration": 1e308}, TimeYear)
	// A seeded random search over the same kind of values; set
	// DOWNGRADIENT_EXTREME_N for a longer run (20,000 took 9 minutes).
	n := 120
	if v, err := strconv.Atoi(os.Getenv("DOWNGRADIENT_EXTREME_N")); err == nil {
		n = v
	}
	paths := []string{"aquifer.hydraulic_conductivity", "aquifer.hydraulic_gradient", "aquifer.effective_porosity",
		"contaminant.half_life", "source.concentration", "source.width", "source.depth", "aquifer.dispersivity.longitudinal",
		"aquifer.dispersivity.transverse", "aquifer.dispersivity.vertical", "receptors.0.x", "receptors.0.y", "receptors.1.x",
		"times.0", "source.duration", "source.half_life", "source.x", "contaminant.screening_level", "aquifer.bulk_density",
		"aquifer.organic_carbon_fraction", "contaminant.koc"}
	vals := []float64{1e308, 1e-308, 1e300, 1e-300, 1e200, 1e-200, 1e30, 1e-30, 1e10, 1e-10, 0.999999, 5e-324}
	rng := rand.New(rand.NewPCG(12, 1))
	for range n {
		c := map[string]float64{}
		for range 1 + rng.IntN(3) {
			c[paths[rng.IntN(len(paths))]] = vals[rng.IntN(len(vals))]
		}
		checkExtreme(t, c, "")
	}
}

// checkExtreme screens the demo with the values set (exact and Domenico):
// it must be refused as invalid, or give a result that encodes as JSON
// (no NaN or Inf) whose caveats print no Inf or NaN.
func checkExtreme(t *testing.T, set map[string]float64, timeUnit string) {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal([]byte(mustJSON(demoScenario())), &m); err != nil {
		t.Fatal(err)
	}
	m["methods"] = []any{"exact", "domenico"}
	if timeUnit != "" {
		m["units"] = map[string]any{"time": timeUnit}
	}
	for path, v := range set {
		setPath(m, path, v)
	}
	js, _ := json.Marshal(m)
	var sc Scenario
	if err := json.Unmarshal(js, &sc); err != nil {
		t.Fatal(err)
	}
	var res *Result
	var err error
	func() {
		defer func() {
			if r := recover(); r != nil {
				t.Fatalf("%v: panic %v", set, r)
			}
		}()
		res, err = Screen(context.Background(), sc, Options{})
	}()
	if err != nil {
		if e, ok := AsError(err); !ok || e.Kind != KindInvalid {
			t.Errorf("%v: error %v", set, err)
		}
		return
	}
	if _, err := json.Marshal(res); err != nil {
		t.Errorf("%v: result does not encode: %v", set, err)
	}
	for _, cv := range res.Caveats {
		if strings.Contains(cv.Message, "Inf") || strings.Contains(cv.Message, "NaN") {
			t.Errorf("%v: caveat %s: %s", set, cv.Code, cv.Message)
		}
	}
}

// setPath sets a number at a dotted path of a JSON tree ("receptors.0.x").
func setPath(m map[string]any, path string, v float64) {
	segs := strings.Split(path, ".")
	var cur any = m
	for i, s := range segs {
		last := i == len(segs)-1
		switch c := cur.(type) {
		case map[string]any:
			if last {
				c[s] = v
				return
			}
			if _, ok := c[s]; !ok {
				c[s] = map[string]any{}
			}
			cur = c[s]
		case []any:
			idx, err := strconv.Atoi(s)
			if err != nil || idx >= len(c) {
				panic(fmt.Sprintf("bad path %q", path))
			}
			if last {
				c[idx] = v
				return
			}
			cur = c[idx]
		}
	}
}

// The same for several compounds (the invented dry-cleaner demo, in
// years): a half-life that overflows in days, or whose decay rate
// overflows, is refused naming the compound's field.
func TestExtremeCompoundsFinite(t *testing.T) {
	for _, v := range []float64{1e308, 5e-324} {
		sc := dryCleaner(t)
		sc.Contaminants[1].HalfLife = &v
		_, err := Screen(context.Background(), sc, Options{})
		fe := FieldsOf(err)
		if len(fe) == 0 || fe[0].Field != "contaminants[1].half_life" {
			t.Errorf("half-life %g yr: %v", v, err)
		}
	}
}
