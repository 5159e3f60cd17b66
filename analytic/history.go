package analytic

import "math"

// OgataBanksAt is the 1D column for a source history h and either inlet
// type (see OgataBanks and OgataBanksFlux).
//
// First-type inlet: a constant source is OgataBanks; a depleting source with
// h.Depletion <= Mu is exp(-g t) times OgataBanks with Mu - g (exact: the
// substitution C = exp(-g t) C' turns one problem into the other); every
// other history is the time integral of Exact3DAt with an infinite source
// (relative accuracy 1e-6), which integrates the kernel over the ages the
// source was active and so never subtracts nearly equal values.
//
// Third-type inlet: superposition of OgataBanksFlux, C(t) - C(t - Duration),
// and for a depleting source the same substitution as above where
// h.Depletion <= Mu, otherwise the identity
// C_flux(x, t) = integral_0^inf exp(-s) C_conc(x + s D/V, t) ds over the
// first-type solution for the same history.
func OgataBanksAt(x, t float64, p Params, inlet Inlet, h History) float64 {
	if x < 0 || !(t > 0) || math.IsNaN(x) {
		return 0
	}
	g := h.Depletion
	if math.IsInf(t, 1) && (g > 0 || h.finite()) {
		return 0
	}
	if inlet == ThirdType {
		if g > p.Mu {
			c1 := func(xx float64) float64 { return OgataBanksAt(xx, t, p, FirstType, h) }
			return clamp01(fluxIntegral(x, t, p, c1, false))
		}
		one := func(tt float64) float64 {
			if !(tt > 0) {
				return 0
			}
			if g == 0 {
				return OgataBanksFlux(x, tt, p)
			}
			q := p
			q.Mu -= g
			return math.Exp(-g*tt) * OgataBanksFlux(x, tt, q)
		}
		c := one(t)
		if h.finite() && t > h.Duration {
			c -= one(t - h.Duration)
		}
		return clamp01(c)
	}
	if h.finite() || g > p.Mu {
		inf := math.Inf(1)
		return Exact3DAt(Point{X: x}, t, p, Source{Width: inf, Depth: inf}, h)
	}
	if g == 0 {
		return OgataBanks(x, t, p)
	}
	q := p
	q.Mu -= g
	return clamp01(math.Exp(-g*t) * OgataBanks(x, t, q))
}
