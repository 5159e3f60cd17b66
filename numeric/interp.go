package numeric

import "math"

// tinyC is the level below which interpolation falls back from geometric to
// linear (concentrations relative to the source).
const tinyC = 1e-250

// mix interpolates between a (w = 0) and b (w = 1). When both are positive it
// interpolates log C linearly (geometric interpolation): the fringes of a
// plume fall off like Gaussians or complementary error functions, whose
// logarithms are smooth and slowly curving, so this is far more accurate
// there than linear interpolation (which overestimates convex tails) and
// equally accurate in the core. Otherwise it is linear.
func mix(a, b, w float64) float64 {
	if w == 0 {
		return a
	}
	if a > tinyC && b > tinyC {
		return a * math.Exp(w*math.Log(b/a))
	}
	return (1-w)*a + w*b
}

// logMean is the mean over a segment of the geometric interpolant between
// its end values a and b.
func logMean(a, b float64) float64 {
	if a > tinyC && b > tinyC {
		r := b / a
		if math.Abs(r-1) < 1e-6 {
			return 0.5 * (a + b)
		}
		return (b - a) / math.Log(r)
	}
	return 0.5 * (a + b)
}

// clamp01 removes round-off excursions (of order 1e-16) outside the range
// that the schemes guarantee in exact arithmetic: no negative values, no
// value above the source.
func clamp01(v float64) float64 {
	return math.Min(1, math.Max(0, v))
}
