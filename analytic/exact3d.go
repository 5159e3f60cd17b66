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
// relative accuracy is 1e-6 or better. t = math.Inf(1) gives the steady
// state. x < 0 (upgradient of the source plane) gives 0: the solution is for
// the aquifer downgradient of the source only.
//
// Method: the substitution sigma = x/(2 sqrt(D' tau)) turns the kernel into
// (2/sqrt(pi)) exp(-(sigma - beta/sigma)^2 - gamma/sigma^2) d sigma
// (beta = v'x/(4D'), gamma = Mu x^2/(4D')), and u = sigma - sigma*^2/sigma
// with sigma*^4 = beta^2 + gamma turns that into the Gaussian weight
// exp(-A - u^2) times the bounded factor sigma^2/(sigma^2 + sigma*^2),
// where A = 2(sigma*^2 - beta) is the steady 1D attenuation by decay. The
// sharp kernel of high Peclet numbers becomes a unit-width Gaussian in u, so
// a fixed set of panels in u, refined where the transverse factors change,
// with adaptive Gauss-Legendre bisection on each, reaches the tolerance at
// every Peclet number. Exact3D(x, 0, 0, t, p, Source{+Inf, +Inf}) equals
// OgataBanks(x, t, p).
func Exact3D(x, y, z, t float64, p Params, s Source) float64 {
	return Exact3DAt(Point{X: x, Y: y, Top: z, Bottom: z}, t, p, s, History{})
}

// exactRelTol is the relative accuracy asked of the adaptive quadrature;
// its error estimates are conservative, so the achieved accuracy is better.
const exactRelTol = 1e-7

// Exact3DAt is Exact3D for a receptor depth interval (the value is averaged
// over [pt.Top, pt.Bottom]) and a source history h: a source that stops
// after h.Duration contributes the kernel only over the ages
// [t - h.Duration, t], and a depleting source weights age tau by
// exp(-h.Depletion (t - tau)).
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
//	f3(x, tau) = exp(-(Rx - V tau)^2/(4DR tau)) [V/sqrt(pi D R tau) - V^2/(2DR) erfcx((Rx + V tau)/(2 sqrt(DR tau)))],
//
// against the same source history and decay weights.
func exact3DKernel(pt Point, t float64, p Params, s Source, h History, rel float64, flux bool) float64 {
	x := pt.X
	if x < 0 || !(t > 0) || math.IsNaN(x) || math.IsNaN(pt.Y) {
		return 0
	}
	steady := math.IsInf(t, 1)
	g := h.Depletion
	if steady && (g > 0 || h.finite()) {
		return 0
	}
	y := math.Abs(pt.Y)
	top, bot := math.Max(pt.Top, 0), math.Max(pt.Bottom, 0)
	if bot < top {
		top, bot = bot, top
	}
	halfW := s.Width / 2
	if x == 0 {
		if h.finite() && t > h.Duration {
			return 0
		}
		return clamp01(math.Exp(-g*t) * strip(y, halfW, math.Inf(1)) * stripAverage(top, bot, s.Depth, math.Inf(1)))
	}

	dp := p.Dx / p.R
	beta := p.V * x / (4 * p.Dx)
	// Ratios that turn sigma into the arguments of the transverse factors:
	// 1/(2 sqrt(Dy tau/R)) = sigma * ky with ky = 1/(x sqrt(Dy/Dx)).
	ky := 1 / (x * math.Sqrt(p.Dy/p.Dx))
	kz := 1 / (x * math.Sqrt(p.Dz/p.Dx))
	if math.IsInf(halfW, 1) {
		ky = 0
	}
	if math.IsInf(s.Depth, 1) {
		kz = 0
	}

	// Decay and depletion. mode "shifted": the depletion is folded into an
	// effective decay rate Mu - g >= 0 and a factor exp(-g t). Otherwise
	// (g > Mu) the weight exp(-g (t-tau) - Mu tau) <= 1 stays in the
	// integrand.
	var pref, gam float64
	inside := g > p.Mu || flux
	if inside || g == 0 {
		pref = 1
	} else {
		pref = math.Exp(-g * t)
	}
	if !inside {
		gam = (p.Mu - g) * x * x / (4 * dp)
	}
	root := math.Sqrt(beta*beta + gam)
	s2 := root // sigma*^2
	attenuation := 2 * gam / (root + beta)

	sigmaOf := func(u float64) float64 {
		r := math.Sqrt(u*u + 4*s2)
		if u >= 0 {
			return (u + r) / 2
		}
		return 2 * s2 / (r - u)
	}
	uOf := func(sig float64) float64 { return sig - s2/sig }

	// Limits in u: tau = t is the lower limit, tau = t - Duration the upper.
	ua := math.Inf(-1)
	if !steady {
		ua = uOf(x / (2 * math.Sqrt(dp*t)))
	}
	ub := math.Inf(1)
	if h.finite() && t > h.Duration {
		ub = uOf(x / (2 * math.Sqrt(dp*(t-h.Duration))))
	}
	// Shift that keeps the weight exp(-(u^2 - u0^2)) near 1 where the mass is.
	u0 := 0.0
	if ua > 0 {
		u0 = ua
	} else if ub < 0 {
		u0 = ub
	}
	shape := func(u float64) (sig, rho float64) {
		sig = sigmaOf(u)
		return sig, sig * sig / (sig*sig + s2)
	}
	f := func(u float64) float64 {
		sig, rho := shape(u)
		v := math.Exp(-(u-u0)*(u+u0)) * rho
		if ky != 0 {
			v *= strip(y, halfW, sig*ky)
		}
		if kz != 0 {
			v *= stripAverage(top, bot, s.Depth, sig*kz)
		}
		if inside {
			tau := x * x / (4 * dp * sig * sig)
			wt := -p.Mu * tau
			if g > 0 {
				wt -= g * (t - tau)
			}
			v *= math.Exp(wt)
			if flux {
				// Ratio of the flux-pulse kernel to the concentration kernel
				// in the variable u: B x^2 sqrt(pi) / (4 D' sigma^3), at most
				// 2 beta / sigma^2.
				drt := p.Dx * p.R * tau
				b3 := (p.R*x + p.V*tau) / (2 * math.Sqrt(drt))
				bb := p.V/math.Sqrt(math.Pi*drt) - p.V*p.V/(2*p.Dx*p.R)*Erfcx(b3)
				v *= math.Max(bb, 0) * x * x / (4 * dp * sig * sig * sig) / invSqrtPi
			}
		}
		return v
	}
	bound := func(a, b float64) float64 {
		m := 0.0
		if a > 0 {
			m = a
		} else if b < 0 {
			m = b
		}
		sa, _ := shape(a)
		sb, rb := shape(b)
		v := math.Exp(-(m-u0)*(m+u0)) * rb * (b - a)
		if flux {
			v *= 2 * beta / (sa * sa) / rb * sb * sb / (sb*sb + s2)
			v = math.Min(v, 2*(b-a)*math.Exp(-(m-u0)*(m+u0)))
		}
		if ky != 0 {
			v *= math.Min(stripBound(y, halfW, sa*ky), stripBoundAbove(y, halfW, sb*ky))
		}
		if kz != 0 {
			v *= screenBound(top, bot, s.Depth, sa*kz, sb*kz)
		}
		return v
	}

	var brk [64]float64
	n := 0
	add := func(u float64) {
		if u > ua && u < ub && n < len(brk) {
			brk[n] = u
			n++
		}
	}
	// Around the peak of the weight, on the scale of its width.
	w := 1 / (1 + math.Abs(u0))
	for _, k := range []float64{0, 2, 6.5, 12, 24, 40} {
		add(u0 + k*w)
		if k > 0 {
			add(u0 - k*w)
		}
	}
	// Where the factor sigma^2/(sigma^2+sigma*^2) steps, if sharply.
	if sg := math.Sqrt(s2); sg < 0.25 {
		for _, k := range []float64{0.5, 4} {
			add(k * sg)
			add(-k * sg)
		}
	}
	// Where each transverse factor changes: sigma*k*|edge| ~ 1.
	edges := func(d, hh, k float64) {
		if k == 0 {
			return
		}
		for _, e := range []float64{math.Abs(d - hh), d + hh} {
			if e == 0 {
				continue
			}
			if ue := uOf(1 / (k * e)); math.Abs(ue-u0) < 6.5*w {
				add(ue)
			}
		}
	}
	edges(y, halfW, ky)
	edges(top, s.Depth, kz)
	if bot != top {
		edges(bot, s.Depth, kz)
	}
	lo, hi := ua, ub
	if math.IsInf(lo, -1) {
		lo = u0 - 40*w - 40
	}
	if math.IsInf(hi, 1) {
		hi = u0 + 40*w + 40
	}
	pts := append(brk[:n:n], lo, hi)
	sortFloats(pts)
	var panels [66]panel
	np := 0
	for i := 1; i < len(pts); i++ {
		a, b := pts[i-1], pts[i]
		if b <= a {
			continue
		}
		panels[np] = panel{a: a, b: b, bound: bound(a, b)}
		np++
	}
	integral := integratePanels(f, panels[:np], rel)
	c := 2 * invSqrtPi * pref * math.Exp(-attenuation-u0*u0) * integral
	return clamp01(c)
}

// sortFloats sorts a short slice in place (insertion sort; no allocation).
func sortFloats(a []float64) {
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && a[j] < a[j-1]; j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}
