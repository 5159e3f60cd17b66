package analytic

import "math"

// historyRelTol is the relative accuracy asked of the time integral of
// the 1D column's pulse response against a source history, well below that
// of the 3D integral: the 1D kernel is cheap and the value is used where
// the closed forms would cancel.
const historyRelTol = 1e-12

// historyCancel is the share of a step response below which the
// difference F(t) - F(t - Duration) is not formed in float64: it would
// lose more than five digits, and the time integral over the ages the
// source was active (the pulse form) is taken instead.
const historyCancel = 1e-5

// OgataBanksAt is the 1D column for a source history h and either inlet
// type (see OgataBanks and OgataBanksFlux): the source concentration is
// C0 exp(-h.Depletion s) while it is active, 0 <= s <= h.Duration, and 0
// after; or, with h.Rate > 0, that of a source depleting by its mass
// (History.Fraction), which always takes the pulse form below.
//
// By superposition the value is exp(-g t) [F(t) - F(t - Duration)], with F
// the constant-source solution for the effective decay rate Mu - g (the
// substitution C = exp(-g t) C' turns the one problem into the other; the
// second term is absent while t <= Duration). These closed forms are used
// while Mu - g keeps w = sqrt(V^2 + 4DR(Mu - g)) comfortably real and the
// difference keeps at least historyCancel of F(t). Elsewhere (long after
// the pulse, where the two step responses nearly cancel, or for a source
// depleting much faster than the plume decays) the value is the time
// integral of the column's response to a pulse at the inlet over the ages
// the source was active, weighted by the depletion, which never subtracts
// nearly equal values (the concentration-inlet kernel of Exact3DAt, or for
// the flux inlet the time derivative of the no-decay third-type solution,
// van Genuchten & Alves 1982), to a relative accuracy of historyRelTol.
func OgataBanksAt(x, t float64, p Params, inlet Inlet, h History) float64 {
	if x < 0 || !(t > 0) || math.IsNaN(x) {
		return 0
	}
	h = h.normalized()
	g := h.Depletion
	if math.IsInf(t, 1) && h.fades() {
		return 0
	}
	if g == 0 && !h.finite() && !h.power() {
		if inlet == ThirdType {
			return OgataBanksFlux(x, t, p)
		}
		return OgataBanks(x, t, p)
	}
	// The substitution holds for any effective rate Mu - g whose
	// w = sqrt(V^2 + 4 D R (Mu - g)) stays real; keep a margin so that w
	// does not lose digits.
	if !h.power() && (g == 0 || p.V*p.V+4*p.Dx*p.R*(p.Mu-g) > 0.01*p.V*p.V) {
		if c, ok := columnHistoryClosed(x, t, p, inlet, h); ok {
			return clamp01(c)
		}
	}
	if inlet == ThirdType && x == 0 {
		// The flux-pulse kernel is written relative to the first-type one,
		// which vanishes at the inlet. There the resident concentration of
		// the flux inlet is integral_0^inf exp(-s) C1(s D/V, t) ds, C1 the
		// first-type solution for the same history (the transform under
		// which V C - D dC/dx at x = 0 equals V C1(0, t); see fluxIntegral).
		c1 := func(xx float64) float64 { return OgataBanksAt(xx, t, p, FirstType, h) }
		return clamp01(fluxIntegral(0, t, p, c1, false, 10*historyRelTol))
	}
	inf := math.Inf(1)
	return clamp01(exact3DKernel(Point{X: x}, t, p, Source{Width: inf, Depth: inf}, h, historyRelTol, inlet == ThirdType))
}

// columnHistoryClosed returns exp(-g t) [F(t) - F(t - Duration)] by the
// closed forms, and false where a closed form or the difference would lose
// digits (see OgataBanksAt).
func columnHistoryClosed(x, t float64, p Params, inlet Inlet, h History) (float64, bool) {
	g := h.Depletion
	shift := -g * t
	// step is exp(-g t) F(tt), F the constant-source solution with decay
	// Mu - g.
	step := func(tt float64) (float64, bool) {
		if inlet == ThirdType {
			return ogataBanksFlux(x, tt, p.Dx, p.R, p.V, p.Mu-g, shift)
		}
		return ogataBanks(x, tt, p.Dx, p.R, p.V, p.Mu-g, shift), true
	}
	c, ok := step(t)
	if !ok || !h.finite() || t <= h.Duration {
		return c, ok
	}
	c2, ok := step(t - h.Duration)
	if !ok || !(c-c2 >= historyCancel*c) {
		return 0, false
	}
	return c - c2, true
}
