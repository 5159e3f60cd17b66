package analytic

import "math"

// The fast path of the exact 3D integral: one window in u that holds the
// mass of the Gaussian weight, mapped (u = lambda sinh(s)) so that the
// nodes gather where the weight is, and integrated by the nested Patterson
// rules of 7, 15, 31 and 63 points, stopping at the first level that
// agrees with the one before it. It declines, and the adaptive path
// (kernel3D.rigorous) takes over, where it cannot show that its value is
// accurate:
//   - a tolerance finer than exactRelTol is asked (the thresholds below are
//     set for that one);
//   - the weights of decay, depletion or flux are inside the integral;
//   - the integrand outside the window may matter (its rigorous bound,
//     kernel3D.bound, exceeds a small share of the tolerance);
//   - the value is zero or below fastFloor (the integrand may have
//     underflowed at every node);
//   - no level agrees with the one before it within its threshold.
//
// The thresholds depend on a class decided from the inputs before any
// node is evaluated (kernel3D.smooth): where every factor of the integrand
// varies slowly against the weight, the rules converge so fast that a loose
// agreement of two levels vouches for the finer one; elsewhere the
// agreement asked is close to the tolerance itself.
//
// Every decision depends on the inputs of the one evaluation only, so a
// value never depends on what was evaluated before it.

const (
	// fastWeightDecay is the exponent at which the window ends: the weight
	// exp(-(u^2 - u0^2)) has fallen to exp(-fastWeightDecay) of its peak.
	fastWeightDecay = 32.0
	// fastSinhScale is the largest scale lambda of the map u = lambda
	// sinh(s) that gathers the nodes of a window around the peak u = 0.
	fastSinhScale = 1.5
	// fastFloor: integrals below this are left to the adaptive path.
	fastFloor = 1e-280
	// fastSigmaMin and fastSharp bound the smooth class (see smooth).
	fastSigmaMin = 0.35
	fastSharp    = 1.0
	// fastOutside is the share of the tolerance that the integrand outside
	// the window, and the nodes whose transverse factors are not evaluated,
	// may take by their rigorous bounds.
	fastOutside = 0.01
	// fastSkip: a node whose weight part is below this share of the
	// previous level's integral has its transverse factors (at most 1) set
	// to 0 instead of evaluated; the bound of what that omits is checked
	// against fastOutside before a value is accepted.
	fastSkip = 1e-13
)

// fastAgreeSmooth and fastAgreeRough hold, for the smooth class and the
// others, the largest relative difference between the Patterson rules of
// levels k and k-1 (k = 2, 3, 4: 15, 31, 63 points) at which the finer one
// is accepted. They are set so that, over the random sweeps of
// TestExact3DFastPathSafe, every accepted value is within about 1e-8 of the
// adaptive one at a tolerance of 1e-11.
var (
	fastAgreeSmooth = [5]float64{2: 1e-6, 3: 1e-4, 4: 1e-3}
	fastAgreeRough  = [5]float64{2: 1e-7, 3: 1e-7, 4: 1e-7}
)

// fastWindow returns the window of offsets v = u - u0 and the scale of the
// sinh map u = lambda sinh(s) (0: none).
func (k *kernel3D) fastWindow() (lo, hi, lam float64) {
	// With lambda = 2 sigma*, rho du = sigma* e^s ds: the factor rho, which
	// steps sharply at u = 0 where sigma* is small, becomes entire in s.
	lam = math.Min(fastSinhScale, 2*math.Sqrt(k.s2))
	switch {
	case k.ua >= 0:
		// Early times: the weight falls from the lower limit u0 = ua as
		// exp(-v (v + 2 ua)); it reaches exp(-T) at v = T/(sqrt(ua^2+T) + ua).
		hi = math.Min(k.ub-k.ua, fastWeightDecay/(math.Sqrt(k.ua*k.ua+fastWeightDecay)+k.ua))
		if lam == fastSinhScale {
			lam = 0
		}
		return 0, hi, lam
	case k.ub <= 0:
		// A source that stopped long ago: the mirror image, u0 = ub.
		lo = math.Max(k.ua-k.ub, -fastWeightDecay/(math.Sqrt(k.ub*k.ub+fastWeightDecay)-k.ub))
		if lam == fastSinhScale {
			lam = 0
		}
		return lo, 0, lam
	}
	hw := math.Sqrt(fastWeightDecay)
	return math.Max(k.ua, -hw), math.Min(k.ub, hw), lam
}

// fastNodes holds the nodes of one fast integration: u at each node and
// the weight part of the integrand there (weight, rho and the Jacobian of
// the map, times the half-length of the window in the mapped variable).
type fastNodes struct {
	u, w [63]float64
}

// steadyNodes are the nodes of the window [-H, H], H^2 = fastWeightDecay,
// with lambda = fastSinhScale and u0 = 0 (steady state and late times):
// the map and the weight are the same for every receptor there.
var steadyNodes = func() *fastNodes {
	var n fastNodes
	lam, hw := fastSinhScale, math.Sqrt(fastWeightDecay)
	h := math.Asinh(hw / lam)
	for i, x := range pattersonNodes {
		s := h * x
		n.u[i] = lam * math.Sinh(s)
		n.w[i] = math.Exp(-n.u[i]*n.u[i]) * lam * math.Cosh(s) * h
	}
	return &n
}()

// nodePair fills nodes i and 62-i (the same node when i = 31), which lie
// at s = c + h x and c - h x, x = pattersonNodes[62-i] >= 0, in the mapped
// variable of the window (see fastWindow); ec = e^c.
func (k *kernel3D) nodePair(n *fastNodes, i int, c, ec, h, lam float64) {
	x := pattersonNodes[62-i]
	if lam == 0 {
		for _, j := range [2]int{i, 62 - i} {
			v := c + h*pattersonNodes[j]
			n.u[j] = k.u0 + v
			n.w[j] = math.Exp(-v*(v+2*k.u0)) * h
		}
		return
	}
	// e^(c +- h x) from one exponential for the pair; u = lambda sinh(s)
	// may lose relative accuracy near s = 0 to cancellation, which only
	// moves the node by about 1e-16 in u.
	eh := math.Exp(h * x)
	for side, j := range [2]int{62 - i, i} {
		ep := ec * eh
		if side == 1 {
			ep = ec / eh
		}
		em := 1 / ep
		u := lam * (ep - em) / 2
		v := u - k.u0
		n.u[j] = u
		n.w[j] = math.Exp(-v*(v+2*k.u0)) * lam * (ep + em) / 2 * h
	}
}

// fast returns the integral by the fixed nested rule, and false where it
// declines (see above).
func (k *kernel3D) fast(rel float64) (float64, bool) {
	if k.inside || rel < exactRelTol {
		return 0, false
	}
	lo, hi, lam := k.fastWindow()
	if !(hi > lo) {
		return 0, false
	}
	var nodes fastNodes
	var c, h float64
	table := lam == fastSinhScale && k.u0 == 0 && lo == -math.Sqrt(fastWeightDecay) && hi == -lo
	if lam == 0 {
		c, h = (lo+hi)/2, (hi-lo)/2
	} else if !table {
		a, b := math.Asinh((k.u0+lo)/lam), math.Asinh((k.u0+hi)/lam)
		c, h = (a+b)/2, (b-a)/2
	}
	agree := &fastAgreeRough
	if k.smooth(k.sigma(k.u0+lo), k.sigma(k.u0+hi)) {
		agree = &fastAgreeSmooth
	}
	src := &nodes
	if table {
		src = steadyNodes
	}
	q, skipped, ok := k.pattersonNested(src, !table, c, h, lam, agree)
	if !ok || !(q > fastFloor) {
		return 0, false
	}
	// The integrand outside the window, by its rigorous bound.
	out := skipped
	if lim := k.ua - k.u0; lo > lim {
		out += k.bound(math.Max(lim, lo-fastTail(k.u0+lo)), lo)
	}
	if lim := k.ub - k.u0; hi < lim {
		out += k.bound(hi, math.Min(lim, hi+fastTail(k.u0+hi)))
	}
	if out > fastOutside*rel*q {
		return 0, false
	}
	return q, true
}

// fastTail is a length beyond the window end u after which the weight is
// below exp(-700) of its value at u, so that bounding the rest of the line
// by one panel is enough.
func fastTail(u float64) float64 {
	return 700/(math.Abs(u)+math.Sqrt(u*u+700)) + 1
}

// pattersonNested integrates the kernel over the window by the nested
// Patterson rules, from 7 points up to 63, and returns the first estimate
// that agrees with the previous level within agree[level], with the bound
// of what the skipped transverse factors omit from it; false if no level
// agrees. fill: the nodes are computed here (else n holds them already).
func (k *kernel3D) pattersonNested(n *fastNodes, fill bool, c, h, lam float64, agree *[5]float64) (float64, float64, bool) {
	var vals, weight [63]float64
	var skip [63]bool
	ec := 1.0
	if fill && lam != 0 {
		ec = math.Exp(c)
	}
	prev := math.NaN()
	for level := 1; level < 5; level++ {
		stride := 1 << (4 - level)
		cut := fastSkip * math.Abs(prev)
		if level == 1 {
			cut = 0
		}
		var s, skipped float64
		for i, j := stride-1, 0; i < 63; i, j = i+stride, j+1 {
			if level == 1 || (i+1)%(2*stride) != 0 {
				if fill && i <= 31 {
					k.nodePair(n, i, c, ec, h, lam)
				}
				sig, rho := k.shape(n.u[i])
				weight[i] = n.w[i] * rho
				if weight[i] <= cut {
					skip[i] = true
				} else {
					vals[i] = weight[i] * k.fy.at(sig) * k.fz.at(sig)
				}
			}
			wj := pattersonWeights[level][j]
			s += wj * vals[i]
			if skip[i] {
				skipped += wj * weight[i]
			}
		}
		if level >= 2 && math.Abs(s-prev) <= agree[level]*math.Abs(s) {
			return s, skipped, true
		}
		prev = s
	}
	return 0, 0, false
}

// smooth reports whether, over the sigma range [sigLo, sigHi] of the
// window, every transverse factor varies slowly against the weight (the
// log-curvature of each of its error-function terms, about (a rho)^2 at
// the term's transition sigma = 1/a, at most fastSharp^2), and rho itself
// is smooth (sigma* >= fastSigmaMin). There the nested rule converges
// fast enough that the agreement of two levels vouches for the finer one
// with a wide margin (fastAgreeSmooth).
func (k *kernel3D) smooth(sigLo, sigHi float64) bool {
	if k.s2 < fastSigmaMin*fastSigmaMin {
		return false
	}
	rho := func(sig float64) float64 { return sig * sig / (sig*sig + k.s2) }
	// term checks one error-function term erf(a sigma) or, tail true,
	// erfc(a sigma).
	term := func(a float64, tail bool) bool {
		if tail {
			// erfc(a sigma) beyond its transition: log-curvature 2 (a rho)^2.
			return a*sigHi <= 1 || a*rho(sigHi) <= fastSharp
		}
		if a*sigLo >= 4 {
			return true // saturated at 1 over the window
		}
		s := math.Min(math.Max(1/a, sigLo), sigHi)
		return a*rho(s) <= fastSharp
	}
	return k.fy.smooth(term) && k.fz.smooth(term)
}

// smooth applies term to each error-function term of the factor (for a
// screen, to those of its two ends).
func (f *stripFactor) smooth(term func(a float64, tail bool) bool) bool {
	switch f.kind {
	case factorAxis, factorEdge:
		return term(f.a, false)
	case factorInside:
		return term(f.a, false) && term(f.b, false)
	case factorOutside:
		return term(f.b, true) && term(f.a, true)
	case factorScreen:
		top, bot := newStripFactor(f.z1, f.z1, f.h, f.k), newStripFactor(f.z2, f.z2, f.h, f.k)
		return top.smooth(term) && bot.smooth(term)
	case factorOutsideScaled:
		// erfcx(b sigma)/2 (1 - r), r <= exp(-c sigma^2): the first
		// factor bends at most like erf(b sigma) does, and 1 - r rises
		// from 0 to 1 on the scale of erf(sqrt(c) sigma).
		return term(f.b, false) && term(math.Sqrt(f.c), false)
	}
	return true
}
