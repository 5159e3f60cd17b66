package uncertainty

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"downgradient/plume"
)

// Percentiles of a sample, in the unit of the sampled quantity.
type Percentiles struct {
	P05 float64 `json:"p05"`
	P25 float64 `json:"p25"`
	P50 float64 `json:"p50"`
	P75 float64 `json:"p75"`
	P95 float64 `json:"p95"`
}

// PercentileMethod says how sample percentiles are computed.
const PercentileMethod = "linear interpolation between order statistics (gonum stat.Quantile with stat.LinInterp)"

// samplePercentiles returns the percentiles of x (not modified).
func samplePercentiles(x []float64) Percentiles {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	q := func(p float64) float64 { return plume.Clean(stat.Quantile(p, stat.LinInterp, s, nil)) }
	return Percentiles{P05: q(0.05), P25: q(0.25), P50: q(0.5), P75: q(0.75), P95: q(0.95)}
}

// ClopperPearson is the exact (Clopper & Pearson 1934, Biometrika 26:404-413)
// two-sided binomial confidence interval at level conf for k successes in n
// trials: the alpha/2 quantile of Beta(k, n-k+1) and the 1-alpha/2 quantile
// of Beta(k+1, n-k), with 0 and 1 at the ends.
func ClopperPearson(k, n int, conf float64) (lo, hi float64) {
	if n <= 0 {
		return 0, 1
	}
	a := (1 - conf) / 2
	lo, hi = 0, 1
	if k > 0 {
		lo = distuv.Beta{Alpha: float64(k), Beta: float64(n - k + 1)}.Quantile(a)
	}
	if k < n {
		hi = distuv.Beta{Alpha: float64(k + 1), Beta: float64(n - k)}.Quantile(1 - a)
	}
	return plume.Clean(lo), plume.Clean(hi)
}

// ranks returns the ranks of x (1-based), ties sharing their average rank.
func ranks(x []float64) []float64 {
	n := len(x)
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return x[idx[a]] < x[idx[b]] })
	r := make([]float64, n)
	for i := 0; i < n; {
		j := i
		for j+1 < n && x[idx[j+1]] == x[idx[i]] {
			j++
		}
		avg := float64(i+j)/2 + 1
		for k := i; k <= j; k++ {
			r[idx[k]] = avg
		}
		i = j + 1
	}
	return r
}

// spearman is the Pearson correlation of the ranks (Spearman's rho), given
// the ranks of both samples; 0 when either sample is constant.
func spearman(rx, ry []float64) float64 {
	c := stat.Correlation(rx, ry, nil)
	if math.IsNaN(c) || math.IsInf(c, 0) {
		return 0
	}
	return math.Max(-1, math.Min(1, c))
}
