package analytic

import (
	"errors"
	"math"
	"testing"
)

// Test chains: invented numbers shaped like PCE -> TCE -> cis-DCE -> VC,
// yields equal to ratios of molar masses (165.83, 131.39, 96.94, 62.50
// g/mol, from memory). Test data, not site data.
var (
	testYields = [3]float64{131.39 / 165.83, 96.94 / 131.39, 62.50 / 96.94}
	testC0     = []float64{1, 0.2, 0, 0}
)

// serialChain builds a 4-compound serial chain with retardation r and
// half-lives hl (decay of total mass: Mu = ln2/hl).
func serialChain(r [4]float64, hl [4]float64) Chain {
	c := make(Chain, 4)
	for i := range c {
		c[i] = Compound{R: r[i], Mu: math.Ln2 / hl[i], Daughter: i + 1}
		if i < 3 {
			c[i].Yield = testYields[i]
		} else {
			c[i].Daughter = NoDaughter
		}
	}
	return c
}

func equalR(r float64) [4]float64 { return [4]float64{r, r, r, r} }

func TestChainValidate(t *testing.T) {
	good := serialChain(equalR(2), [4]float64{600, 900, 400, 1000})
	long := make(Chain, MaxCompounds+1)
	for i := range long {
		long[i] = Compound{R: 1, Daughter: NoDaughter}
	}
	mod := func(f func(c Chain)) Chain {
		c := append(Chain(nil), good...)
		f(c)
		return c
	}
	cases := []struct {
		name string
		c    Chain
	}{
		{"empty", Chain{}},
		{"too many compounds", long},
		{"self", mod(func(c Chain) { c[1].Daughter = 1 })},
		{"index out of range", mod(func(c Chain) { c[3].Daughter = 4 })},
		{"negative index", mod(func(c Chain) { c[3].Daughter = -2 })},
		{"cycle", mod(func(c Chain) { c[3].Daughter = 0 })},
		{"negative yield", mod(func(c Chain) { c[0].Yield = -0.1 })},
		{"infinite yield", mod(func(c Chain) { c[0].Yield = math.Inf(1) })},
		{"R below 1", mod(func(c Chain) { c[2].R = 0.5 })},
		{"NaN R", mod(func(c Chain) { c[2].R = math.NaN() })},
		{"negative Mu", mod(func(c Chain) { c[2].Mu = -1e-3 })},
		{"NaN Mu", mod(func(c Chain) { c[2].Mu = math.NaN() })},
	}
	if err := good.Validate(); err != nil {
		t.Fatalf("valid chain rejected: %v", err)
	}
	for _, tc := range cases {
		if err := tc.c.Validate(); !errors.Is(err, ErrInvalid) {
			t.Errorf("%s: got %v, want ErrInvalid", tc.name, err)
		}
	}
	var out [4]float64
	if err := good.Bateman(10, []float64{1, 0, 0}, out[:]); !errors.Is(err, ErrInvalid) {
		t.Errorf("short c0: got %v", err)
	}
	if err := good.Bateman(10, []float64{1, 0, math.NaN(), 0}, out[:]); !errors.Is(err, ErrInvalid) {
		t.Errorf("NaN c0: got %v", err)
	}
	if err := ChainExact3DAt(Point{X: 10}, 100, demoParams, demoSource, History{},
		serialChain([4]float64{2, 1.5, 1.2, 1}, [4]float64{600, 900, 400, 1000}), testC0, out[:]); !errors.Is(err, ErrDistinctRetardation) {
		t.Errorf("distinct R in 3D: got %v", err)
	}
}

// bateman1910 is the classical solution for a serial chain with distinct
// rates and a unit parent at age 0 (Bateman 1910, Proc. Cambridge Philos.
// Soc. 15:423-427), with yields:
// N_n = prod_{j<n} y_j k_j sum_j exp(-k_j t) / prod_{l != j} (k_l - k_j).
func bateman1910(k, y []float64, n int, tau float64) float64 {
	pr := 1.0
	for j := 0; j < n; j++ {
		pr *= y[j] * k[j]
	}
	var s float64
	for j := 0; j <= n; j++ {
		d := 1.0
		for l := 0; l <= n; l++ {
			if l != j {
				d *= k[l] - k[j]
			}
		}
		s += math.Exp(-k[j]*tau) / d
	}
	return pr * s
}

// batemanRK4 integrates dN/dt = -K N with the classical Runge-Kutta rule
// (an independent method, valid for equal rates too).
func batemanRK4(c Chain, c0 []float64, tau float64, steps int) []float64 {
	n := len(c)
	y := append([]float64(nil), c0...)
	f := func(v []float64) []float64 {
		d := make([]float64, n)
		for i := range c {
			d[i] -= c[i].Mu * v[i]
			if c[i].Daughter != NoDaughter {
				d[c[i].Daughter] += c.production(i) * v[i]
			}
		}
		return d
	}
	h := tau / float64(steps)
	tmp := make([]float64, n)
	for s := 0; s < steps; s++ {
		k1 := f(y)
		for i := range tmp {
			tmp[i] = y[i] + h/2*k1[i]
		}
		k2 := f(tmp)
		for i := range tmp {
			tmp[i] = y[i] + h/2*k2[i]
		}
		k3 := f(tmp)
		for i := range tmp {
			tmp[i] = y[i] + h*k3[i]
		}
		k4 := f(tmp)
		for i := range y {
			y[i] += h / 6 * (k1[i] + 2*k2[i] + 2*k3[i] + k4[i])
		}
	}
	return y
}

func TestChainBateman(t *testing.T) {
	hls := [][4]float64{
		{600, 900, 400, 1000}, // distinct
		{600, 600, 600, 600},  // all equal: the repeated-rate limit
		{600, 600.001, 400, 400.0004},
		{600, 300, 600, 300}, // equal rates that are not adjacent
	}
	for _, hl := range hls {
		c := serialChain(equalR(1.5), hl)
		for _, tau := range []float64{0, 1, 100, 1000, 5000, 40000} {
			var got [4]float64
			if err := c.Bateman(tau, testC0, got[:]); err != nil {
				t.Fatal(err)
			}
			ref := batemanRK4(c, testC0, tau, 20000)
			for i := range got {
				// Classical Runge-Kutta, error O(h^4) ~ 1e-13 here.
				if e := relErr(got[i], ref[i]); e > 1e-10 && math.Abs(got[i]-ref[i]) > 1e-300 {
					t.Errorf("hl %v tau %g compound %d: %.15g, RK4 %.15g (rel %.1e)", hl, tau, i, got[i], ref[i], e)
				}
			}
		}
	}
	// Against the classical closed form where it is well conditioned.
	c := serialChain(equalR(1), [4]float64{600, 900, 400, 1000})
	k := []float64{c[0].Mu, c[1].Mu, c[2].Mu, c[3].Mu}
	for _, tau := range []float64{500, 2000, 8000} {
		var got [4]float64
		_ = c.Bateman(tau, []float64{1, 0, 0, 0}, got[:])
		for n := range got {
			want := bateman1910(k, testYields[:], n, tau)
			if e := relErr(got[n], want); e > 1e-12 {
				t.Errorf("tau %g compound %d: %.15g, Bateman (1910) %.15g", tau, n, got[n], want)
			}
		}
	}
}

func TestChainTermsStructure(t *testing.T) {
	// Two compounds, distinct rates: Sun, Petersen & Clement (1999),
	// C_2 = c0_2 F(k2) + y k1 c0_1 (F(k1) - F(k2)) / (k2 - k1).
	k1, k2, y := 2e-3, 5e-4, 0.7
	c := Chain{{R: 1, Mu: k1, Daughter: 1, Yield: y}, {R: 1, Mu: k2, Daughter: NoDaughter}}
	terms, err := c.Terms([]float64{1, 0.5})
	if err != nil {
		t.Fatal(err)
	}
	want := map[float64]float64{k1: y * k1 / (k2 - k1), k2: 0.5 - y*k1/(k2-k1)}
	for _, tm := range terms[1] {
		if tm.Order != 0 || relErr(tm.Coef, want[tm.Rate]) > 1e-15 {
			t.Errorf("distinct rates: term %+v, want coefficient %g", tm, want[tm.Rate])
		}
	}
	// Equal rates: the repeated-rate limit is y k c0 M_1(k) (the Bateman
	// term y k tau exp(-k tau) averaged over the ages).
	c[1].Mu = k1
	terms, _ = c.Terms([]float64{1, 0})
	if len(terms[1]) != 1 || terms[1][0].Order != 1 || relErr(terms[1][0].Coef, y*k1) > 1e-15 {
		t.Errorf("equal rates: terms %+v, want [{%g %g 1}]", terms[1], y*k1, k1)
	}
	// Three equal rates: y1 y2 k^2 M_2(k).
	c = Chain{{R: 1, Mu: k1, Daughter: 1, Yield: 0.7}, {R: 1, Mu: k1, Daughter: 2, Yield: 0.6}, {R: 1, Mu: k1, Daughter: NoDaughter}}
	terms, _ = c.Terms([]float64{1, 0, 0})
	if len(terms[2]) != 1 || terms[2][0].Order != 2 || relErr(terms[2][0].Coef, 0.42*k1*k1) > 1e-15 {
		t.Errorf("three equal rates: terms %+v", terms[2])
	}
	if _, err := serialChain([4]float64{2, 1.5, 1.2, 1}, [4]float64{600, 900, 400, 1000}).Terms(testC0); !errors.Is(err, ErrDistinctRetardation) {
		t.Errorf("distinct R: got %v", err)
	}
}

// The age moments M_n(k) of a term, evaluated with the Bateman weights of
// the age integral, reproduce the terms: summing Coef * M_n with M_n from
// a one-compound age integral of weight tau^n/n! must give the chain.
// Here M_n is taken by finite differences of the 1D closed form in the
// rate (Richardson-extrapolated central differences, error ~1e-9), an
// independent route to the repeated-rate limit.
func TestChainTermsRepeatedLimitByDifferences(t *testing.T) {
	p := Params{V: 0.2, Dx: 2, R: 2}
	c := serialChain(equalR(2), [4]float64{600, 600, 400, 400})
	terms, err := c.Terms(testC0)
	if err != nil {
		t.Fatal(err)
	}
	for _, x := range []float64{30, 150} {
		for _, tt := range []float64{400, 1500, math.Inf(1)} {
			var got [4]float64
			if err := ChainColumnAt(x, tt, p, FirstType, History{}, c, testC0, got[:]); err != nil {
				t.Fatal(err)
			}
			for i, ts := range terms {
				var sum float64
				for _, tm := range ts {
					sum += tm.Coef * momentByDifferences(x, tt, p, tm.Rate, tm.Order)
				}
				if e := relErr(got[i], sum); e > 1e-6 {
					t.Errorf("x %g t %g compound %d: %.12g, terms with differenced moments %.12g (rel %.1e)", x, tt, i, got[i], sum, e)
				}
			}
		}
	}
}

// momentByDifferences is (-1)^n/n! d^n F/dk^n for F = OgataBanks, by
// central differences with step h and h/2 combined (Richardson).
func momentByDifferences(x, t float64, p Params, k float64, n int) float64 {
	f := func(kk float64) float64 {
		q := p
		q.Mu = kk
		return OgataBanks(x, t, q)
	}
	if n == 0 {
		return f(k)
	}
	d := func(h float64) float64 {
		switch n {
		case 1:
			return (f(k+h) - f(k-h)) / (2 * h)
		case 2:
			return (f(k+h) - 2*f(k) + f(k-h)) / (h * h)
		}
		return (f(k+2*h) - 2*f(k+h) + 2*f(k-h) - f(k-2*h)) / (2 * h * h * h)
	}
	h := 0.02 * k
	der := (4*d(h/2) - d(h)) / 3
	fact := 1.0
	for j := 2; j <= n; j++ {
		fact *= float64(j)
	}
	if n%2 == 1 {
		der = -der
	}
	return der / fact
}

// With zero yields the compounds are independent: each is the
// single-compound solution with its own source strength.
func TestChainZeroYieldsIndependent(t *testing.T) {
	p := Params{V: 0.2, Dx: 2, Dy: 0.2, Dz: 0.02}
	s := Source{Width: 20, Depth: 4}
	for _, r := range [][4]float64{equalR(1.8), {3.6, 2.2, 1.6, 1.2}} {
		c := serialChain(r, [4]float64{600, 600, 400, 1000})
		for i := range c {
			c[i].Yield = 0
		}
		c0 := []float64{1, 0.3, 0.2, 0.1}
		for _, h := range []History{{}, {Duration: 1000}, {Depletion: 2e-4}} {
			for _, tt := range []float64{300, 2000, math.Inf(1)} {
				var col, ex, dom [4]float64
				for _, in := range []Inlet{FirstType, ThirdType} {
					if err := ChainColumnAt(60, tt, p, in, h, c, c0, col[:]); err != nil {
						t.Fatal(err)
					}
					for i := range c {
						q := p
						q.R, q.Mu = c[i].R, c[i].Mu
						want := c0[i] * OgataBanksAt(60, tt, q, in, h)
						if math.Abs(col[i]-want) > 1e-11*c0[i] {
							t.Errorf("column R %v inlet %d h %+v t %g compound %d: %.12g, single %.12g", r, in, h, tt, i, col[i], want)
						}
					}
				}
				if r != equalR(1.8) {
					continue
				}
				pt := Point{X: 60, Y: 4, Top: 1, Bottom: 3}
				if err := ChainExact3DAt(pt, tt, p, s, h, c, c0, ex[:]); err != nil {
					t.Fatal(err)
				}
				if err := ChainDomenicoAt(pt, tt, p, s, h, c, c0, dom[:]); err != nil {
					t.Fatal(err)
				}
				for i := range c {
					q := p
					q.R, q.Mu = c[i].R, c[i].Mu
					if want := c0[i] * Exact3DAt(pt, tt, q, s, h); relErr(ex[i], want) > 1e-14 {
						t.Errorf("exact h %+v t %g compound %d: %.12g, single %.12g", h, tt, i, ex[i], want)
					}
					if want := c0[i] * DomenicoAt(pt, tt, q, s, h); relErr(dom[i], want) > 1e-13 {
						t.Errorf("Domenico h %+v t %g compound %d: %.12g, single %.12g", h, tt, i, dom[i], want)
					}
				}
			}
		}
	}
}

// Without dispersion and with equal retardation every parcel of water
// carries the Bateman (1910) solution at its travel time R x / V. A
// Peclet number of 1e6 puts the front within 0.3 % of the travel time.
func TestChainNoDispersionIsBateman(t *testing.T) {
	for _, hl := range [][4]float64{{600, 900, 400, 1000}, {600, 600, 400, 400}} {
		c := serialChain(equalR(2), hl)
		x, v := 100.0, 0.2
		p := Params{V: v, Dx: v * x * 1e-6}
		tau := 2 * x / v
		var want [4]float64
		_ = c.Bateman(tau, testC0, want[:])
		for _, in := range []Inlet{FirstType, ThirdType} {
			for _, tt := range []float64{1.01 * tau, 3 * tau, math.Inf(1)} {
				var got [4]float64
				if err := ChainColumnAt(x, tt, p, in, History{}, c, testC0, got[:]); err != nil {
					t.Fatal(err)
				}
				for i := range got {
					// The dispersive spread of the ages, sqrt(2 D' tau)/v' = 1.4e-3 tau,
					// changes the Bateman weights by about (k * spread)^2.
					if e := relErr(got[i], want[i]); e > 1e-5 {
						t.Errorf("hl %v inlet %d t %g compound %d: %.10g, Bateman %.10g (rel %.1e)", hl, in, tt, i, got[i], want[i], e)
					}
				}
			}
			var early [4]float64
			_ = ChainColumnAt(x, 0.99*tau, p, in, History{}, c, testC0, early[:])
			for i := range early {
				if early[i] > 1e-12 {
					t.Errorf("hl %v inlet %d before arrival compound %d: %g", hl, in, i, early[i])
				}
			}
		}
	}
}

// A chain of one compound is the single-compound solution.
func TestChainSingleCompound(t *testing.T) {
	p := demoParams
	c := Chain{{R: p.R, Mu: p.Mu, Daughter: NoDaughter}}
	for _, h := range []History{{}, {Duration: 900}, {Depletion: 1e-3}} {
		for _, tt := range []float64{200, 2000, math.Inf(1)} {
			pt := Point{X: 80, Y: 3, Top: 1, Bottom: 2}
			var out [1]float64
			_ = ChainExact3DAt(pt, tt, p, demoSource, h, c, []float64{2}, out[:])
			if want := 2 * Exact3DAt(pt, tt, p, demoSource, h); out[0] != want {
				t.Errorf("exact h %+v t %g: %g, want %g", h, tt, out[0], want)
			}
			_ = ChainDomenicoAt(pt, tt, p, demoSource, h, c, []float64{2}, out[:])
			if want := 2 * DomenicoAt(pt, tt, p, demoSource, h); relErr(out[0], want) > 1e-15 {
				t.Errorf("Domenico h %+v t %g: %g, want %g", h, tt, out[0], want)
			}
			for _, in := range []Inlet{FirstType, ThirdType} {
				_ = ChainColumnAt(80, tt, p, in, h, c, []float64{2}, out[:])
				if want := 2 * OgataBanksAt(80, tt, p, in, h); out[0] != want {
					t.Errorf("column inlet %d h %+v t %g: %g, want %g", in, h, tt, out[0], want)
				}
				var lap, est [1]float64
				_ = chainColumnLaplace(80, tt, p, in, h, c, []float64{2}, lap[:], est[:])
				want := 2 * OgataBanksAt(80, tt, p, in, h)
				// OgataBanksAt falls back to a 1e-6 quadrature for some histories.
				tol := 1e-11
				if h != (History{}) {
					tol = 2e-6
				}
				if relErr(lap[0], want) > tol || est[0] > 1e-9 {
					t.Errorf("Laplace inlet %d h %+v t %g: %.15g, want %.15g (estimate %.1e)", in, h, tt, lap[0], want, est[0])
				}
			}
		}
	}
}

// Equal retardation, two independent routes in 1D: the decoupled closed
// forms (with the age integral where they cancel) and the Laplace-domain
// solution with clustered divided differences.
func TestChainColumnRoutesAgree(t *testing.T) {
	p := Params{V: 0.1, Dx: 1}
	for _, hl := range [][4]float64{{500, 900, 300, 600}, {500, 500, 500, 500}, {500, 500.5, 499.5, 500.2}, {700, 700, 300, 300}} {
		c := serialChain(equalR(2), hl)
		for _, h := range []History{{}, {Duration: 1500}, {Depletion: 3e-4}} {
			for _, x := range []float64{0, 10, 100, 300} {
				for _, tt := range []float64{200, 2000, 6000, math.Inf(1)} {
					for _, in := range []Inlet{FirstType, ThirdType} {
						var lap, est, got [4]float64
						if err := chainColumnLaplace(x, tt, p, in, h, c, testC0, lap[:], est[:]); err != nil {
							t.Fatal(err)
						}
						if err := ChainColumnAt(x, tt, p, in, h, c, testC0, got[:]); err != nil {
							t.Fatal(err)
						}
						for i := range got {
							tol := 1e-9*lap[i] + 1e-14 + 2*est[i]
							if h.Depletion > 0 || h.Duration > 0 {
								tol += 2e-6 * lap[i] // OgataBanksAt's quadrature
							}
							if math.Abs(got[i]-lap[i]) > tol {
								t.Errorf("hl %v h %+v x %g t %g inlet %d compound %d: %.12g, Laplace %.12g", hl, h, x, tt, in, i, got[i], lap[i])
							}
						}
					}
				}
			}
		}
	}
}

// Equal retardation in 3D: the decoupled terms (Exact3DAt per rate) and
// the age integral with Bateman weights are two routes to the same value.
func TestChainExactRoutesAgree(t *testing.T) {
	p := Params{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01}
	s := Source{Width: 15, Depth: 3}
	c := serialChain(equalR(2), [4]float64{500, 900, 300, 600})
	q := p
	q.R = 2
	for _, h := range []History{{}, {Duration: 2000}, {Depletion: 1e-4}, {Depletion: 3e-3}} {
		for _, pt := range []Point{{X: 10, Y: 0, Top: 1, Bottom: 1}, {X: 100, Y: 5, Top: 0, Bottom: 4}, {X: 300, Y: 0, Top: 2, Bottom: 2}} {
			for _, tt := range []float64{500, 3000, 10000, math.Inf(1)} {
				var got, age [4]float64
				if err := ChainExact3DAt(pt, tt, p, s, h, c, testC0, got[:]); err != nil {
					t.Fatal(err)
				}
				ageGroup(pt, tt, q, s, h, c, testC0, []int{0, 1, 2, 3}, false, age[:])
				for i := range got {
					if math.Abs(got[i]-age[i]) > 1e-7*age[i]+1e-300 {
						t.Errorf("h %+v pt %+v t %g compound %d: terms %.12g, age integral %.12g", h, pt, tt, i, got[i], age[i])
					}
				}
			}
		}
	}
}

// No NaN, no Inf, no negative value, whatever the Peclet number, time or
// distance.
func TestChainFiniteNonNegative(t *testing.T) {
	chains := []Chain{
		serialChain(equalR(1.5), [4]float64{600, 900, 400, 1000}),
		serialChain(equalR(1.5), [4]float64{600, 600, 600, 600}),
		serialChain([4]float64{3.6, 2.2, 1.6, 1.2}, [4]float64{600, 600, 400, 1e9}),
	}
	for _, c := range chains {
		for _, pe := range []float64{0.01, 30, 1e4, 1e7} {
			for _, x := range []float64{0, 1e-3, 5, 500, 1e5} {
				for _, tt := range []float64{1e-6, 50, 2e3, math.Inf(1)} {
					v := 0.3
					p := Params{V: v, Dx: v * math.Max(x, 1) / pe, Dy: 0.01, Dz: 0.001}
					var out [4]float64
					check := func(what string, err error) {
						for i, o := range out {
							// ErrInversion is the documented outcome of the
							// Laplace route at Peclet numbers of thousands.
							bad := err != nil && !errors.Is(err, ErrDistinctRetardation) && !errors.Is(err, ErrInversion)
							if bad || math.IsNaN(o) || math.IsInf(o, 0) || o < 0 {
								t.Fatalf("%s pe %g x %g t %g compound %d: %g (%v)", what, pe, x, tt, i, o, err)
							}
						}
					}
					check("column", ChainColumnAt(x, tt, p, FirstType, History{}, c, testC0, out[:]))
					check("column flux", ChainColumnAt(x, tt, p, ThirdType, History{Duration: 500}, c, testC0, out[:]))
					if c.EqualRetardation() {
						pt := Point{X: x, Y: 2, Top: 0, Bottom: 3}
						check("exact", ChainExact3DAt(pt, tt, p, demoSource, History{Depletion: 1e-3}, c, testC0, out[:]))
						check("Domenico", ChainDomenicoAt(pt, tt, p, demoSource, History{}, c, testC0, out[:]))
					}
				}
			}
		}
	}
}
