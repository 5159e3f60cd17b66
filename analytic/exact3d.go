package analytic

import "math"

// Exact3D returns C/C0 at (x, y, z) and time t for the continuous planar
// source s: the exact solution for a constant concentration C0 held on the
// source rectangle from t = 0, written as the time integral (Wexler 1992,
// USGS TWRI 3-B7, finite-width and finite-height source in a semi-infinite
// aquifer; here with the water table as a no-flux boundary by an image
// source)
//
//	C/C0 = integral_0^t x/(2 sqrt(pi D' tau^3)) exp(-Mu tau - (x - v' tau)^2/(4 D' tau)) Fy(tau) Fz(tau) dtau
//
// with D' = Dx/R, v' = V/R and Fy, Fz the fractions of the transverse and
// vertical Gaussian spreads that fall inside the source (see strip). The
// relative accuracy is 1e-7 or better. t = math.Inf(1) gives the steady
// state. x < 0 (upgradient of the source plane) gives 0: the solution is for
// the aquifer downgradient of the source only.
//
// Method: the substitution sigma = x/(2 sqrt(D' tau)) turns the kernel into
// (2/sqrt(pi)) exp(-(sigma - beta/sigma)^2 - gamma/sigma^2) d sigma
// (beta = v'x/(4D'), gamma = Mu x^2/(4D')), and u = sigma - sigma*^2/sigma
// with sigma*^4 = beta^2 + gamma turns that into the Gaussian weight
// exp(-A - u^2) times the bounded factor sigma^2/(sigma^2 + sigma*^2),
// where A = 2(sigma*^2 - beta) is the steady 1D attenuation by decay. The
// sharp kernel of high Peclet numbers becomes a unit-width Gaussian in u.
// For a receptor outside the source's width or below its depth the
// transverse factor's Gaussian fall is first taken into the weight
// (kernel3D.tilted), so that the weight's peak is where the integrand's
// mass is. A fixed nested rule on one window around the weight's peak
// (kernel3D.fast, exact3d_fast.go) takes the cases whose value it can
// vouch for, typically with 31 evaluations of the integrand; the others go
// to adaptive Gauss-Legendre bisection on panels in u refined where the
// transverse factors change and towards the limits (kernel3D.rigorous),
// which reaches the tolerance at every Peclet number. The value depends
// only on the inputs of the one call. Exact3D(x, 0, 0, t, p,
// Source{+Inf, +Inf}) equals OgataBanks(x, t, p) to that accuracy.
func Exact3D(x, y, z, t float64, p Params, s Source) float64 {
	return Exact3DAt(Point{X: x, Y: y, Top: z, Bottom: z}, t, p, s, History{})
}

// exactRelTol is the relative accuracy asked of the exact 3D integral:
// of the adaptive quadrature, whose error estimates are conservative, and
// of the fast path, whose thresholds are set for it (fastAgreeSmooth).
const exactRelTol = 1e-7

// Exact3DAt is Exact3D for a receptor depth interval (the value is averaged
// over [pt.Top, pt.Bottom]) and a source history h: a source that stops
// after h.Duration contributes the kernel only over the ages
// [t - h.Duration, t], and a depleting source weights age tau by
// exp(-h.Depletion (t - tau)), or with a power-law history (h.Rate > 0)
// by the source concentration Cs(t - tau)/C0 at the emission time (see
// History.Fraction; a source with Gamma < 1 contributes only the ages
// emitted before its mass ran out). These are integrated directly, never
// as a difference of two continuous solutions, so values far below the
// source keep their relative accuracy after the source has stopped.
func Exact3DAt(pt Point, t float64, p Params, s Source, h History) float64 {
	return exact3D(pt, t, p, s, h, exactRelTol)
}

// exact3D is Exact3DAt with the relative tolerance of the quadrature given.
func exact3D(pt Point, t float64, p Params, s Source, h History, rel float64) float64 {
	return exact3DKernel(pt, t, p, s, h, rel, false)
}

// exact3DKernel integrates either the concentration-inlet kernel (flux
// false) or, for the 1D column with a flux inlet, the response of that
// column to a unit pulse of solute flux (flux true; van Genuchten & Alves
// 1982, the time derivative of their no-decay third-type solution),
//
//	f3(x, tau) = exp(-(Rx - V tau)^2/(4DR tau)) [V/sqrt(pi D R tau) - V^2/(2DR) erfcx((Rx + V tau)/(2 sqrt(DRt)))],
//
// against the same source history and decay weights.
func exact3DKernel(pt Point, t float64, p Params, s Source, h History, rel float64, flux bool) float64 {
	h = h.normalized()
	if c, done := exact3DTrivial(pt, t, p, s, h); done {
		return c
	}
	k, scale := newKernel3D(pt, t, p, s, h, flux)
	if scale == 0 {
		return 0
	}
	return clamp01(scale * k.integral(rel))
}

// exact3DTrivial returns the value where no integral is needed: outside
// the aquifer or before the start, the steady state of a source that stops
// or depletes, and the source plane itself.
func exact3DTrivial(pt Point, t float64, p Params, s Source, h History) (float64, bool) {
	x := pt.X
	if x < 0 || !(t > 0) || math.IsNaN(x) || math.IsNaN(pt.Y) {
		return 0, true
	}
	if math.IsInf(t, 1) && h.fades() {
		return 0, true
	}
	if x > 0 {
		return 0, false
	}
	if h.finite() && t > h.Duration {
		return 0, true
	}
	top, bot := screenDepths(pt)
	inf := math.Inf(1)
	return clamp01(h.Fraction(t) * strip(math.Abs(pt.Y), s.Width/2, inf) * stripAverage(top, bot, s.Depth, inf)), true
}

// screenDepths returns the receptor's depth interval clipped to the water
// table and ordered.
func screenDepths(pt Point) (top, bot float64) {
	top, bot = math.Max(pt.Top, 0), math.Max(pt.Bottom, 0)
	if bot < top {
		top, bot = bot, top
	}
	return top, bot
}

// kernel3D is the integrand of the exact time integral in the variable u
// (see Exact3D) with everything that does not depend on u computed once:
//
//	integral = int_ua^ub exp(-(u-u0)(u+u0)) rho(u) Fy(sigma ky) Fz(sigma kz) W(tau) du
//
// with rho = sigma^2/(sigma^2 + s2), tau = x^2/(4 D' sigma^2) the age and W the
// decay, depletion and flux-pulse weights that stay inside the integral
// (W = 1 unless inside).
type kernel3D struct {
	y, halfW        float64 // |y| and the source half-width
	top, bot, depth float64 // receptor depth interval and source depth
	ky, kz          float64 // sigma to transverse-argument ratios; 0: the factor is 1
	fy, fz          stripFactor
	s2              float64 // sigma*^2
	tilt            float64 // T >= 1: sigma here is T times the sigma of the age (see tilted)
	u0              float64 // shift of the weight
	ua, ub          float64 // u at tau = t and at tau = t - Duration (or -Inf, +Inf)
	inside, flux    bool    // decay weights in the integrand; flux-pulse kernel
	mu, g, t        float64 // decay, depletion, time
	hist            History // a power-law history (hist.power()) weighs the integrand
	x, dp, beta     float64 // distance, D' = Dx/R and beta
	v, dx, r        float64 // column coefficients for the flux kernel
}

// newKernel3D sets up the integrand for x > 0 and returns it with the
// factor that turns its integral into C/C0: (2/sqrt(pi)) exp(-A - u0^2)
// times exp(-g t) where the depletion is folded into the decay rate.
func newKernel3D(pt Point, t float64, p Params, s Source, h History, flux bool) (kernel3D, float64) {
	return newKernel3DTilt(pt, t, p, s, h, flux, tiltMin)
}

// newKernel3DTilt is newKernel3D with the threshold of tiltFor given
// (+Inf: never tilted; the tests compare both forms).
func newKernel3DTilt(pt Point, t float64, p Params, s Source, h History, flux bool, minTilt float64) (kernel3D, float64) {
	x := pt.X
	top, bot := screenDepths(pt)
	k := kernel3D{y: math.Abs(pt.Y), halfW: s.Width / 2, top: top, bot: bot, depth: s.Depth,
		flux: flux, mu: p.Mu, g: h.Depletion, t: t, x: x, v: p.V, dx: p.Dx, r: p.R}
	dp := p.Dx / p.R
	k.dp = dp
	k.beta = p.V * x / (4 * p.Dx)
	// Ratios that turn sigma into the arguments of the transverse factors:
	// 1/(2 sqrt(Dy tau/R)) = sigma * ky with ky = 1/(x sqrt(Dy/Dx)).
	if !math.IsInf(k.halfW, 1) {
		k.ky = 1 / (x * math.Sqrt(p.Dy/p.Dx))
	}
	if !math.IsInf(s.Depth, 1) {
		k.kz = 1 / (x * math.Sqrt(p.Dz/p.Dx))
	}
	k.fy = newStripFactor(k.y, k.y, k.halfW, k.ky)
	k.fz = newStripFactor(top, bot, s.Depth, k.kz)
	k.tilt = 1

	// Decay and depletion: the depletion is folded into an effective decay
	// rate Mu - g >= 0 and a factor exp(-g t) where g <= Mu. Otherwise
	// (g > Mu, or the flux kernel) the weight exp(-g (t-tau) - Mu tau) <= 1
	// stays in the integrand.
	pref := 1.0
	var gam float64
	if h.power() {
		k.hist = h
	}
	k.inside = k.g > p.Mu || flux || h.power()
	if !k.inside {
		if k.g > 0 {
			pref = math.Exp(-k.g * t)
		}
		gam = (p.Mu - k.g) * x * x / (4 * dp)
	}
	root := math.Sqrt(k.beta*k.beta + gam)
	k.s2 = root
	attenuation := 2 * gam / (root + k.beta)

	// sigma at the limits: tau = t (0: none) and tau = t - Duration (+Inf:
	// none).
	sigT, sigD := 0.0, math.Inf(1)
	if !math.IsInf(t, 1) {
		sigT = x / (2 * math.Sqrt(dp*t))
	}
	if h.finite() && t > h.Duration {
		sigD = x / (2 * math.Sqrt(dp*(t-h.Duration)))
	}
	if tl := k.tiltFor(sigT, sigD, minTilt); tl > 1 {
		k.tilted(tl)
		attenuation += 2 * (tl - 1) * root
		pref /= tl
	}

	// Limits in u: tau = t is the lower limit, tau = t - Duration the upper.
	k.ua, k.ub = math.Inf(-1), math.Inf(1)
	if sigT > 0 {
		k.ua = k.uOf(k.tilt * sigT)
	}
	if !math.IsInf(sigD, 1) {
		k.ub = k.uOf(k.tilt * sigD)
	}
	// Shift that keeps the weight exp(-(u^2 - u0^2)) near 1 where the mass is.
	if k.ua > 0 {
		k.u0 = k.ua
	} else if k.ub < 0 {
		k.u0 = k.ub
	}
	return k, 2 * invSqrtPi * pref * math.Exp(-attenuation-k.u0*k.u0)
}

// tiltMin is the decay exponent B sigma^2 of the transverse factors
// outside the source, at the sigma where the weight's mass lies, from which
// the kernel is tilted (see tiltFor).
const tiltMin = 1.0

// tiltFor returns the tilt T for the kernel (1: none). A receptor outside
// the source's width (or below its depth) has a transverse factor that
// falls like exp(-b^2 sigma^2) with sigma (younger ages): the integrand's
// mass then lies at smaller sigma than the weight's, where the window of
// the fast path and the panels of the adaptive one are not. Where that
// fall is steep at the weight's mass (B sigma^2 >= tiltMin, B the sum of
// b^2 over the factors outside), the kernel takes the factors'
// exponentials into the weight: T = sqrt(1 + B). Not for the flux kernel
// or a weight kept inside. sigT, sigD: sigma at tau = t and at
// tau = t - Duration (0, +Inf: none); minTilt: the threshold (tiltMin).
func (k *kernel3D) tiltFor(sigT, sigD, minTilt float64) float64 {
	if k.inside {
		return 1
	}
	b := k.fy.outsideRate() + k.fz.outsideRate()
	if !(b > 0) {
		return 1
	}
	// sigma where the weight exp(-u^2), u = sigma - s2/sigma, has its mass
	// between the limits: its peak sigma* = sqrt(s2), or the nearer limit.
	sig := math.Sqrt(k.s2)
	switch {
	case sig < sigT:
		sig = sigT
	case sig > sigD:
		sig = sigD
	}
	if !(b*sig*sig >= minTilt) {
		return 1
	}
	return math.Sqrt(1 + b)
}

// tilted changes the kernel's variable to sigma' = T sigma: with the
// factors outside written exp(-b^2 sigma^2) G(sigma), the exponent
// -(sigma - beta/sigma)^2 - gamma/sigma^2 - B sigma^2 becomes
// -(sigma' - S/sigma')^2 - 2 (S - beta) with S = T sigma*^2, the same form
// with sigma*^2 scaled by T, a further attenuation 2 (T - 1) sigma*^2 and a
// factor 1/T from d sigma = d sigma'/T (the caller applies those two). The
// factors take sigma' (their coefficients divided by T), and those outside
// return G, which varies slowly.
func (k *kernel3D) tilted(tl float64) {
	k.tilt = tl
	k.s2 *= tl
	k.ky /= tl
	k.kz /= tl
	k.fy = k.fy.scaledBy(tl)
	k.fz = k.fz.scaledBy(tl)
}

// sigma inverts u = sigma - s2/sigma without cancellation.
func (k *kernel3D) sigma(u float64) float64 {
	r := math.Sqrt(u*u + 4*k.s2)
	if u >= 0 {
		return (u + r) / 2
	}
	return 2 * k.s2 / (r - u)
}

func (k *kernel3D) uOf(sig float64) float64 { return sig - k.s2/sig }

// eval is the integrand at u = u0 + v. The offset v from the shift u0 is
// the variable of integration so that the exponent of the weight,
// -(u-u0)(u+u0) = -v (v + 2 u0), keeps its relative accuracy when u0 is
// large (early times, far receptors).
func (k *kernel3D) eval(v float64) float64 {
	sig, rho := k.shape(k.u0 + v)
	f := math.Exp(-v*(v+2*k.u0)) * rho
	f *= k.fy.at(sig) * k.fz.at(sig)
	if k.inside {
		f = k.weighted(f, sig)
	}
	return f
}

// weighted multiplies v by the part of the integrand kept inside for the
// age of sigma:
// decay and depletion (exponential, or the power-law source
// concentration at the emission time t - tau), and for the flux kernel the ratio of the flux-pulse
// kernel to the concentration kernel in the variable u,
// B x^2 sqrt(pi) / (4 D' sigma^3), at most 2 beta / sigma^2.
func (k *kernel3D) weighted(v, sig float64) float64 {
	x, dp := k.x, k.dp
	sig /= k.tilt // a weight inside is never tilted; kept for safety
	tau := x * x / (4 * dp * sig * sig)
	wt := -k.mu * tau
	if k.g > 0 {
		wt -= k.g * (k.t - tau)
	}
	v *= math.Exp(wt)
	if k.hist.power() {
		v *= k.hist.powerFraction(k.t - tau)
	}
	if k.flux {
		drt := k.dx * k.r * tau
		b3 := (k.r*x + k.v*tau) / (2 * math.Sqrt(drt))
		bb := k.v/math.Sqrt(math.Pi*drt) - k.v*k.v/(2*k.dx*k.r)*Erfcx(b3)
		v *= math.Max(bb, 0) * x * x / (4 * dp * sig * sig * sig) / invSqrtPi
	}
	return v
}

// shape returns sigma and the factor rho = sigma^2/(sigma^2 + s2) at u.
func (k *kernel3D) shape(u float64) (sig, rho float64) {
	sig = k.sigma(u)
	return sig, sig * sig / (sig*sig + k.s2)
}

// bound is a rigorous upper bound of the integral over the offsets [a, b]
// (u in [u0+a, u0+b]): the weight at the point nearest the peak u = 0, rho
// at the upper end (it rises with u), the transverse factors bounded over
// the range of sigma, and the inside weights by 1 (the flux ratio by
// 2 beta / sigma^2).
func (k *kernel3D) bound(a, b float64) float64 {
	m := 0.0 // offset of the point of [a, b] nearest u = 0
	switch {
	case k.u0+a > 0:
		m = a
	case k.u0+b < 0:
		m = b
	default:
		m = -k.u0
	}
	sa, _ := k.shape(k.u0 + a)
	sb, rb := k.shape(k.u0 + b)
	e := math.Exp(-m * (m + 2*k.u0))
	v := e * rb * (b - a)
	if k.flux {
		v *= 2 * k.beta / (sa * sa)
		v = math.Min(v, 2*(b-a)*e)
	}
	switch {
	case k.fy.kind == factorOutsideScaled:
		v *= k.fy.scaledBound(sa)
	case k.ky != 0:
		v *= math.Min(stripBound(k.y, k.halfW, sa*k.ky), stripBoundAbove(k.y, k.halfW, sb*k.ky))
	}
	switch {
	case k.fz.kind == factorOutsideScaled:
		v *= k.fz.scaledBound(sa)
	case k.kz != 0:
		v *= screenBound(k.top, k.bot, k.depth, sa*k.kz, sb*k.kz)
	}
	return v
}

// integral integrates the kernel to relative accuracy rel.
func (k *kernel3D) integral(rel float64) float64 {
	if q, ok := k.fast(rel); ok {
		return q
	}
	return k.rigorous(rel)
}

// rigorous integrates by adaptive Gauss-Legendre bisection on the panels
// of layout, skipping those whose bounds are negligible.
func (k *kernel3D) rigorous(rel float64) float64 {
	return k.rigorousBudget(rel, maxPanelsPerIntegral)
}

// rigorousBudget is rigorous with the number of bisections allowed given.
func (k *kernel3D) rigorousBudget(rel float64, budget int) float64 {
	var brk [66]float64
	pts := k.layout(brk[:0])
	for i := range pts {
		pts[i] -= k.u0
	}
	var panels [66]panel
	np := 0
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		if b <= a {
			continue
		}
		panels[np] = panel{a: a, b: b, bound: k.bound(a, b)}
		np++
	}
	return integratePanelsBudget(k.eval, panels[:np], rel, budget)
}

// layout returns the sorted panel ends in u: the limits (or, for an
// infinite one, a point 40 widths beyond the peak), points around the peak
// of the weight on the scale of its width, where rho steps if it does so
// sharply, where each transverse factor changes, and ladders towards the
// finite limits.
func (k *kernel3D) layout(pts []float64) []float64 {
	add := func(u float64) {
		if u > k.ua && u < k.ub && len(pts) < cap(pts)-2 {
			pts = append(pts, u)
		}
	}
	u0 := k.u0
	w := 1 / (1 + math.Abs(u0))
	for _, m := range []float64{0, 2, 6.5, 12, 24, 40} {
		add(u0 + m*w)
		if m > 0 {
			add(u0 - m*w)
		}
	}
	if sg := math.Sqrt(k.s2); sg < 0.25 {
		for _, m := range []float64{0.5, 4} {
			add(m * sg)
			add(-m * sg)
		}
	}
	// Where each transverse factor changes: sigma k |edge| ~ 1.
	edges := func(d, hh, kk float64) {
		if kk == 0 {
			return
		}
		for _, e := range []float64{math.Abs(d - hh), d + hh} {
			if e == 0 {
				continue
			}
			if ue := k.uOf(1 / (kk * e)); math.Abs(ue-u0) < 6.5*w {
				add(ue)
			}
		}
	}
	edges(k.y, k.halfW, k.ky)
	edges(k.top, k.depth, k.kz)
	if k.bot != k.top {
		edges(k.bot, k.depth, k.kz)
	}
	// A geometric ladder towards each finite limit: the integrand can fall
	// away from a limit on any scale (a receptor just outside the source's
	// spread at early times falls like exp(-(a sigma)^2) with a large), and
	// a panel whose nodes all lie beyond that fall sees nothing.
	for j, d := 0, w/4; j < 8; j, d = j+1, d/4 {
		add(k.ua + d)
		add(k.ub - d)
	}
	lo, hi := k.ua, k.ub
	if math.IsInf(lo, -1) {
		lo = u0 - 40*w - 40
	}
	if math.IsInf(hi, 1) {
		hi = u0 + 40*w + 40
	}
	pts = append(pts, lo, hi)
	sortFloats(pts)
	return pts
}

// sortFloats sorts a short slice in place (insertion sort; no allocation).
func sortFloats(a []float64) {
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && a[j] < a[j-1]; j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}
