package analytic

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Tests of identities of the mathematics (DESIGN.md section 6): limits,
// symmetry, monotonicity, superposition and mass balance. Each states the
// identity it checks.

var inf = math.Inf(1)

func relErr(got, want float64) float64 {
	if got == want {
		return 0
	}
	return math.Abs(got-want) / math.Abs(want)
}

// Erfcx(0) = 1, the unscaled definition for moderate x, and continuity across
// the switch to the asymptotic series at x = 26.
func TestErfcxIdentities(t *testing.T) {
	if got := Erfcx(0); got != 1 {
		t.Fatalf("Erfcx(0) = %v, want 1", got)
	}
	for _, x := range []float64{-3, -0.5, 0.1, 0.7, 2, 5} {
		want := math.Exp(x*x) * math.Erfc(x)
		if e := relErr(Erfcx(x), want); e > 1e-13 {
			t.Errorf("Erfcx(%v): rel err %.2g against exp(x^2) erfc(x)", x, e)
		}
	}
	if e := relErr(Erfcx(math.Nextafter(26, 0)), Erfcx(26)); e > 1e-14 {
		t.Errorf("Erfcx jumps at 26 by %.2g", e)
	}
	// ExpErfc where exp(a) overflows and erfc(b) underflows:
	// exp(800) erfc(30) = exp(800 - 900) erfcx(30).
	if got, want := ExpErfc(800, 30), math.Exp(-100)*Erfcx(30); relErr(got, want) > 1e-13 {
		t.Errorf("ExpErfc(800, 30) = %v, want %v", got, want)
	}
}

// The exact 3D solution tends to the 1D column (Ogata-Banks) as the source
// grows wide and deep, and equals it for an infinite source.
func TestExact3DTendsTo1D(t *testing.T) {
	p := Params{V: 0.2, Dx: 2, Dy: 0.2, Dz: 0.02, R: 1.6, Mu: 1e-3}
	for _, x := range []float64{1, 20, 100} {
		for _, tt := range []float64{50, 500, 5000, inf} {
			ob := OgataBanks(x, tt, p)
			if e := relErr(Exact3D(x, 0, 0, tt, p, Source{inf, inf}), ob); e > 1e-6 {
				t.Errorf("infinite source x=%v t=%v: rel err %.2g against OgataBanks", x, tt, e)
			}
			big := Exact3D(x, 0, 0, tt, p, Source{Width: 1e5, Depth: 1e4})
			if e := relErr(big, ob); e > 1e-6 {
				t.Errorf("1e5 x 1e4 source x=%v t=%v: rel err %.2g against OgataBanks", x, tt, e)
			}
		}
	}
}

// The solutions are even in y (the source is centred on the plume axis).
func TestSymmetryInY(t *testing.T) {
	for _, y := range []float64{0.5, 7.5, 12, 40} {
		for _, tt := range []float64{365, inf} {
			if a, b := Exact3D(80, y, 1, tt, demoParams, demoSource), Exact3D(80, -y, 1, tt, demoParams, demoSource); a != b {
				t.Errorf("Exact3D not symmetric at y=%v: %v vs %v", y, a, b)
			}
			if a, b := Domenico(80, y, 1, tt, demoParams, demoSource), Domenico(80, -y, 1, tt, demoParams, demoSource); a != b {
				t.Errorf("Domenico not symmetric at y=%v: %v vs %v", y, a, b)
			}
		}
	}
}

// A continuous source without decay gives a value that never falls with time
// and never exceeds the source; the steady state is the limit.
func TestMonotoneAndBounded(t *testing.T) {
	p := demoParams
	p.Mu = 0
	for _, pt := range [][3]float64{{10, 0, 0}, {150, 3, 2}, {60, 15, 4}} {
		prev := 0.0
		for tt := 1.0; tt < 2e5; tt *= 1.5 {
			c := Exact3D(pt[0], pt[1], pt[2], tt, p, demoSource)
			if c < prev*(1-2e-7) || c > 1 {
				t.Fatalf("%v: C(t=%v)=%v after %v", pt, tt, c, prev)
			}
			prev = c
		}
		// OgataBanksAt with a constant source is OgataBanks, steady state too.
		for _, tt := range []float64{100, inf} {
			if a, b := OgataBanksAt(pt[0], tt, p, FirstType, History{Duration: inf}), OgataBanks(pt[0], tt, p); a != b {
				t.Errorf("OgataBanksAt(x=%v, t=%v) = %v, OgataBanks %v", pt[0], tt, a, b)
			}
			if a, b := OgataBanksAt(pt[0], tt, p, ThirdType, History{}), OgataBanksFlux(pt[0], tt, p); a != b {
				t.Errorf("OgataBanksAt flux (x=%v, t=%v) = %v, OgataBanksFlux %v", pt[0], tt, a, b)
			}
		}
		ss := Exact3D(pt[0], pt[1], pt[2], inf, p, demoSource)
		if e := relErr(prev, ss); e > 1e-4 {
			t.Errorf("%v: late value %v vs steady %v", pt, prev, ss)
		}
		for _, inlet := range []Inlet{FirstType, ThirdType} {
			prev = 0
			for tt := 1.0; tt < 2e5; tt *= 1.5 {
				c := OgataBanksAt(pt[0], tt, p, inlet, History{})
				if c < prev*(1-1e-12) || c > 1 {
					t.Fatalf("1D inlet %v x=%v: C(t=%v)=%v after %v", inlet, pt[0], tt, c, prev)
				}
				prev = c
			}
		}
	}
}

// Superposition: a release of infinite duration is the continuous source; a
// finite one equals C(t) - C(t - T) where that difference is well
// conditioned.
func TestSuperposition(t *testing.T) {
	pt := Point{X: 120, Y: 4, Top: 1, Bottom: 1}
	for _, tt := range []float64{400, 2000, 6000} {
		cont := Exact3DAt(pt, tt, demoParams, demoSource, History{})
		if got := Exact3DAt(pt, tt, demoParams, demoSource, History{Duration: inf}); got != cont {
			t.Errorf("infinite duration %v != continuous %v", got, cont)
		}
		dur := 1000.0
		want := cont - Exact3DAt(pt, tt-dur, demoParams, demoSource, History{})
		got := Exact3DAt(pt, tt, demoParams, demoSource, History{Duration: dur})
		if e := relErr(got, want); e > 1e-5 {
			t.Errorf("t=%v: finite duration %v, difference of continuous %v (rel %.2g)", tt, got, want, e)
		}
		dom := DomenicoAt(pt, tt, demoParams, demoSource, History{Duration: inf})
		if dom != Domenico(pt.X, pt.Y, pt.Top, tt, demoParams, demoSource) {
			t.Errorf("Domenico with infinite duration differs from continuous")
		}
	}
	// 1D first type: exp(-g t) C(Mu - g) (the depletion substitution) must
	// agree with the quadrature path at the switch g = Mu.
	p := Params{V: 0.1, Dx: 1, R: 1.4, Mu: 2e-3}
	for _, x := range []float64{5, 60} {
		below := OgataBanksAt(x, 900, p, FirstType, History{Depletion: p.Mu * (1 - 1e-9)})
		above := OgataBanksAt(x, 900, p, FirstType, History{Depletion: p.Mu * (1 + 1e-9)})
		if e := relErr(above, below); e > 1e-6 {
			t.Errorf("x=%v: depletion just above Mu %v, just below %v", x, above, below)
		}
	}
}

// A puff's dissolved plus sorbed mass, n R times the integral of C over
// space, equals the released mass less what decayed: mass exp(-Mu t).
func TestPuffMassBalance(t *testing.T) {
	p := Params{V: 0.5, Dx: 2, Dy: 0.3, Dz: 0.05, R: 2.5, Mu: 1e-3}
	const n, mass, tt = 0.3, 7.0, 200.0
	want := mass * math.Exp(-p.Mu*tt)
	xc := p.V * tt / p.R
	sx, sy, sz := math.Sqrt(2*p.Dx*tt/p.R), math.Sqrt(2*p.Dy*tt/p.R), math.Sqrt(2*p.Dz*tt/p.R)
	integ := func(f func(float64) float64, a, b float64) float64 {
		return quad.Fixed(f, a, b, 200, quad.Legendre{}, 0)
	}
	m1 := n * p.R * integ(func(x float64) float64 { return Puff1D(x, tt, p, mass, n) }, xc-12*sx, xc+12*sx)
	if e := relErr(m1, want); e > 1e-10 {
		t.Errorf("1D puff mass %v, want %v", m1, want)
	}
	m2 := n * p.R * integ(func(x float64) float64 {
		return integ(func(y float64) float64 { return Puff2D(x, y, tt, p, mass, n) }, -12*sy, 12*sy)
	}, xc-12*sx, xc+12*sx)
	if e := relErr(m2, want); e > 1e-9 {
		t.Errorf("2D puff mass %v, want %v", m2, want)
	}
	const z0 = 1.5
	m3 := n * p.R * integ(func(x float64) float64 {
		return integ(func(y float64) float64 {
			return integ(func(z float64) float64 { return Puff3D(x, y, z, tt, p, mass, n, z0) }, 0, z0+12*sz)
		}, -12*sy, 12*sy)
	}, xc-12*sx, xc+12*sx)
	if e := relErr(m3, want); e > 1e-8 {
		t.Errorf("3D puff mass %v, want %v", m3, want)
	}
}

// The screen average equals the mean of the point values over the screen
// (gonum quad.Fixed with 100 Gauss-Legendre nodes as the check).
func TestScreenAverage(t *testing.T) {
	for _, c := range []struct{ top, bot float64 }{{0, 3}, {1, 6}, {4, 9}, {2.9, 3.1}, {10, 20}} {
		for _, tt := range []float64{365, inf} {
			pt := Point{X: 90, Y: 2, Top: c.top, Bottom: c.bot}
			got := Exact3DAt(pt, tt, demoParams, demoSource, History{})
			want := quad.Fixed(func(z float64) float64 { return Exact3D(90, 2, z, tt, demoParams, demoSource) }, c.top, c.bot, 100, quad.Legendre{}, 0) / (c.bot - c.top)
			if e := relErr(got, want); e > 1e-6 {
				t.Errorf("screen %v t=%v: %v, mean of points %v (rel %.2g)", c, tt, got, want, e)
			}
			gotD := DomenicoAt(pt, tt, demoParams, demoSource, History{})
			wantD := quad.Fixed(func(z float64) float64 { return Domenico(90, 2, z, tt, demoParams, demoSource) }, c.top, c.bot, 100, quad.Legendre{}, 0) / (c.bot - c.top)
			if e := relErr(gotD, wantD); e > 1e-9 {
				t.Errorf("Domenico screen %v t=%v: %v, mean of points %v (rel %.2g)", c, tt, gotD, wantD, e)
			}
		}
	}
}

// The default quadrature tolerance agrees with a much tighter one, over
// receptors near and far, on and off the axis (self-consistency of the
// error control; the external check is in reference_test.go).
func TestExactQuadratureConverged(t *testing.T) {
	worst := 0.0
	for _, q := range [][3]float64{{1, 0, 0}, {5, 7.5, 3}, {30, 5, 1}, {210, 6, 2}, {300, 60, 1}, {2000, 0, 0}} {
		for _, tt := range []float64{10, 365, 3650, inf} {
			pt := Point{X: q[0], Y: q[1], Top: q[2], Bottom: q[2]}
			c := Exact3DAt(pt, tt, demoParams, demoSource, History{})
			ref := exact3D(pt, tt, demoParams, demoSource, History{}, 1e-13)
			if ref == 0 {
				continue
			}
			worst = math.Max(worst, relErr(c, ref))
		}
	}
	if worst > 1e-8 {
		t.Errorf("default tolerance differs from 1e-13 by %.2g", worst)
	}
	t.Logf("worst difference between default and tight tolerance: %.2g", worst)
}

// Property test: random valid inputs never give NaN, Inf, a negative value,
// or (without decay, for the relative solutions) a value above the source.
func TestRandomInputsStayFiniteAndBounded(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	logU := func(lo, hi float64) float64 {
		return math.Exp(math.Log(lo) + rng.Float64()*(math.Log(hi)-math.Log(lo)))
	}
	n := 1500
	if testing.Short() {
		n = 300
	}
	for i := 0; i < n; i++ {
		p := Params{V: logU(1e-4, 10), R: 1 + logU(1e-3, 50)}
		p.Dx = p.V * logU(1e-3, 100)
		p.Dy = p.Dx * logU(1e-3, 1)
		p.Dz = p.Dy * logU(1e-3, 1)
		if rng.IntN(2) == 0 {
			p.Mu = logU(1e-7, 1)
		}
		s := Source{Width: logU(0.1, 500), Depth: logU(0.1, 50)}
		x := logU(1e-3, 1e4)
		y := (rng.Float64()*2 - 1) * logU(1e-3, 1e3)
		z := logU(1e-3, 100)
		tt := logU(1e-3, 1e6)
		if rng.IntN(8) == 0 {
			tt = inf
		}
		h := History{}
		if rng.IntN(3) == 0 {
			h.Duration = logU(1, 1e5)
		}
		if rng.IntN(3) == 0 {
			h.Depletion = logU(1e-6, 1e-1)
		}
		pt := Point{X: x, Y: y, Top: z, Bottom: z + logU(1e-3, 20)*float64(rng.IntN(2))}
		vals := map[string]float64{
			"OgataBanks":     OgataBanks(x, tt, p),
			"OgataBanksFlux": OgataBanksFlux(x, tt, p),
			"OgataBanksAt1":  OgataBanksAt(x, tt, p, FirstType, h),
			"OgataBanksAt3":  OgataBanksAt(x, tt, p, ThirdType, h),
			"Exact3DAt":      Exact3DAt(pt, tt, p, s, h),
			"DomenicoAt":     DomenicoAt(pt, tt, p, s, h),
			"Deviation":      DomenicoDeviation(x, y, z, tt, p, s),
			"Puff3D":         Puff3D(x, y, z, tt, p, 1, 0.3, 1) * 0,
		}
		for name, v := range vals {
			if math.IsNaN(v) || math.IsInf(v, 0) || (name != "Deviation" && (v < 0 || v > 1)) {
				t.Fatalf("%s = %v for p=%+v s=%+v pt=%+v t=%v h=%+v", name, v, p, s, pt, tt, h)
			}
		}
		if v := Puff3D(x, y, z, tt, p, 1, 0.3, 1); math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			t.Fatalf("Puff3D = %v", v)
		}
	}
}

// The flux-pulse kernel path of the 1D flux inlet reproduces the closed form
// (van Genuchten & Alves 1982) for a constant source with and without decay,
// and its steady state 2V/(V+w) exp((V-w)x/(2D)).
func TestFluxKernelMatchesClosedForm(t *testing.T) {
	inf := math.Inf(1)
	for _, p := range []Params{{V: 0.1, Dx: 1, R: 1.4}, {V: 0.1, Dx: 1, R: 1.4, Mu: 1e-3}, {V: 1, Dx: 0.01, R: 2, Mu: 0.05}} {
		for _, x := range []float64{0.5, 10, 80} {
			for _, tt := range []float64{30, 300, 3000, inf} {
				want := OgataBanksFlux(x, tt, p)
				got := exact3DKernel(Point{X: x}, tt, p, Source{inf, inf}, History{}, exactRelTol, true)
				if want > 1e-250 && relErr(got, want) > 1e-6 {
					t.Errorf("p=%+v x=%v t=%v: kernel path %v, closed form %v", p, x, tt, got, want)
				}
			}
		}
	}
	// The slow case reported by the domain layer: depletion far faster
	// than decay, so that V^2 + 4DR(Mu - g) < 0.
	p := Params{V: 9.81e-4, Dx: 7.81e-3, R: 2.162, Mu: 1.615e-5}
	c := OgataBanksAt(7.27, 1e6, p, ThirdType, History{Depletion: 1.7185e-3})
	if math.IsNaN(c) || c < 0 || c > 1 {
		t.Errorf("depleting flux inlet gave %v", c)
	}
}
