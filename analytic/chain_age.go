package analytic

import "math"

// The chain by its ages (equal retardation only). All compounds share the
// transport, so the water at the receptor has one distribution of ages
// (times since it left the source), w(tau) per unit age, and what it
// carries of each compound is the Bateman solution at that age:
//
//	C_i = integral w(tau) exp(-g (t - tau)) beta_i(tau) dtau,  beta(tau) = exp(-K tau) c0,
//
// with exp(-g (t - tau)) the weight of a depleting source and the ages of a
// source of finite duration limited to [t - Duration, t]. For the 3D source
// (first-type on the source plane) w is the kernel of Exact3D; for the 1D
// column it is the same with an infinite source, times the ratio of the
// flux-pulse kernel to it for a third-type inlet. beta is evaluated by
// batemanFactor without cancellation whatever the rates, so this form has
// none of the large coefficients of the decoupled terms: it is how the
// evaluators compute a compound whose terms cancel (rates on a path equal
// or nearly so).
//
// The integral is taken in the variable u of Exact3D (see exact3d.go):
// sigma = x/(2 sqrt(D' tau)), u = sigma - sigma*^2/sigma, which turns the
// kernel with decay rate kRef into a unit Gaussian in u. Here kRef is the
// smallest rate the compound's weights decay with (less the source's
// depletion), so that the rest of the integrand, exp(kRef tau) times the
// weights, grows at most like a power of tau. The integrals of one group of
// compounds sharing kRef are computed together by an adaptive
// Gauss-Legendre rule with error control on every component.

// chainAgeRelTol is the relative accuracy asked of the age integrals.
const chainAgeRelTol = 1e-10

// chainAge is one group of compounds evaluated together.
type chainAge struct {
	// geometry and transport
	x, y, top, bot, halfW, depth float64
	ky, kz                       float64
	dp, dx, r, v                 float64
	flux                         bool
	// time and history
	t, g, extra float64
	// substitution
	s2, u0, pref float64
	// the compounds and their decay paths
	comps  []int
	paths  [][]chainPath
	rates  [][][]float64
	c      Chain
	shift  float64
	result []float64
}

// ageGroup evaluates the compounds comps of an equal-R chain at pt and t
// (x > 0) by the age integral, writing into out[comps[k]]. s is the source
// (infinite for the 1D column); flux selects the third-type column kernel.
func ageGroup(pt Point, t float64, p Params, s Source, h History, c Chain, c0 []float64, comps []int, flux bool, out []float64) {
	g := h.Depletion
	// Group by the smallest rate each compound's paths decay with.
	type group struct {
		kMin  float64
		comps []int
	}
	var groups []group
	pathsOf := make([][]chainPath, len(c))
	for _, i := range comps {
		pathsOf[i] = c.paths(i, c0, nil)
		kMin := math.Inf(1)
		for _, pa := range pathsOf[i] {
			for _, k := range pa.nodes[:pa.n] {
				kMin = math.Min(kMin, c[k].Mu)
			}
		}
		if len(pathsOf[i]) == 0 {
			out[i] = 0
			continue
		}
		placed := false
		for gi := range groups {
			if groups[gi].kMin == kMin {
				groups[gi].comps = append(groups[gi].comps, i)
				placed = true
				break
			}
		}
		if !placed {
			groups = append(groups, group{kMin: kMin, comps: []int{i}})
		}
	}
	for _, gr := range groups {
		a := newChainAge(pt, t, p, s, g, c, gr.kMin, flux)
		a.comps = gr.comps
		a.paths = make([][]chainPath, len(gr.comps))
		a.rates = make([][][]float64, len(gr.comps))
		for k, i := range gr.comps {
			a.paths[k] = pathsOf[i]
			a.rates[k] = make([][]float64, len(pathsOf[i]))
			for q := range pathsOf[i] {
				a.rates[k][q] = pathsOf[i][q].rates(c, nil)
			}
		}
		a.result = make([]float64, len(gr.comps))
		a.integrate(h)
		for k, i := range gr.comps {
			out[i] = math.Max(a.result[k], 0)
		}
	}
}

// newChainAge sets up the substitution for decay rate kMin - g (at least 0).
func newChainAge(pt Point, t float64, p Params, s Source, g float64, c Chain, kMin float64, flux bool) *chainAge {
	x := pt.X
	r := c[0].R
	a := &chainAge{x: x, y: math.Abs(pt.Y), halfW: s.Width / 2, depth: s.Depth, c: c,
		dx: p.Dx, r: r, v: p.V, dp: p.Dx / r, flux: flux, t: t, g: g}
	a.top, a.bot = math.Max(pt.Top, 0), math.Max(pt.Bottom, 0)
	if a.bot < a.top {
		a.top, a.bot = a.bot, a.top
	}
	if !math.IsInf(a.halfW, 1) {
		a.ky = 1 / (x * math.Sqrt(p.Dy/p.Dx))
	}
	if !math.IsInf(s.Depth, 1) {
		a.kz = 1 / (x * math.Sqrt(p.Dz/p.Dx))
	}
	kRef := math.Max(kMin-g, 0)
	// The weights carry exp((kRef + g) tau - g t): shift kRef + g, extra -g t.
	a.shift = kRef + g
	if g > 0 {
		a.extra = -g * t
	}
	beta := p.V * x / (4 * p.Dx)
	gam := kRef * x * x / (4 * a.dp)
	root := math.Sqrt(beta*beta + gam)
	a.s2 = root
	attenuation := 2 * gam / (root + beta)
	a.pref = 2 * invSqrtPi * math.Exp(-attenuation)
	return a
}

func (a *chainAge) sigmaOf(u float64) float64 {
	r := math.Sqrt(u*u + 4*a.s2)
	if u >= 0 {
		return (u + r) / 2
	}
	return 2 * a.s2 / (r - u)
}

func (a *chainAge) uOf(sig float64) float64 { return sig - a.s2/sig }

// eval writes the integrands of the group at u = u0 + dv into out (the
// offset from u0 is the variable of integration, so that the Gaussian
// weight exp(-(u - u0)(u + u0)) = exp(-dv (dv + 2 u0)) keeps its relative
// accuracy where u0 is large, at early times).
func (a *chainAge) eval(dv float64, out []float64) {
	u := a.u0 + dv
	sig := a.sigmaOf(u)
	base := math.Exp(-dv*(dv+2*a.u0)) * sig * sig / (sig*sig + a.s2)
	if a.ky != 0 {
		base *= strip(a.y, a.halfW, sig*a.ky)
	}
	if a.kz != 0 {
		base *= stripAverage(a.top, a.bot, a.depth, sig*a.kz)
	}
	tau := a.x * a.x / (4 * a.dp * sig * sig)
	if a.flux {
		base *= fluxPulseRatio(a.x, tau, a.dx, a.r, a.v)
	}
	for k := range a.comps {
		if base == 0 || math.IsInf(tau, 1) {
			out[k] = 0
			continue
		}
		var w float64
		for q, pa := range a.paths[k] {
			w += pa.weight * batemanFactor(a.rates[k][q], tau, a.shift, a.extra)
		}
		v := base * w
		if math.IsNaN(v) || math.IsInf(v, 0) {
			// Only where base underflows against an overflowing weight
			// far out in the tails, where the integrand is negligible.
			v = 0
		}
		out[k] = v
	}
}

// fluxPulseRatio is the ratio of the column's response to a pulse of
// solute flux at its inlet (van Genuchten & Alves 1982, the time derivative
// of their third-type solution without decay),
//
//	f3 = exp(-(Rx - V tau)^2/(4DR tau)) [V/sqrt(pi D R tau) - V^2/(2DR) erfcx(b)],  b = (Rx + V tau)/(2 sqrt(D R tau)),
//
// to the first-type pulse response x/(2 sqrt(pi D' tau^3)) exp(-(x - V' tau)^2/(4 D' tau)).
// With erfcx(b) = (1 - e)/(sqrt(pi) b) it is, without cancellation,
//
//	2 V tau/(Rx + V tau) (1 + V tau e/(R x)),  e = 1 - sqrt(pi) b erfcx(b) in (0, 1).
func fluxPulseRatio(x, tau, d, r, v float64) float64 {
	b := (r*x + v*tau) / (2 * math.Sqrt(d*r*tau))
	var e float64
	if b < 8 {
		e = 1 - b*Erfcx(b)/invSqrtPi
	} else {
		// 1 - sqrt(pi) b erfcx(b) = sum_{k>=1} (-1)^(k+1) (2k-1)!!/(2b^2)^k.
		q := 1 / (2 * b * b)
		term := q
		e = q
		for k := 2; k < 40; k++ {
			term *= -float64(2*k-1) * q
			e += term
			if math.Abs(term) < 1e-17*e {
				break
			}
		}
	}
	return 2 * v * tau / (r*x + v*tau) * (1 + v*tau*e/(r*x))
}

// integrate fills a.result.
func (a *chainAge) integrate(h History) {
	steady := math.IsInf(a.t, 1)
	ua := math.Inf(-1)
	if !steady {
		ua = a.uOf(a.x / (2 * math.Sqrt(a.dp*a.t)))
	}
	ub := math.Inf(1)
	if h.finite() && a.t > h.Duration {
		ub = a.uOf(a.x / (2 * math.Sqrt(a.dp*(a.t-h.Duration))))
	}
	if ua > 0 {
		a.u0 = ua
	} else if ub < 0 {
		a.u0 = ub
	}
	var brk []float64
	add := func(u float64) {
		if u > ua && u < ub {
			brk = append(brk, u)
		}
	}
	w := 1 / (1 + math.Abs(a.u0))
	for _, k := range []float64{0, 2, 6.5, 12, 24, 40} {
		add(a.u0 + k*w)
		if k > 0 {
			add(a.u0 - k*w)
		}
	}
	if sg := math.Sqrt(a.s2); sg < 0.25 {
		for _, k := range []float64{0.5, 4} {
			add(k * sg)
			add(-k * sg)
		}
	}
	edges := func(d, hh, k float64) {
		if k == 0 {
			return
		}
		for _, e := range []float64{math.Abs(d - hh), d + hh} {
			if e > 0 {
				add(a.uOf(1 / (k * e)))
			}
		}
	}
	edges(a.y, a.halfW, a.ky)
	edges(a.top, a.depth, a.kz)
	if a.bot != a.top {
		edges(a.bot, a.depth, a.kz)
	}
	lo, hi := ua, ub
	if math.IsInf(lo, -1) {
		lo = a.u0 - 40*w - 40
	}
	if math.IsInf(hi, 1) {
		hi = a.u0 + 40*w + 40
	}
	brk = append(brk, lo, hi)
	for k := range brk {
		brk[k] -= a.u0
	}
	sortFloats(brk)
	vectorAdaptive(len(a.comps), a.eval, brk, chainAgeRelTol, a.result)
	f := a.pref * math.Exp(-a.u0*a.u0)
	for k := range a.result {
		a.result[k] *= f
	}
}

// vectorAdaptive integrates the nc integrands of f over the panels between
// successive breakpoints to relative accuracy rel for each component: every
// panel is estimated by the glOrder-point Gauss-Legendre rule on its two
// halves, with the difference from the rule on the whole as error
// estimate, and the panel whose error weighs most against its component's
// tolerance is bisected until every component meets rel (or a budget of
// bisections is spent).
func vectorAdaptive(nc int, f func(u float64, out []float64), brk []float64, rel float64, res []float64) {
	ps := &panelSet{nc: nc, f: f, tmp: make([]float64, nc)}
	whole := make([]float64, nc)
	for i := 1; i < len(brk); i++ {
		if brk[i] > brk[i-1] {
			ps.rule(brk[i-1], brk[i], whole)
			ps.push(brk[i-1], brk[i], whole)
		}
	}
	total := make([]float64, nc)
	errs := make([]float64, nc)
	absSum := make([]float64, nc)
	const budget = 400
	for iter := 0; ; iter++ {
		ps.sums(total, errs, absSum)
		wp := ps.worst(rel, total, errs, absSum)
		if wp < 0 || iter >= budget {
			break
		}
		ps.bisect(wp)
	}
	copy(res, total)
}

// panelSet is the panels of vectorAdaptive: for each, its interval and, in
// store at its offset, the rule's values on its left and right halves and
// its error estimate (nc components each).
type panelSet struct {
	nc     int
	f      func(u float64, out []float64)
	panels []vectorPanel
	store  []float64
	tmp    []float64 // one evaluation of f
}

// vectorPanel is one panel [a, b] and the offset of its values in store.
type vectorPanel struct {
	a, b float64
	off  int
}

// rule writes the glOrder-point Gauss-Legendre rule on [a, b] to out.
func (ps *panelSet) rule(a, b float64, out []float64) {
	for k := range out {
		out[k] = 0
	}
	c, hw := (a+b)/2, (b-a)/2
	for i, xi := range glNodes {
		ps.f(c+hw*xi, ps.tmp)
		for k := range out {
			out[k] += glWeights[i] * ps.tmp[k]
		}
	}
	for k := range out {
		out[k] *= hw
	}
}

// push adds the panel [a, b] whose rule on the whole gave w: the rule on
// its halves, and their difference from w as its error estimate.
func (ps *panelSet) push(a, b float64, w []float64) {
	nc := ps.nc
	off := len(ps.store)
	ps.store = append(ps.store, make([]float64, 3*nc)...)
	m := (a + b) / 2
	l, r, e := ps.store[off:off+nc], ps.store[off+nc:off+2*nc], ps.store[off+2*nc:off+3*nc]
	ps.rule(a, m, l)
	ps.rule(m, b, r)
	for k := 0; k < nc; k++ {
		e[k] = math.Abs(l[k] + r[k] - w[k])
	}
	ps.panels = append(ps.panels, vectorPanel{a, b, off})
}

// sums writes each component's integral over all panels, its error
// estimate and the integral of its absolute value.
func (ps *panelSet) sums(total, errs, absSum []float64) {
	nc := ps.nc
	for k := range total {
		total[k], errs[k], absSum[k] = 0, 0, 0
	}
	for _, p := range ps.panels {
		for k := 0; k < nc; k++ {
			l, r := ps.store[p.off+k], ps.store[p.off+nc+k]
			total[k] += l + r
			absSum[k] += math.Abs(l) + math.Abs(r)
			errs[k] += ps.store[p.off+2*nc+k]
		}
	}
}

// worst is the index of the panel whose error weighs most against the
// tolerance of a component that misses it, -1 when every component meets
// its tolerance.
func (ps *panelSet) worst(rel float64, total, errs, absSum []float64) int {
	nc := ps.nc
	worst, wp := 0.0, -1
	for q, p := range ps.panels {
		for k := 0; k < nc; k++ {
			// Rounding in the integrand bounds what bisection can do.
			tol := rel*math.Abs(total[k]) + 1e-14*absSum[k] + 1e-300
			if errs[k] <= tol {
				continue
			}
			if s := ps.store[p.off+2*nc+k] / tol; s > worst {
				worst, wp = s, q
			}
		}
	}
	return wp
}

// bisect replaces panel q by its two halves.
func (ps *panelSet) bisect(q int) {
	nc := ps.nc
	p := ps.panels[q]
	m := (p.a + p.b) / 2
	l := append([]float64(nil), ps.store[p.off:p.off+nc]...)
	r := append([]float64(nil), ps.store[p.off+nc:p.off+2*nc]...)
	ps.panels[q] = ps.panels[len(ps.panels)-1]
	ps.panels = ps.panels[:len(ps.panels)-1]
	ps.push(p.a, m, l)
	ps.push(m, p.b, r)
}
