package numeric

import (
	"context"
	"math"
	"testing"

	"downgradient/analytic"
)

// BenchmarkSolve1D: a 2000-cell column run for 2000 steps; reports the
// throughput in cell-steps per second (target >= 30 million on one core,
// asserted).
func BenchmarkSolve1D(b *testing.B) {
	p := Problem1D{V: 1, Dx: 0.5, R: 1, Mu: 0.001, Receptors: []float64{50, 150},
		Times: []float64{200}, Grid: UniformAxis(200, 2000), Courant: 1}
	var cellSteps float64
	for b.Loop() {
		res, err := Screen1D(context.Background(), p)
		if err != nil {
			b.Fatal(err)
		}
		cellSteps = res.Grid.CellSteps
	}
	rate := cellSteps * float64(b.N) / b.Elapsed().Seconds()
	b.ReportMetric(rate/1e6, "Mcellsteps/s")
	if rate < 30e6 {
		b.Errorf("throughput %.3g cell-steps/s is below the 3e7 target", rate)
	}
}

// typicalCase is the typical screening case of issue 3: source 15 m wide and
// 3 m deep, alpha_L 10 m, alpha_T 1 m, alpha_V 0.1 m, v 0.1 m/d (so
// Dx = 1, Dy = 0.1, Dz = 0.01 m^2/d), receptors out to 300 m, output at 1, 5
// and 10 years. The values are invented for the benchmark.
func typicalCase() Problem3D {
	p := Problem3D{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1, Width: 15, Depth: 3,
		Times: []float64{365, 1825, 3650}}
	for _, x := range []float64{25, 50, 100, 150, 200, 300} {
		for _, y := range []float64{0, 5, 7.5, 10, 15, 20} {
			for _, z := range []float64{0, 1.5, 3, 4.5, 6} {
				p.Receptors = append(p.Receptors, Receptor{X: x, Y: y, Top: z, Bottom: z})
			}
		}
	}
	return p
}

// worstRelativeError compares with the exact solution (analytic.Exact3D,
// the time integral of Wexler 1992) wherever it exceeds 1e-3.
func worstRelativeError(p Problem3D, res *Result3D) (worst float64, at Receptor, when float64) {
	ap := analytic.Params{V: p.V, Dx: p.Dx, Dy: p.Dy, Dz: p.Dz, R: p.R, Mu: p.Mu}
	src := analytic.Source{Width: p.Width, Depth: p.Depth}
	for r, rc := range p.Receptors {
		for k, t := range p.Times {
			ex := analytic.Exact3DAt(analytic.Point{X: rc.X, Y: rc.Y, Top: rc.Top, Bottom: rc.Bottom}, t, ap, src, analytic.History{})
			if ex > 1e-3 {
				if e := math.Abs(res.C[r][k]-ex) / ex; e > worst {
					worst, at, when = e, rc, t
				}
			}
		}
	}
	return worst, at, when
}

// BenchmarkSolve3D: the typical case with the automatic grid; asserts
// agreement within 5 % of the exact solution where it exceeds 1e-3 and a
// run time under 3 s.
func BenchmarkSolve3D(b *testing.B) {
	bench3D(b, typicalCase())
}

// BenchmarkSolve3DNearSource: the typical case with receptors also 10 m from
// the source (one longitudinal dispersivity), where the plume is young and
// changes fastest across; same assertions.
func BenchmarkSolve3DNearSource(b *testing.B) {
	p := typicalCase()
	for _, y := range []float64{0, 5, 7.5, 10, 15, 20} {
		for _, z := range []float64{0, 1.5, 3, 4.5, 6} {
			p.Receptors = append(p.Receptors, Receptor{X: 10, Y: y, Top: z, Bottom: z})
		}
	}
	bench3D(b, p)
}

func bench3D(b *testing.B, p Problem3D) {
	var res *Result3D
	for b.Loop() {
		var err error
		res, err = Screen3D(context.Background(), p)
		if err != nil {
			b.Fatal(err)
		}
	}
	sec := b.Elapsed().Seconds() / float64(b.N)
	b.StopTimer()
	worst, at, when := worstRelativeError(p, res)
	b.ReportMetric(worst*100, "worst%")
	b.ReportMetric(float64(res.Grid.Cells), "cells")
	b.ReportMetric(res.Grid.CellSteps/sec/1e6, "Mcellsteps/s")
	if worst > 0.05 {
		b.Errorf("worst relative error %.3g at %+v, t = %g exceeds 5 %%", worst, at, when)
	}
	if sec > 3 {
		b.Errorf("%.3g s per solve exceeds the 3 s target", sec)
	}
}
