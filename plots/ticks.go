package plots

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
)

// The one number formatter of every label a figure writes: tick labels,
// legend entries, the scale bar, the first-exceedance mark. It prints what
// a reader would write by hand: no binary float noise (0.6, never
// 0.6000000000000001), no "-0", plain decimals from 0.0001 to below a
// million and "1.5e-07" style outside that range.

// FormatNumber writes v with at most four significant digits, trailing
// zeros dropped (0.005, 12, 1116, 0.1288, 2.5e-07).
func FormatNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	if v == 0 {
		return "0"
	}
	a := math.Abs(v)
	var s string
	if a >= 1e-4 && a < 1e6 {
		// Round to 4 significant digits, then print without noise.
		digits := 3 - int(math.Floor(math.Log10(a)))
		if digits < 0 {
			p := math.Pow(10, float64(-digits))
			s = strconv.FormatFloat(math.Round(v/p)*p, 'f', 0, 64)
		} else {
			s = trimZeros(strconv.FormatFloat(v, 'f', digits, 64))
		}
	} else {
		s = strconv.FormatFloat(v, 'e', 3, 64)
		mant, exp, _ := strings.Cut(s, "e")
		s = trimZeros(mant) + "e" + exp
	}
	return noNegativeZero(s)
}

// tickLabel writes v, a multiple of step, with the decimals step needs,
// trailing zeros dropped (0, 0.2, 1, 1.2).
func tickLabel(v, step float64) string {
	dec := 0
	if step > 0 && step < 1 {
		dec = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	if step > 0 {
		v = math.Round(v/step) * step
	}
	return noNegativeZero(trimZeros(strconv.FormatFloat(v, 'f', dec, 64)))
}

// trimZeros drops trailing zeros after a decimal point, and the point.
func trimZeros(s string) string {
	if !strings.Contains(s, ".") {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

// noNegativeZero turns "-0", "-0.00" and the like into their unsigned form.
func noNegativeZero(s string) string {
	if strings.HasPrefix(s, "-") && strings.Trim(s[1:], "0.") == "" {
		return s[1:]
	}
	return s
}

// roundTicks places major ticks at 1, 2 or 5 times a power of ten, about
// six across the range, labelled by tickLabel.
type roundTicks struct{}

func (roundTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	step := math.Pow(10, math.Floor(math.Log10((hi-lo)/6)))
	for _, k := range []float64{1, 2, 5, 10} {
		if (hi-lo)/(k*step) <= 7 {
			step *= k
			break
		}
	}
	var ts []plot.Tick
	first := math.Ceil(lo/step - 1e-9)
	for i := first; i*step <= hi+step*1e-9; i++ {
		v := i * step
		ts = append(ts, plot.Tick{Value: v, Label: tickLabel(v, step)})
		for m := 1; m < 5; m++ {
			if mv := v + float64(m)*step/5; mv <= hi {
				ts = append(ts, plot.Tick{Value: mv})
			}
		}
	}
	return ts
}

// depthTicks are roundTicks for an axis that holds minus a depth: the
// labels are the depths (positive down).
type depthTicks struct{}

func (depthTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := roundTicks{}.Ticks(lo, hi)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = noNegativeZero(strings.TrimPrefix(ts[i].Label, "-"))
			if ts[i].Value > 0 {
				ts[i].Label = "" // above the water table: nothing to label
			}
		}
	}
	return ts
}

// decadeTicks is the tick marker of an axis holding log10 of a value: the
// powers of ten within the range are labelled by FormatNumber (0.001, 1,
// 100, 1e-07), with minor ticks at 2 to 9 times each power. Over more than
// eight decades only every second or third power is labelled.
type decadeTicks struct{}

func (decadeTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	every := 1.0
	switch span := hi - lo; {
	case span > 16:
		every = 3
	case span > 8:
		every = 2
	}
	var ts []plot.Tick
	for e := math.Floor(lo); e <= math.Ceil(hi); e++ {
		if e >= lo && e <= hi {
			label := ""
			if math.Mod(e, every) == 0 {
				label = FormatNumber(math.Pow(10, e))
			}
			ts = append(ts, plot.Tick{Value: e, Label: label})
		}
		if every > 1 {
			continue
		}
		for k := 2.0; k <= 9; k++ {
			if v := e + math.Log10(k); v >= lo && v <= hi {
				ts = append(ts, plot.Tick{Value: v})
			}
		}
	}
	return ts
}
