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
// and for a depleting source the same substitution as above while the
// effective rate Mu - g keeps w = sqrt(V^2 + 4DR(Mu - g)) real. Where these
// closed forms do not apply (or would subtract nearly equal values), the
// time integral of the column's response to a pulse of solute flux against
// the history, in the same variable and with the same error control as
// Exact3DAt (relative accuracy 1e-6).
func OgataBanksAt(x, t float64, p Params, inlet Inlet, h History) float64 {
	if x < 0 || !(t > 0) || math.IsNaN(x) {
		return 0
	}
	g := h.Depletion
	if math.IsInf(t, 1) && (g > 0 || h.finite()) {
		return 0
	}
	if g == 0 && !h.finite() {
		if inlet == ThirdType {
			return OgataBanksFlux(x, t, p)
		}
		return OgataBanks(x, t, p)
	}
	// The substitution C = exp(-g t) C' holds for any effective rate
	// Mu - g whose w = sqrt(V^2 + 4 D R (Mu - g)) stays real; keep a margin
	// so that w does not lose digits.
	closed := g == 0 || p.V*p.V+4*p.Dx*p.R*(p.Mu-g) > 0.01*p.V*p.V
	one := func(tt float64) (float64, bool) {
		if !(tt > 0) {
			return 0, true
		}
		shift := 0.0
		if g > 0 {
			shift = -g * tt
		}
		if inlet == ThirdType {
			return ogataBanksFlux(x, tt, p.Dx, p.R, p.V, p.Mu-g, shift)
		}
		return ogataBanks(x, tt, p.Dx, p.R, p.V, p.Mu-g, shift), true
	}
	if closed {
		c, ok := one(t)
		if ok && h.finite() && t > h.Duration {
			var c2 float64
			c2, ok = one(t - h.Duration)
			// A difference of nearly equal values is left to the quadrature.
			if ok && c-c2 < 1e-6*c {
				ok = inlet == ThirdType && c-c2 >= 0
			}
			c -= c2
		}
		if ok {
			return clamp01(c)
		}
	}
	inf := math.Inf(1)
	if inlet == ThirdType {
		return clamp01(exact3DKernel(Point{X: x}, t, p, Source{Width: inf, Depth: inf}, h, exactRelTol, true))
	}
	return Exact3DAt(Point{X: x}, t, p, Source{Width: inf, Depth: inf}, h)
}
