package analytic

import (
	"math"
	"testing"
	"time"
)

// benchChain is a 4-compound chain with equal retardation, half-lives of
// the order of the chlorinated ethenes' (test data) and molar-mass yields.
var benchChain = serialChain(equalR(2), [4]float64{720, 1100, 1800, 540})

var (
	benchPoint = Point{X: 210, Y: 6, Top: 2, Bottom: 2}
	benchC0    = []float64{1, 0, 0, 0}
)

const benchTime = 3650.0

// singleExactCost times one single-compound exact value (the parent's
// rate) at the receptor and time of the chain benchmark: the floor of its
// target.
func singleExactCost(n int) time.Duration {
	p := demoParams
	p.R, p.Mu = benchChain[0].R, benchChain[0].Mu
	start := time.Now()
	for i := 0; i < n; i++ {
		sink += Exact3DAt(benchPoint, benchTime, p, demoSource, History{})
	}
	return time.Since(start) / time.Duration(n)
}

// BenchmarkChainExact3D evaluates every compound of the chain by the exact
// 3D solution at one receptor and time (the decoupled terms: one
// single-compound value per distinct rate). Target (issue 13): at most 5x
// the cost of one single-compound exact value, measured in the same run.
func BenchmarkChainExact3D(b *testing.B) {
	var out [4]float64
	for i := 0; i < b.N; i++ {
		if err := ChainExact3DAt(benchPoint, benchTime, demoParams, demoSource, History{}, benchChain, benchC0, out[:]); err != nil {
			b.Fatal(err)
		}
		sink += out[3]
	}
	b.StopTimer()
	reportRatio(b, 5, singleExactCost)
}

// BenchmarkChainExact3DRepeated is the same chain with the parent's and
// its daughter's half-lives equal: the repeated-rate limit, which those
// compounds take from the age integral. Reported, not asserted.
func BenchmarkChainExact3DRepeated(b *testing.B) {
	c := serialChain(equalR(2), [4]float64{720, 720, 1800, 540})
	var out [4]float64
	for i := 0; i < b.N; i++ {
		if err := ChainExact3DAt(benchPoint, benchTime, demoParams, demoSource, History{}, c, benchC0, out[:]); err != nil {
			b.Fatal(err)
		}
		sink += out[3]
	}
	b.StopTimer()
	reportRatio(b, math.Inf(1), singleExactCost)
}

// BenchmarkChainDomenico: the Domenico approximation of the chain.
func BenchmarkChainDomenico(b *testing.B) {
	var out [4]float64
	for i := 0; i < b.N; i++ {
		_ = ChainDomenicoAt(benchPoint, benchTime, demoParams, demoSource, History{}, benchChain, benchC0, out[:])
		sink += out[3]
	}
}

// BenchmarkChainColumnLaplace: the 1D chain with distinct retardation
// factors by the Laplace-domain solution (one time).
func BenchmarkChainColumnLaplace(b *testing.B) {
	c := serialChain([4]float64{3.6, 2.2, 1.6, 1.2}, [4]float64{720, 1100, 1800, 540})
	p := Params{V: 0.1, Dx: 1}
	var out [4]float64
	for i := 0; i < b.N; i++ {
		_ = ChainColumnAt(210, benchTime, p, FirstType, History{}, c, benchC0, out[:])
		sink += out[3]
	}
}

// reportRatio reports the time per operation as a multiple of floor (timed
// here, after the benchmark loop) and fails the benchmark above limit once
// enough iterations ran for the mean to mean something.
func reportRatio(b *testing.B, limit float64, floor func(n int) time.Duration) {
	b.Helper()
	if b.N < 50 {
		return
	}
	per := b.Elapsed() / time.Duration(b.N)
	f := floor(max(b.N, 500))
	ratio := float64(per) / float64(f)
	b.ReportMetric(float64(f.Nanoseconds()), "floor-ns/op")
	b.ReportMetric(ratio, "x-floor")
	if ratio > limit {
		b.Errorf("%v per chain evaluation, %.2fx the floor %v (target %gx)", per, ratio, f, limit)
	}
}
