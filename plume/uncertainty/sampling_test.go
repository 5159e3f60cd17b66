package uncertainty

import (
	"encoding/json"
	"math"
	"os"
	"sort"
	"testing"
)

// uncertaintyReference is testdata/reference/uncertainty_reference.json,
// written by gen_uncertainty.py from scipy.stats.
type uncertaintyReference struct {
	Distributions []struct {
		Name          string         `json:"name"`
		Spec          map[string]any `json:"spec"`
		Probabilities []float64      `json:"probabilities"`
		Quantiles     []float64      `json:"quantiles"`
		Mean          float64        `json:"mean"`
		Std           float64        `json:"std"`
	} `json:"distributions"`
	ClopperPearson []struct {
		K, N   int
		Lo, Hi float64
	} `json:"clopper_pearson_95"`
	StudentT []struct {
		DF float64 `json:"df"`
		Q  float64 `json:"q"`
	} `json:"student_t_975"`
}

func loadUncertaintyReference(t *testing.T) uncertaintyReference {
	t.Helper()
	b, err := os.ReadFile("../../testdata/reference/uncertainty_reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref uncertaintyReference
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	return ref
}

// parseDist decodes a distribution object of the reference file.
func parseDist(t *testing.T, spec map[string]any) Distribution {
	t.Helper()
	b, err := json.Marshal(spec)
	if err != nil {
		t.Fatal(err)
	}
	var d Distribution
	if err := json.Unmarshal(b, &d); err != nil {
		t.Fatal(err)
	}
	sort.Float64s(d.Values)
	if member, msg := d.Check(); member != "" {
		t.Fatalf("parse %v: %s %s", spec, member, msg)
	}
	return d
}

// Distribution.Quantile and Mean against scipy.stats (lognorm, uniform,
// loguniform, triang ppf and mean; testdata/reference/gen_uncertainty.py).
func TestSamplingDistributionQuantiles(t *testing.T) {
	ref := loadUncertaintyReference(t)
	for _, rd := range ref.Distributions {
		t.Run(rd.Name, func(t *testing.T) {
			d := parseDist(t, rd.Spec)
			for i, p := range rd.Probabilities {
				if got, want := d.Quantile(p), rd.Quantiles[i]; math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
					t.Errorf("Q(%g) = %.17g, scipy %.17g", p, got, want)
				}
			}
			if got := d.Mean(); math.Abs(got-rd.Mean) > 1e-12*rd.Mean {
				t.Errorf("mean %.17g, scipy %.17g", got, rd.Mean)
			}
		})
	}
}

// Latin hypercube marginals reproduce each distribution's quantiles and
// moments (reference values from scipy.stats, gen_uncertainty.py). With
// one draw in each of n equal-probability strata, the sample's empirical
// CDF is within 1/n of the true CDF everywhere (McKay, Beckman & Conover
// 1979, Technometrics 21(2):239-245, stratification property), so the
// sample p-quantile lies between Q(p - 2/n) and Q(p + 2/n). The sample mean
// is checked within 4 standard errors of simple random sampling,
// 4 std/sqrt(n) (Latin hypercube's variance is no larger for monotone
// functions, McKay et al. 1979), and the sample standard deviation within 5 %.
func TestSamplingLatinHypercubeMarginals(t *testing.T) {
	ref := loadUncertaintyReference(t)
	const n = 2000
	var params []UncertainParameter
	for _, rd := range ref.Distributions {
		params = append(params, UncertainParameter{Dist: parseDist(t, rd.Spec)})
	}
	params = append(params, UncertainParameter{Dist: Distribution{Kind: DistEmpirical, Values: []float64{1, 2, 2, 7}}})
	s := SampleLatinHypercube(params, n, 42)
	if len(s) != n {
		t.Fatalf("%d rows", len(s))
	}
	for j, rd := range ref.Distributions {
		t.Run(rd.Name, func(t *testing.T) {
			col := make([]float64, n)
			sum := 0.0
			for i := range s {
				col[i] = s[i][j]
				sum += col[i]
			}
			sort.Float64s(col)
			d := params[j].Dist
			for _, p := range rd.Probabilities {
				q := col[int(math.Ceil(p*n))-1]
				lo, hi := d.Quantile(math.Max(p-2.0/n, 0)), d.Quantile(math.Min(p+2.0/n, 1))
				if q < lo || q > hi {
					t.Errorf("sample p%.0f = %g outside [%g, %g]", 100*p, q, lo, hi)
				}
			}
			mean := sum / n
			if tol := 4 * rd.Std / math.Sqrt(n); math.Abs(mean-rd.Mean) > tol {
				t.Errorf("sample mean %g, scipy %g (tolerance %g)", mean, rd.Mean, tol)
			}
			ss := 0.0
			for _, v := range col {
				ss += (v - mean) * (v - mean)
			}
			if sd := math.Sqrt(ss / (n - 1)); math.Abs(sd-rd.Std) > 0.05*rd.Std {
				t.Errorf("sample std %g, scipy %g", sd, rd.Std)
			}
		})
	}
	// Empirical: each listed value equally likely, so 1 and 7 take a quarter
	// of the sample each and 2 half (exactly n/4 +- 1 by stratification).
	counts := map[float64]int{}
	for i := range s {
		counts[s[i][len(params)-1]]++
	}
	for v, want := range map[float64]int{1: n / 4, 2: n / 2, 7: n / 4} {
		if c := counts[v]; c < want-1 || c > want+1 {
			t.Errorf("empirical value %g drawn %d times, want %d +- 1", v, c, want)
		}
	}
}

// A seed reproduces a sample bit for bit; another seed gives another sample.
func TestSamplingReproducible(t *testing.T) {
	params := []UncertainParameter{
		{Dist: Distribution{Kind: DistLognormal, P05: 2, P95: 40}},
		{Dist: Distribution{Kind: DistUniform, Min: 0, Max: 1}},
	}
	a := SampleLatinHypercube(params, 500, 7)
	b := SampleLatinHypercube(params, 500, 7)
	c := SampleLatinHypercube(params, 500, 8)
	same, differ := true, false
	for i := range a {
		for j := range a[i] {
			if math.Float64bits(a[i][j]) != math.Float64bits(b[i][j]) {
				same = false
			}
			if a[i][j] != c[i][j] {
				differ = true
			}
		}
	}
	if !same {
		t.Error("same seed, different samples")
	}
	if !differ {
		t.Error("different seeds, same samples")
	}
}

// Clopper-Pearson intervals against scipy.stats.beta.ppf (gen_uncertainty.py).
func TestSamplingClopperPearson(t *testing.T) {
	ref := loadUncertaintyReference(t)
	for _, c := range ref.ClopperPearson {
		lo, hi := ClopperPearson(c.K, c.N, 0.95)
		if math.Abs(lo-c.Lo) > 1e-9 || math.Abs(hi-c.Hi) > 1e-9 {
			t.Errorf("k=%d n=%d: [%.12g, %.12g], scipy [%.12g, %.12g]", c.K, c.N, lo, hi, c.Lo, c.Hi)
		}
	}
}

// Ranks with ties and Spearman's rho: a monotone transform has rho 1, a
// reversed one -1 (definition of rank correlation, Spearman 1904).
func TestSamplingRanks(t *testing.T) {
	r := ranks([]float64{10, 20, 20, 5})
	want := []float64{2, 3.5, 3.5, 1}
	for i := range r {
		if r[i] != want[i] {
			t.Fatalf("ranks %v, want %v", r, want)
		}
	}
	x := []float64{1, 5, 2, 8, 3}
	y := []float64{math.Exp(1), math.Exp(5), math.Exp(2), math.Exp(8), math.Exp(3)}
	if rho := spearman(ranks(x), ranks(y)); math.Abs(rho-1) > 1e-12 {
		t.Errorf("rho %g, want 1", rho)
	}
	neg := []float64{-1, -5, -2, -8, -3}
	if rho := spearman(ranks(x), ranks(neg)); math.Abs(rho+1) > 1e-12 {
		t.Errorf("rho %g, want -1", rho)
	}
	if rho := spearman(ranks(x), ranks([]float64{4, 4, 4, 4, 4})); rho != 0 {
		t.Errorf("constant: rho %g, want 0", rho)
	}
}
