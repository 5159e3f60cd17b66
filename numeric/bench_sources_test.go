package numeric

import (
	"context"
	"testing"
	"time"
)

// BenchmarkSources3D: the typical case (bench_test.go, on a grid twice as
// coarse as the default to keep the benchmark short) with a second,
// smaller source 50 m downgradient and 10 m off the axis, so the grid
// spans the whole width and holds two fields. Its throughput in field
// cell-steps per second is asserted to be at least 0.75 of the
// single-source run of the typical case measured in the same benchmark
// (the floor): several sources cost work in proportion to the cells of
// their fields, not more.
func BenchmarkSources3D(b *testing.B) {
	one := typicalCase()
	one.Refine = 0.5
	two := one
	two.Sources = []SourceFace{{Width: two.Width, Depth: two.Depth, Strength: 1}, {X: 50, Y: 10, Width: 5, Depth: 2, Strength: 0.5}}
	two.Width, two.Depth = 0, 0
	rate := func(p Problem3D) float64 {
		start := time.Now()
		res, err := Screen3D(context.Background(), p)
		if err != nil {
			b.Fatal(err)
		}
		return res.Grid.CellSteps / time.Since(start).Seconds()
	}
	var floor, multi float64
	for b.Loop() {
		floor += rate(one)
		multi += rate(two)
	}
	ratio := multi / floor
	b.ReportMetric(floor/float64(b.N)/1e6, "floor-Mcellsteps/s")
	b.ReportMetric(multi/float64(b.N)/1e6, "Mcellsteps/s")
	b.ReportMetric(ratio, "ratio")
	if ratio < 0.75 {
		b.Errorf("two sources run at %.2f of the single-source throughput (want >= 0.75)", ratio)
	}
}
