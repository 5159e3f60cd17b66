package analytic

import (
	"math"
	"testing"
	"time"
)

// assertPerOp fails a benchmark whose mean time per operation exceeds
// limit, once enough iterations have run for the mean to mean something
// (the speed targets of DESIGN.md section 7 live here, not in unit tests).
func assertPerOp(b *testing.B, limit time.Duration) {
	b.Helper()
	if b.N < 1000 {
		return
	}
	per := b.Elapsed() / time.Duration(b.N)
	b.ReportMetric(float64(limit.Nanoseconds()), "target-ns/op")
	if per > limit {
		b.Errorf("%v per evaluation, target %v", per, limit)
	}
}

// erfcPairCost times two math.Erfc calls, the floor of the 1D target.
func erfcPairCost() time.Duration {
	const n = 2_000_000
	x := 0.3
	start := time.Now()
	for i := 0; i < n; i++ {
		sink += math.Erfc(x) + math.Erfc(x+1.1)
		x += 1e-9
	}
	return time.Since(start) / n
}

var sink float64

// BenchmarkErfcPair is the floor the 1D target is measured against: two
// math.Erfc calls.
func BenchmarkErfcPair(b *testing.B) {
	x := 0.3
	for i := 0; i < b.N; i++ {
		sink += math.Erfc(x) + math.Erfc(x+1.1)
		x += 1e-9
	}
}

// BenchmarkOgataBanks evaluates the 1D value over a spread of Peclet numbers
// and times (target: within 3x of BenchmarkErfcPair).
func BenchmarkOgataBanks(b *testing.B) {
	ps := []Params{{V: 0.1, Dx: 1, R: 1.4, Mu: 1e-3}, {V: 0.1, Dx: 0.01, R: 1}, {V: 1, Dx: 1e-4, R: 2, Mu: 1e-4}}
	xs := []float64{5, 50, 300}
	ts := []float64{100, 1000, 3650}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		k := i % 27
		sink += OgataBanks(xs[k%3], ts[(k/3)%3], ps[k/9])
	}
	b.StopTimer()
	if b.N >= 1000 {
		// Target: within 3x of the cost of two math.Erfc calls.
		assertPerOp(b, 3*erfcPairCost())
	}
}

// demoParams is a typical screening case (alpha_L 10 m, alpha_T 1 m,
// alpha_V 0.1 m, v 0.1 m/d, R 1.4, half-life 720 d).
var demoParams = Params{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1.4, Mu: math.Ln2 / 720}
var demoSource = Source{Width: 15, Depth: 3}

// BenchmarkExact3D evaluates the exact 3D value at receptors on and off the
// centreline, transient and steady (target: under 20 us).
func BenchmarkExact3D(b *testing.B) {
	pts := [][3]float64{{50, 0, 1}, {210, 6, 2}, {100, 20, 0}, {300, 0, 5}, {30, 5, 1}}
	ts := []float64{365, 3650, math.Inf(1)}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		q := pts[i%5]
		sink += Exact3D(q[0], q[1], q[2], ts[(i/5)%3], demoParams, demoSource)
	}
	assertPerOp(b, 20*time.Microsecond)
}

// BenchmarkDomenico evaluates the Domenico value (target: under 1 us).
func BenchmarkDomenico(b *testing.B) {
	pts := [][3]float64{{50, 0, 1}, {210, 6, 2}, {100, 20, 0}, {300, 0, 5}, {30, 5, 1}}
	ts := []float64{365, 3650, math.Inf(1)}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		q := pts[i%5]
		sink += Domenico(q[0], q[1], q[2], ts[(i/5)%3], demoParams, demoSource)
	}
	assertPerOp(b, time.Microsecond)
}
