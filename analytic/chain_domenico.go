package analytic

import "math"

// ChainDomenicoAt evaluates a chain with equal retardation factors by the
// Domenico (1987) approximation (see DomenicoAt): the decoupling of
// Chain.Terms applied to the approximation, which is therefore an
// approximation of the chain too. The lateral factors do not depend on
// the decay rate, so each compound is the lateral factor times the sum
// over its decay paths of the divided differences, in the rate, of the
// longitudinal factor (with the source history as in DomenicoAt). The
// divided differences are taken by ddSet: the Sun-Petersen-Clement
// coefficients where the rates on a path are well apart, and a Taylor
// series in the rate (the repeated-rate limit, exact for equal rates)
// where they are close, so nothing cancels. A chain with distinct
// retardation factors returns ErrDistinctRetardation.
func ChainDomenicoAt(pt Point, t float64, p Params, s Source, h History, c Chain, c0, out []float64) error {
	if err := chainCheck(p, true, c, c0, out); err != nil {
		return err
	}
	if err := chainCheckSource(s); err != nil {
		return err
	}
	if !c.EqualRetardation() {
		return ErrDistinctRetardation
	}
	h, err := chainHistory(h)
	if err != nil {
		return err
	}
	q := p
	q.R = c[0].R
	q.Mu = 0
	x := pt.X
	n := len(c)
	for i := 0; i < n; i++ {
		out[i] = 0
	}
	g := h.Depletion
	if x < 0 || math.IsNaN(x) || math.IsNaN(pt.Y) || !(t > 0) || (math.IsInf(t, 1) && (g > 0 || h.finite())) {
		return nil
	}
	lateral := domenicoLateral(pt, q, s)
	if lateral == 0 {
		return nil
	}
	if x == 0 {
		v := DomenicoAt(pt, t, q, s, h)
		for i := 0; i < n; i++ {
			out[i] = c0[i] * v
		}
		return nil
	}
	f := &domenicoLong{x: x, t: t, d: q.Dx, r: q.R, v: q.V, g: g, dur: h.Duration, finite: h.finite()}
	var z [MaxCompounds]complex128
	for i, k := range c {
		z[i] = complex(k.Mu, 0)
	}
	var set ddSet
	set.reset(f, z[:n])
	var idx [MaxCompounds]int
	var ps [MaxCompounds]chainPath
	for i := range c {
		var acc float64
		for _, pa := range c.paths(i, c0, ps[:0]) {
			for k := 0; k < pa.n; k++ {
				idx[k] = int(pa.nodes[k])
			}
			w := pa.weight
			if pa.n%2 == 0 {
				w = -w
			}
			acc += w * real(set.divDiff(idx[:pa.n]))
		}
		out[i] = math.Max(acc*lateral, 0)
	}
	return nil
}

// domenicoLong is the longitudinal factor of DomenicoAt as a function of
// the decay rate, with the source history: L(t) - L(t - Duration), each
// with the depletion g handled as DomenicoAt does (the rate shifted to
// k - g and the factor exp(-g t) where k >= g; the factor exp(-g lag) of
// the emission time otherwise).
type domenicoLong struct {
	x, t, d, r, v float64
	g, dur        float64
	finite        bool
}

// pieces calls fn for each time of the superposition with its sign.
func (f *domenicoLong) pieces(fn func(tt, sign float64)) {
	fn(f.t, 1)
	if f.finite && f.t > f.dur {
		fn(f.t-f.dur, -1)
	}
}

// branch returns, for rate k and time tt, the rate the factor is
// evaluated at and the history weight.
func (f *domenicoLong) branch(k, tt float64) (float64, float64) {
	switch {
	case f.g == 0:
		return k, 1
	case f.g <= k:
		return k - f.g, math.Exp(-f.g * tt)
	}
	lag := tt - f.r*f.x/f.v
	return k, math.Exp(-f.g * math.Max(lag, 0))
}

func (f *domenicoLong) value(z complex128) complex128 {
	var s float64
	f.pieces(func(tt, sign float64) {
		k, w := f.branch(real(z), tt)
		s += sign * w * domenicoLongitudinal(f.x, tt, Params{V: f.v, Dx: f.d, R: f.r, Mu: k})
	})
	return complex(s, 0)
}

func (f *domenicoLong) jet(c complex128, h float64, out []complex128) {
	for k := range out {
		out[k] = 0
	}
	var buf [ddMaxTerms]complex128
	f.pieces(func(tt, sign float64) {
		k, w := f.branch(real(c), tt)
		f.longJet(k, tt, h, buf[:len(out)])
		for n := range out {
			out[n] += complex(sign*w, 0) * buf[n]
		}
	})
}

func (f *domenicoLong) radius(c complex128) float64 {
	k, _ := f.branch(real(c), f.t)
	return math.Abs(k + f.v*f.v/(4*f.d*f.r))
}

// scale: |d ln L/dk| = |da1/dk| + |d ln erfc(b1)/db1| |db1/dk|.
func (f *domenicoLong) scale(z complex128) float64 {
	var sc float64
	f.pieces(func(tt, _ float64) {
		k, _ := f.branch(real(z), tt)
		w := math.Sqrt(math.Max(f.v*f.v+4*f.d*f.r*k, 1e-300))
		s := f.x * f.r / w
		if !math.IsInf(tt, 1) {
			den := 2 * math.Sqrt(f.d*f.r*tt)
			b := (f.r*f.x - w*tt) / den
			var dl float64
			if b >= 0 {
				dl = 2 * invSqrtPi / Erfcx(b)
			} else {
				dl = 2 * invSqrtPi * math.Exp(-b*b) / math.Erfc(b)
			}
			s += dl * tt / den * 2 * f.d * f.r / w
		}
		sc = math.Max(sc, s)
	})
	return sc
}

// longJet writes the Taylor coefficients in u of the rate k + h u of the
// longitudinal factor 1/2 exp(a1) erfc(b1) (exp(a1) at steady state), with
// w = sqrt(V^2 + 4DRk), a1 = (V - w) x/(2D), b1 = (Rx - w t)/(2 sqrt(DRt)).
// Where erfc(b1) underflows the product is formed as exp(a1 - b1^2)
// erfcx(b1), the exponent's constant term written in closed form as in
// domenicoLongitudinal.
func (f *domenicoLong) longJet(k, tt, h float64, out []complex128) {
	n := len(out)
	d, r, v, x := f.d, f.r, f.v, f.x
	a := v*v + 4*d*r*k
	root := math.Sqrt(a)
	var w, a1 [ddMaxTerms]complex128
	seriesSqrtLinear(complex(root, 0), complex(a, 0), complex(4*d*r*h, 0), w[:n])
	a1[0] = complex(-2*r*k*x/(v+root), 0)
	for j := 1; j < n; j++ {
		a1[j] = -complex(x/(2*d), 0) * w[j]
	}
	if math.IsInf(tt, 1) {
		seriesExp(a1[:n], out)
		return
	}
	s := 2 * math.Sqrt(d*r*tt)
	var b [ddMaxTerms]complex128
	b[0] = complex((r*x-root*tt)/s, 0)
	for j := 1; j < n; j++ {
		b[j] = -complex(tt/s, 0) * w[j]
	}
	b0 := real(b[0])
	var e, ex [ddMaxTerms]complex128
	if b0 < 26 && real(a1[0]) > -700 {
		// erfc(b) = erfc(b0) - 2/sqrt(pi) integral exp(-b^2) b' ddelta.
		var bb, gg [ddMaxTerms]complex128
		seriesMul(b[:n], b[:n], bb[:n])
		for j := 0; j < n; j++ {
			bb[j] = -bb[j]
		}
		seriesExp(bb[:n], gg[:n])
		e[0] = complex(math.Erfc(b0), 0)
		for j := 1; j < n; j++ {
			var acc complex128
			for q := 1; q <= j; q++ {
				acc += complex(float64(q), 0) * b[q] * gg[j-q]
			}
			e[j] = -complex(2*invSqrtPi/float64(j), 0) * acc
		}
		seriesExp(a1[:n], ex[:n])
	} else {
		// erfcx(b): y' = (2 b y - 2/sqrt(pi)) b'.
		var bb [ddMaxTerms]complex128
		seriesMul(b[:n], b[:n], bb[:n])
		q := (r*x - v*tt) / s
		var xe [ddMaxTerms]complex128
		xe[0] = complex(-q*q-k*tt, 0)
		for j := 1; j < n; j++ {
			xe[j] = a1[j] - bb[j]
		}
		seriesExp(xe[:n], ex[:n])
		var by [ddMaxTerms]complex128
		e[0] = complex(Erfcx(b0), 0)
		for j := 1; j < n; j++ {
			// (b y)_{j-1} needs y up to j-1.
			var acc complex128
			for q := 0; q <= j-1; q++ {
				acc += b[q] * e[j-1-q]
			}
			by[j-1] = acc
			var sum complex128
			for q := 1; q <= j; q++ {
				p := 2 * by[j-q]
				if j-q == 0 {
					p -= complex(2*invSqrtPi, 0)
				}
				sum += complex(float64(q), 0) * b[q] * p
			}
			e[j] = sum / complex(float64(j), 0)
		}
	}
	seriesMul(ex[:n], e[:n], out)
	for j := range out {
		out[j] *= 0.5
	}
}
