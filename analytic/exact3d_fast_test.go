package analytic

import (
	"math"
	"math/rand/v2"
	"testing"
)

// fastSweepCase is one random input of the exact 3D integral.
type fastSweepCase struct {
	pt Point
	t  float64
	p  Params
	s  Source
	h  History
}

// fastSweep draws n inputs, log-uniform over wide ranges: velocity 1e-4 to
// 10, dispersivities 1e-3 to 100 (transverse ones down to 1e-6 of that),
// retardation 1 to 50, decay half the time, sources 0.1 to 500 wide and
// 0.1 to 50 deep, receptors from 1e-3 to 1e4 downgradient and up to 1e3
// across, points and screens, times from 1e-3 to 1e6 and the steady state,
// finite durations and depletion a third of the time each.
func fastSweep(seed uint64, n int) []fastSweepCase {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	logU := func(lo, hi float64) float64 {
		return math.Exp(math.Log(lo) + rng.Float64()*(math.Log(hi)-math.Log(lo)))
	}
	out := make([]fastSweepCase, 0, n)
	for i := 0; i < n; i++ {
		p := Params{V: logU(1e-4, 10), R: 1 + logU(1e-3, 50)}
		p.Dx = p.V * logU(1e-3, 100)
		p.Dy = p.Dx * logU(1e-3, 1)
		p.Dz = p.Dy * logU(1e-3, 1)
		if rng.IntN(2) == 0 {
			p.Mu = logU(1e-7, 1)
		}
		s := Source{Width: logU(0.1, 500), Depth: logU(0.1, 50)}
		z := logU(1e-3, 100)
		pt := Point{X: logU(1e-3, 1e4), Y: (rng.Float64()*2 - 1) * logU(1e-3, 1e3), Top: z,
			Bottom: z + logU(1e-3, 20)*float64(rng.IntN(2))}
		t := logU(1e-3, 1e6)
		if rng.IntN(8) == 0 {
			t = math.Inf(1)
		}
		var h History
		if rng.IntN(3) == 0 {
			h.Duration = logU(1, 1e5)
		}
		if rng.IntN(3) == 0 {
			h.Depletion = logU(1e-6, 1e-1)
		}
		out = append(out, fastSweepCase{pt, t, p, s, h})
	}
	return out
}

// The switch between the fast path and the adaptive one is safe: over a
// broad random sweep, every value the fast path accepts agrees with the
// adaptive path at a tolerance of 1e-11 (and a bisection budget 250 times
// the default) within 2e-8 relative, a fifth of the documented accuracy;
// where it cannot show that, it declines. A self-consistency check of the
// switch; the external checks are in reference_test.go.
func TestExact3DFastPathSafe(t *testing.T) {
	n := 24000
	if testing.Short() {
		n = 4000
	}
	const limit = 2e-8
	accepted, declined, tiny := 0, 0, 0
	worst := 0.0
	var worstCase fastSweepCase
	for _, c := range fastSweep(17, n) {
		if _, done := exact3DTrivial(c.pt, c.t, c.p, c.s, c.h); done {
			continue
		}
		k, scale := newKernel3D(c.pt, c.t, c.p, c.s, c.h, false)
		q, ok := k.fast(exactRelTol)
		if !ok {
			declined++
			continue
		}
		accepted++
		got := scale * q
		if got < 1e-300 {
			tiny++ // below anything a caller can see; also checked below
		}
		want := scale * k.rigorousBudget(1e-11, 100000)
		if want < 1e-300 {
			if got > 1e-290 {
				t.Errorf("%+v: fast %v, adaptive %v", c, got, want)
			}
			continue
		}
		e := math.Abs(got-want) / want
		if e > worst {
			worst, worstCase = e, c
		}
		if e > limit {
			t.Errorf("%+v: fast %.16g, adaptive %.16g, rel %.3g", c, got, want, e)
		}
	}
	t.Logf("%d accepted (%d below 1e-300), %d declined; worst relative difference %.3g at %+v",
		accepted, tiny, declined, worst, worstCase)
	if accepted < declined/2 {
		t.Errorf("the fast path took only %d of %d values", accepted, accepted+declined)
	}
}

// The benchmark's receptors and times all take the fast path, at its first
// or second level (31 nodes at most).
func TestExact3DFastPathTakesBenchmark(t *testing.T) {
	pts := [][3]float64{{50, 0, 1}, {210, 6, 2}, {100, 20, 0}, {300, 0, 5}, {30, 5, 1}}
	for _, tt := range []float64{365, 3650, math.Inf(1)} {
		for _, q := range pts {
			pt := Point{X: q[0], Y: q[1], Top: q[2], Bottom: q[2]}
			k, _ := newKernel3D(pt, tt, demoParams, demoSource, History{}, false)
			if _, ok := k.fast(exactRelTol); !ok {
				t.Errorf("%v t=%v: the fast path declines", q, tt)
			}
		}
	}
}

// A value does not depend on what was evaluated before it: the same inputs
// in two different orders give bit-identical values.
func TestExact3DDeterministic(t *testing.T) {
	cases := fastSweep(99, 400)
	first := make([]float64, len(cases))
	for i, c := range cases {
		first[i] = Exact3DAt(c.pt, c.t, c.p, c.s, c.h)
	}
	for i := len(cases) - 1; i >= 0; i-- {
		c := cases[i]
		if v := Exact3DAt(c.pt, c.t, c.p, c.s, c.h); v != first[i] {
			t.Fatalf("%+v: %v, then %v", c, first[i], v)
		}
	}
}

// The tilted kernel (kernel3D.tilted) is the same integral: over the
// random sweep, wherever a kernel is tilted, its adaptive value at a
// tolerance of 1e-11 agrees with the untilted kernel's within 1e-9
// relative, or 1e-15 of the source concentration absolute (the accuracy
// promised is 1e-7 relative or 1e-12 absolute: far below that, both
// adaptive forms can lose relative accuracy, and mpmath quadrature of the
// time integral found the tilted one the closer where they differ). A
// check of the change of variable; the external checks of both forms are
// in reference_test.go and reference_extremes_test.go.
func TestExact3DTiltSameIntegral(t *testing.T) {
	n := 24000
	if testing.Short() {
		n = 4000
	}
	tilted, worst := 0, 0.0
	for _, c := range fastSweep(23, n) {
		if _, done := exact3DTrivial(c.pt, c.t, c.p, c.s, c.h); done {
			continue
		}
		k, scale := newKernel3D(c.pt, c.t, c.p, c.s, c.h, false)
		if k.tilt == 1 {
			continue
		}
		tilted++
		u, uscale := newKernel3DTilt(c.pt, c.t, c.p, c.s, c.h, false, math.Inf(1))
		got, want := scale*k.rigorousBudget(1e-11, 100000), uscale*u.rigorousBudget(1e-11, 100000)
		if want < 1e-15 {
			if math.Abs(got-want) > 1e-15 {
				t.Errorf("%+v: tilted %v, untilted %v", c, got, want)
			}
			continue
		}
		e := math.Abs(got-want) / want
		worst = math.Max(worst, e)
		if e > 1e-9 {
			t.Errorf("%+v: tilted %.16g, untilted %.16g, rel %.3g", c, got, want, e)
		}
	}
	t.Logf("%d tilted kernels, worst relative difference %.3g", tilted, worst)
	if tilted < n/20 {
		t.Errorf("only %d of %d sweep cases tilted: the sweep no longer tests the tilt", tilted, n)
	}
}
