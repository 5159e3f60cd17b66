package plume

import (
	"context"
	"fmt"
	"testing"
	"time"

	"downgradient/internal/plumetest"
)

// benchScenario is the demo with 10 receptors and 10 times (invented data).
func benchScenario(methods ...string) Scenario {
	sc := demoScenario()
	sc.Receptors = nil
	for i := range 10 {
		x, y, z := plumetest.BenchReceptor(i)
		sc.Receptors = append(sc.Receptors, Receptor{ID: fmt.Sprintf("W%d", i), X: f(x), Y: f(y), Z: f(z)})
	}
	sc.Times = plumetest.BenchTimes()
	sc.Methods = methods
	return sc
}

func BenchmarkScreenClosedForm(b *testing.B) {
	sc := benchScenario(MethodExact, MethodDomenico)
	for b.Loop() {
		if _, err := Screen(context.Background(), sc, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkScreenWithNumeric(b *testing.B) {
	sc := benchScenario()
	for b.Loop() {
		if _, err := Screen(context.Background(), sc, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// timePer measures the mean time of f over at least 200 ms.
func timePer(f func()) time.Duration {
	n, start := 0, time.Now()
	for time.Since(start) < 200*time.Millisecond {
		f()
		n++
	}
	return time.Since(start) / time.Duration(n)
}

// BenchmarkTransectDischarge: one transect's mass discharge at one time,
// exact (issue 14 target: under 1 ms). The target is asserted as a ratio
// to one exact 3D value averaged over the transect's depth interval,
// measured in the same run: at most 80 of them (the quadrature takes about
// 55), which is under 1 ms once one value costs under 12 us.
func BenchmarkTransectDischarge(b *testing.B) {
	md, err := Prepare(demoScenario())
	if err != nil {
		b.Fatal(err)
	}
	m := md.m
	tp := m.newTransectPlan(Transect{From: [2]float64{150, -80}, To: [2]float64{150, 80}, Bottom: f(12)}, 0)
	p := md.Locate(150, 5, 0, 12)
	one := timePer(func() { _ = m.closedForm(true, p, 1825) })
	b.ResetTimer()
	for b.Loop() {
		_ = m.massDischarge(&tp, true, 1825)
	}
	b.StopTimer()
	per := b.Elapsed() / time.Duration(b.N)
	b.ReportMetric(float64(per)/float64(one), "exact-values/op")
	if b.N > 20 && per > 80*one {
		b.Errorf("%v per discharge, more than 80 exact values (%v each)", per, one)
	}
}

// BenchmarkTenSources: ten sources x 100 receptors x 5 times with the
// closed forms, against one source with the same receptors and times in
// the same run (issue 14 target: at most 12 times the one-source cost).
func BenchmarkTenSources(b *testing.B) {
	base, ten := tenSourceLayer()
	screen := func(sc Scenario) func() {
		return func() {
			if _, err := Screen(context.Background(), sc, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	}
	for b.Loop() {
		screen(ten)()
	}
	b.StopTimer()
	ratio, one, per := minRatio(15, screen(base), screen(ten))
	b.ReportMetric(ratio, "x-one-source")
	if ratio > 12 {
		b.Errorf("ten sources %v, %.1f times one source (%v); target at most 12", per, ratio, one)
	}
}

// tenSourceLayer is the demo with 100 receptors (a line along the flow,
// stepping across it) and 5 times (invented), and the same with ten
// sources 12 m wide, three deep along the flow and ten across, in place
// of its source.
func tenSourceLayer() (one, ten Scenario) {
	one = demoScenario()
	one.Receptors = nil
	for i := range 100 {
		one.Receptors = append(one.Receptors, Receptor{ID: fmt.Sprintf("R%d", i), X: f(30 + 4*float64(i)), Y: f(float64(i%9)*10 - 40), Z: f(1)})
	}
	one.Times = []float64{365, 730, 1825, 3650, 7300}
	ten = one
	for i := range 10 {
		s := one.Source
		s.ID, s.X, s.Y, s.Width = fmt.Sprintf("S%d", i), f(-float64(i%3)*20), f(float64(i)*20-100), f(12)
		ten.Sources = append(ten.Sources, s)
	}
	ten.Source = Source{}
	return one, ten
}

// minRatio runs a and b alternately, rounds times each, and returns the
// ratio of b's fastest run to a's fastest, with those two times: noise on a
// shared machine only adds time, so the fastest runs are the closest to
// the work itself, and alternating exposes both to the same conditions.
func minRatio(rounds int, a, c func()) (float64, time.Duration, time.Duration) {
	fastest := func(f func(), best time.Duration) time.Duration {
		start := time.Now()
		f()
		if d := time.Since(start); best == 0 || d < best {
			return d
		}
		return best
	}
	var ta, tc time.Duration
	for range rounds {
		ta = fastest(a, ta)
		tc = fastest(c, tc)
	}
	return float64(tc) / float64(ta), ta, tc
}

// BenchmarkSourceMassAllowable: the allowable source concentration at a
// fixed mass is a root search per receptor (the depletion rate grows with
// the concentration). The invented source-mass demo (5 receptors, 5
// times, exact and Domenico) against the same screening without a
// screening level, which has no allowance to search for, in the same run:
// at most 4 times its cost (measured: about 1.3; the search starts at the
// bound of the source without depletion, which is close, and Brent's
// method needs a handful of steps).
func BenchmarkSourceMassAllowable(b *testing.B) {
	sc := massDemo(b)
	sc.Methods = []string{MethodExact, MethodDomenico}
	floor := sc
	floor.Contaminant.ScreeningLevel, floor.Contaminant.Name, floor.Contaminant.Koc = nil, "", f(60)
	one := timePer(func() {
		if _, err := Screen(context.Background(), floor, Options{}); err != nil {
			b.Fatal(err)
		}
	})
	b.ResetTimer()
	for b.Loop() {
		if _, err := Screen(context.Background(), sc, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	per := b.Elapsed() / time.Duration(b.N)
	b.ReportMetric(float64(per)/float64(one), "x-without-level")
	if per > 4*one {
		b.Errorf("with the allowable search %v, %.1f times the screening without it (%v); target at most 4", per, float64(per)/float64(one), one)
	}
}
