package api

import (
	"math"
	"strconv"
	"strings"
)

// The report's number formats. Concentrations, times and derived
// parameters are measurements: four significant digits, a power of ten
// written as "× 10⁻⁵". Coordinates are identifiers of a place: every digit
// the request gave, all values of a column to the same decimals.

// floorText stands for a concentration below the reporting floor
// (derived.concentration_floor), which the engine returns as 0.
const floorText = "< floor"

// fmtReportNumber prints 4 significant digits without noise (1.23 × 10⁻⁵, 0.1288, 1450).
func fmtReportNumber(v float64) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return "0"
	}
	s := strconv.FormatFloat(v, 'g', 4, 64)
	if strings.Contains(s, "e") {
		mant, exp, _ := strings.Cut(s, "e")
		e, _ := strconv.Atoi(exp)
		return mant + " × 10" + superscript(e)
	}
	return s
}

// superscript writes an integer in Unicode superscript digits.
func superscript(n int) string {
	const digits = "⁰¹²³⁴⁵⁶⁷⁸⁹"
	sup := []rune(digits)
	var b strings.Builder
	if n < 0 {
		b.WriteRune('⁻')
		n = -n
	}
	for _, ch := range strconv.Itoa(n) {
		b.WriteRune(sup[ch-'0'])
	}
	return b.String()
}

// optNum prints a number that may be absent ("—").
func optNum(p *float64) string {
	if p == nil {
		return "—"
	}
	return fmtReportNumber(*p)
}

// fmtConcentration prints a reported concentration: "< floor" for the 0
// the engine reports below the floor, else four significant digits.
func fmtConcentration(v float64) string {
	if v == 0 {
		return floorText
	}
	return fmtReportNumber(v)
}

// fmtAboveFloor prints a concentration the engine did not floor itself
// (a percentile over realizations): "< floor" below floor.
func fmtAboveFloor(v, floor float64) string {
	if v < floor {
		return floorText
	}
	return fmtConcentration(v)
}

// maxCoordDecimals caps the decimals of a coordinate column (a
// millimetre in metres).
const maxCoordDecimals = 3

// coordDecimals is the number of decimals that writes every value of a
// column exactly as given (its shortest round-trip form), at most
// maxCoordDecimals.
func coordDecimals(vs []float64) int {
	d := 0
	for _, v := range vs {
		s := strconv.FormatFloat(math.Abs(v), 'f', -1, 64)
		if _, frac, ok := strings.Cut(s, "."); ok {
			d = max(d, len(frac))
		}
	}
	return min(d, maxCoordDecimals)
}

// fmtCoord writes a coordinate with dec decimals, digits of numbers from
// 10,000 on grouped by threes with a narrow no-break space (512 391.4).
func fmtCoord(v float64, dec int) string {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.HasPrefix(s, "-") && strings.Trim(s[1:], "0.") == "" {
		s = s[1:]
	}
	sign := ""
	if strings.HasPrefix(s, "-") {
		sign, s = "-", s[1:]
	}
	whole, frac, hasFrac := strings.Cut(s, ".")
	if len(whole) > 4 {
		var b strings.Builder
		for i, ch := range whole {
			if i > 0 && (len(whole)-i)%3 == 0 {
				b.WriteRune('\u202f')
			}
			b.WriteRune(ch)
		}
		whole = b.String()
	}
	if hasFrac {
		return sign + whole + "." + frac
	}
	return sign + whole
}

// fmtPercent writes a probability as a whole percentage, "< 1 %" and
// "> 99 %" near the ends so that a small chance never reads as none.
func fmtPercent(p float64) string {
	switch {
	case p == 0:
		return "0 %"
	case p < 0.01:
		return "< 1 %"
	case p == 1:
		return "100 %"
	case p > 0.99:
		return "> 99 %"
	}
	return strconv.FormatFloat(math.Round(100*p), 'f', 0, 64) + " %"
}
