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
// is averaged over [pt.Top, pt.Bottom]) and a source history: a finite
// duration by superposition, C(t) - C(t - Duration); a depleting source
// exp(-g t) by the same substitution that is exact for the longitudinal
// factor, Mu -> Mu - g with the factor exp(-g t), where Mu >= g; where the
// source depletes faster than the plume decays (g > Mu) the source
// concentration at the time of emission, exp(-g (t - R x/V)), multiplies the
// non-depleting value (common practice).
func DomenicoAt(pt Point, t float64, p Params, s Source, h History) float64 {
	x := pt.X
	if x < 0 || !(t > 0) || math.IsNaN(x) || math.IsNaN(pt.Y) {
		return 0
	}
	g := h.Depletion
	if math.IsInf(t, 1) && (g > 0 || h.finite()) {
		return 0
	}
	lateral := domenicoLateral(pt, p, s)
	if lateral == 0 {
		return 0
	}
	long := func(tt float64) float64 {
		if !(tt > 0) {
			return 0
		}
		if g == 0 {
			return domenicoLongitudinal(x, tt, p)
		}
		if g <= p.Mu {
			q := p
			q.Mu -= g
			return math.Exp(-g*tt) * domenicoLongitudinal(x, tt, q)
		}
		lag := tt - p.R*x/p.V
		return math.Exp(-g*math.Max(lag, 0)) * domenicoLongitudinal(x, tt, p)
	}
	c := long(t)
	if h.finite() && t > h.Duration {
		c -= long(t - h.Duration)
	}
	return clamp01(c * lateral)
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
