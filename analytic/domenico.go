package analytic

import "math"

// Domenico returns C/C0 at (x, y, z) and time t by the Domenico (1987)
// approximation (J. Hydrol. 91, 49-58) for the continuous planar source s,
// with retardation and first-order decay:
//
//	C/C0 = 1/8 exp(x/(2ax) (1 - sqrt(1 + 4 Mu ax R/V))) erfc((x - v't sqrt(1 + 4 Mu ax R/V))/(2 sqrt(ax v' t)))
//	     * [erf((y + W/2)/(2 sqrt(ay x))) - erf((y - W/2)/(2 sqrt(ay x)))]
//	     * [erf((z + Z)/(2 sqrt(az x))) - erf((z - Z)/(2 sqrt(az x)))]
//
// with ai = Di/V the dispersivities (molecular diffusion included) and
// v' = V/R. The longitudinal factor is the first term of the Ogata-Banks
// solution; the transverse spreads are evaluated at the travel distance x
// instead of over the travel time, which is what makes it an approximation
// (it errs most where ax is large relative to x: see DomenicoDeviation).
// t = math.Inf(1) gives the steady state; x < 0 gives 0.
func Domenico(x, y, z, t float64, p Params, s Source) float64 {
	return DomenicoAt(Point{X: x, Y: y, Top: z, Bottom: z}, t, p, s, History{})
}

// DomenicoAt is Domenico for a receptor depth interval (the vertical factor
// is averaged over [pt.Top, pt.Bottom]) and a source history (C0 exp(-g s)
// while active, 0 <= s <= Duration; see History). A depleting source:
// where g <= Mu, the substitution that is exact for the longitudinal factor,
// Mu -> Mu - g with the factor exp(-g t); where the source depletes faster
// than the plume decays (g > Mu), the source concentration at the time of
// emission, exp(-g (t - R x/V)), multiplies the non-depleting value (common
// practice). A finite duration by superposition, L(t) - exp(-g Duration)
// L(t - Duration) for the longitudinal factor L of the continuing source;
// where both terms carry the same factor the difference is formed as a
// difference of complementary error functions that does not cancel (see
// erfcDiff), so values long after the pulse keep their relative accuracy.
// A source depleting by its mass (h.Rate > 0 with an exponent other than
// 1; Gamma = 1 is the exponential depletion above): the source
// concentration at the emission time t - R x/V times the value of the
// source at full strength (see domenicoPower).
func DomenicoAt(pt Point, t float64, p Params, s Source, h History) float64 {
	x := pt.X
	if x < 0 || !(t > 0) || math.IsNaN(x) || math.IsNaN(pt.Y) {
		return 0
	}
	h = h.normalized()
	g := h.Depletion
	if math.IsInf(t, 1) && h.fades() {
		return 0
	}
	lateral := domenicoLateral(pt, p, s)
	if lateral == 0 {
		return 0
	}
	var c float64
	switch {
	case h.power():
		c = domenicoPower(x, t, p, h)
	case h.finite() && t > h.Duration:
		c = domenicoPulse(x, t, t-h.Duration, p, g)
	default:
		c = domenicoDepleting(x, t, p, g)
	}
	return clamp01(c * lateral)
}

// domenicoPower is the longitudinal factor for a source depleting by its
// mass (normalized power-law history h): the source concentration at the
// emission time t - R x/V (at most the time the source stopped or ran
// out, at least 0) times the longitudinal factor of the source at full
// strength, itself the pulse L(t) - L(t - Duration) once the source has
// stopped or its mass has run out (common practice, as for the fast
// exponential depletion).
func domenicoPower(x, t float64, p Params, h History) float64 {
	emit := math.Max(t-p.R*x/p.V, 0)
	long := domenicoLongitudinal(x, t, p)
	if h.finite() {
		emit = math.Min(emit, h.Duration)
		if t > h.Duration {
			long = domenicoLongitudinalDiff(x, t, t-h.Duration, p)
		}
	}
	return h.powerFraction(emit) * long
}

// domenicoDepleting is the longitudinal factor for the source C0 exp(-g s)
// that never stops (see DomenicoAt).
func domenicoDepleting(x, t float64, p Params, g float64) float64 {
	switch {
	case !(t > 0):
		return 0
	case g == 0:
		return domenicoLongitudinal(x, t, p)
	case g <= p.Mu:
		q := p
		q.Mu -= g
		return math.Exp(-g*t) * domenicoLongitudinal(x, t, q)
	}
	lag := t - p.R*x/p.V
	return math.Exp(-g*math.Max(lag, 0)) * domenicoLongitudinal(x, t, p)
}

// domenicoPulse is the longitudinal factor at t for a source that stopped
// at t - t0 = Duration: L(t) - exp(-g Duration) L(t0), L that of the
// continuing source.
func domenicoPulse(x, t, t0 float64, p Params, g float64) float64 {
	lagT := p.R * x / p.V
	switch {
	case g <= p.Mu:
		// exp(-g t) [L'(t) - L'(t0)], L' with the decay rate Mu - g.
		q := p
		q.Mu -= g
		return math.Exp(-g*t) * domenicoLongitudinalDiff(x, t, t0, q)
	case t0 >= lagT:
		// Both emitted while depleting: exp(-g (t - R x/V)) [L(t) - L(t0)].
		return math.Exp(-g*(t-lagT)) * domenicoLongitudinalDiff(x, t, t0, p)
	}
	return domenicoDepleting(x, t, p, g) - math.Exp(-g*(t-t0))*domenicoDepleting(x, t0, p, g)
}

// domenicoLongitudinalDiff returns domenicoLongitudinal(x, t, p) -
// domenicoLongitudinal(x, t0, p) for t > t0 > 0, that is
// 1/2 exp(a1) [erfc(b1(t)) - erfc(b1(t0))] with b1 falling in time,
// without forming the two terms.
func domenicoLongitudinalDiff(x, t, t0 float64, p Params) float64 {
	if x == 0 || !(t0 > 0) {
		if x == 0 {
			return 0
		}
		return domenicoLongitudinal(x, t, p)
	}
	d, r, v, mu := p.Dx, p.R, p.V, p.Mu
	w := math.Sqrt(v*v + 4*d*r*mu)
	a1 := -2 * r * mu * x / (v + w)
	s, s0 := 2*math.Sqrt(d*r*t), 2*math.Sqrt(d*r*t0)
	z1, z2 := (r*x-w*t)/s, (r*x-w*t0)/s0
	switch {
	case z1 < 0 && z2 > 0:
		return 0.5 * math.Exp(a1) * (math.Erf(z2) + math.Erf(-z1))
	case z2 <= 0:
		// erfc(z1) - erfc(z2) = erfc(-z2) - erfc(-z1), both below 1.
		return 0.5 * math.Exp(a1-z2*z2) * erfcxDiff(-z2, -z1)
	}
	// exp(a1 - z1^2) = exp(-q^2 - mu t), q = (Rx - Vt)/(2 sqrt(DRt)).
	q := (r*x - v*t) / s
	return 0.5 * math.Exp(-q*q-mu*t) * erfcxDiff(z1, z2)
}

// erfcxDiff returns exp(p1^2) [erfc(p1) - erfc(p2)] for 0 <= p1 < p2:
// erfcx(p1) - exp(p1^2 - p2^2) erfcx(p2) where that keeps at least half of
// erfcx(p1), and otherwise, where the two are close, the integral
// (2/sqrt(pi)) int_0^(p2-p1) exp(-w (2 p1 + w)) dw by the 8-point
// Gauss-Legendre rule (there w (2 p1 + w) <= ln 2 over the interval, and
// the rule is exact to rounding).
func erfcxDiff(p1, p2 float64) float64 {
	d := p2 - p1
	e := Erfcx(p1)
	r := math.Exp(-d*(p2+p1)) * Erfcx(p2)
	if r <= 0.5*e {
		return e - r
	}
	h := d / 2
	var sum float64
	for i, xi := range glNodes {
		w := h + h*xi
		sum += glWeights[i] * math.Exp(-w*(2*p1+w))
	}
	return 2 * invSqrtPi * sum * h
}

// domenicoLongitudinal is the longitudinal factor 1/2 exp(a1) erfc(b1).
func domenicoLongitudinal(x, t float64, p Params) float64 {
	if x == 0 {
		return 1
	}
	d, r, v, mu := p.Dx, p.R, p.V, p.Mu
	w := math.Sqrt(v*v + 4*d*r*mu)
	a1 := -2 * r * mu * x / (v + w)
	if math.IsInf(t, 1) {
		return math.Exp(a1)
	}
	s := 2 * math.Sqrt(d*r*t)
	b1 := (r*x - w*t) / s
	if b1 < 26 {
		return 0.5 * math.Exp(a1) * math.Erfc(b1)
	}
	q := (r*x - v*t) / s
	return 0.5 * math.Exp(-q*q-mu*t) * Erfcx(b1)
}

// domenicoLateral is the product of the transverse and vertical factors,
// evaluated at the travel distance.
func domenicoLateral(pt Point, p Params, s Source) float64 {
	x := pt.X
	top, bot := math.Max(pt.Top, 0), math.Max(pt.Bottom, 0)
	if bot < top {
		top, bot = bot, top
	}
	cy, cz := math.Inf(1), math.Inf(1)
	if x > 0 {
		// 1/(2 sqrt(ai x)) with ai = Di/V.
		cy = 1 / (2 * math.Sqrt(p.Dy/p.V*x))
		cz = 1 / (2 * math.Sqrt(p.Dz/p.V*x))
	}
	return strip(math.Abs(pt.Y), s.Width/2, cy) * stripAverage(top, bot, s.Depth, cz)
}

// DomenicoDeviation returns (Domenico - Exact)/Exact at a point: the
// relative error of the approximation there. Where the exact value is below
// 1e-300 of the source (both are then negligible) it returns 0 if the
// approximation is negligible too and 1 otherwise, so the result is always
// finite.
func DomenicoDeviation(x, y, z, t float64, p Params, s Source) float64 {
	return relativeDeviation(Domenico(x, y, z, t, p, s), Exact3D(x, y, z, t, p, s))
}

// relativeDeviation returns (approx - exact)/exact, finite for all inputs.
func relativeDeviation(approx, exact float64) float64 {
	if exact < 1e-300 {
		if approx < 1e-300 {
			return 0
		}
		return 1
	}
	return (approx - exact) / exact
}

// RelativeDeviation returns (approx - exact)/exact with the conventions of
// DomenicoDeviation, for callers that already hold both values.
func RelativeDeviation(approx, exact float64) float64 { return relativeDeviation(approx, exact) }
