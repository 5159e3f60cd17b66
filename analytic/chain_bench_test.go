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

// singleExact is one single-compound exact value (the parent's rate) at
// the receptor and time of the chain benchmark: the floor of its target.
func singleExact() {
	p := demoParams
	p.R, p.Mu = benchChain[0].R, benchChain[0].Mu
	sink += Exact3DAt(benchPoint, benchTime, p, demoSource, History{})
}

// BenchmarkChainExact3D evaluates every compound of the chain by the exact
// 3D solution at one receptor and time (the decoupled terms: one
// single-compound value per distinct rate). Target (issue 13): at most 5x
// the cost of one single-compound exact value, measured in the same run.
func BenchmarkChainExact3D(b *testing.B) {
	var out [4]float64
	op := func() {
		if err := ChainExact3DAt(benchPoint, benchTime, demoParams, demoSource, History{}, benchChain, benchC0, out[:]); err != nil {
			b.Fatal(err)
		}
		sink += out[3]
	}
	for i := 0; i < b.N; i++ {
		op()
	}
	b.StopTimer()
	reportRatio(b, 5, op, singleExact)
}

// BenchmarkChainExact3DRepeated is the same chain with the parent's and
// its daughter's half-lives equal: the repeated-rate limit, which those
// compounds take from the age integral. Reported, not asserted.
func BenchmarkChainExact3DRepeated(b *testing.B) {
	c := serialChain(equalR(2), [4]float64{720, 720, 1800, 540})
	var out [4]float64
	op := func() {
		if err := ChainExact3DAt(benchPoint, benchTime, demoParams, demoSource, History{}, c, benchC0, out[:]); err != nil {
			b.Fatal(err)
		}
		sink += out[3]
	}
	for i := 0; i < b.N; i++ {
		op()
	}
	b.StopTimer()
	reportRatio(b, math.Inf(1), op, singleExact)
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

// reportRatio reports the cost of one chain evaluation (op) as a multiple
// of floor and fails the benchmark above limit. Both are timed here, after
// the benchmark loop, in alternating batches, and each is the fastest of
// its batches: on a shared machine the interference then inflates neither
// (the mean of the loop, ns/op, is reported by the benchmark as usual).
func reportRatio(b *testing.B, limit float64, op func(), floor func()) {
	b.Helper()
	if b.N < 20 {
		return
	}
	const batches, per = 7, 64
	best := func(f func()) time.Duration {
		start := time.Now()
		for i := 0; i < per; i++ {
			f()
		}
		return time.Since(start) / per
	}
	tOp, tFloor := time.Duration(math.MaxInt64), time.Duration(math.MaxInt64)
	for k := 0; k < batches; k++ {
		tOp = min(tOp, best(op))
		tFloor = min(tFloor, best(floor))
	}
	ratio := float64(tOp) / float64(tFloor)
	b.ReportMetric(float64(tFloor.Nanoseconds()), "floor-ns/op")
	b.ReportMetric(ratio, "x-floor")
	if ratio > limit {
		b.Errorf("%v per chain evaluation, %.2fx the floor %v (target %gx)", tOp, ratio, tFloor, limit)
	}
}

// BenchmarkChainExact3DSingles times the four single-compound values the
// decoupled chain evaluation needs, for comparison (no target).
func BenchmarkChainExact3DSingles(b *testing.B) {
	for i := 0; i < b.N; i++ {
		for _, k := range benchChain {
			p := demoParams
			p.R, p.Mu = k.R, k.Mu
			sink += Exact3DAt(benchPoint, benchTime, p, demoSource, History{})
		}
	}
}
