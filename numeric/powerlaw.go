package numeric

import "math"

// Power-law depletion of the source by its mass (Falta, Rao & Basu 2005,
// J. Contam. Hydrol. 78:259-280).
//
// The source holds a dissolvable mass M (initially M0); the water flowing
// through its face, Q (volume per time), carries away Q Cs, and the source
// concentration follows the mass as Cs/C0 = (M/M0)^Gamma. With m = M/M0
// and the depletion rate k = Q C0/M0 (1/T, History.Rate) the mass balance
// dM/dt = -Q Cs is dm/dt = -k m^Gamma, m(0) = 1, whose solution is
//
//	Gamma = 1:  m = exp(-k t),                         Cs/C0 = exp(-k t)
//	Gamma != 1: m = u^(1/(1-Gamma)), u = 1 - (1-Gamma) k t,
//	            Cs/C0 = u^(Gamma/(1-Gamma))            while u > 0.
//
// For Gamma < 1 the mass is gone at t = 1/((1-Gamma) k) and Cs = 0 after
// it (Gamma = 0: a constant source of duration M0/(Q C0) = 1/k); for
// Gamma > 1 the source declines like t^(-Gamma/(Gamma-1)) and is never
// exhausted. The mass released over a step equals the mass the source lost,
// so the mean source concentration over [t0, t1] is exactly
// (m(t0) - m(t1))/(k (t1 - t0)), which the solvers apply at the inlet (the
// same rule as the exponential Depletion, of which Gamma = 1 is the case
// Rate = Depletion).

// MaxExponent is the largest power-law exponent (History.Exponent)
// accepted. The mass balance holds for any Gamma >= 0; Falta, Rao & Basu
// (2005) discuss values from about 0.5 to 2 for field sites (from memory),
// and the bound keeps the powers far from overflow.
const MaxExponent = 10

// validatePower checks Rate and Exponent of h (field is the History's
// path).
func (h History) validatePower(field string) error {
	if err := checkNonNegative(field+".Rate", h.Rate); err != nil {
		return err
	}
	if !(h.Exponent >= 0 && h.Exponent <= MaxExponent) {
		return invalid(field+".Exponent", "must be in [0, %d] (the power-law exponent Gamma; 1: exponential), got %g", MaxExponent, h.Exponent)
	}
	if h.Rate > 0 && h.Depletion > 0 {
		return invalid(field+".Rate", "give either Depletion (decline at a fixed rate) or Rate and Exponent (depletion by mass), not both")
	}
	return nil
}

// exhausted is the time at which a power-law source with Exponent < 1 has
// lost all its mass, 1/((1-Gamma) k); +Inf otherwise.
func (h History) exhausted() float64 {
	if h.Rate > 0 && h.Exponent < 1 {
		return 1 / ((1 - h.Exponent) * h.Rate)
	}
	return math.Inf(1)
}

// massFraction is M/M0 at time t of the power-law source (Rate > 0), in
// [0, 1].
func (h History) massFraction(t float64) float64 {
	g, k := h.Exponent, h.Rate
	if g == 1 {
		return math.Exp(-k * t)
	}
	if t >= h.exhausted() {
		return 0
	}
	return math.Exp(math.Log1p(-(1-g)*k*t) / (1 - g))
}

// powerValue is Cs/C0 at time t of the power-law source (Rate > 0).
func (h History) powerValue(t float64) float64 {
	g, k := h.Exponent, h.Rate
	switch {
	case g == 1:
		return math.Exp(-k * t)
	case t >= h.exhausted():
		return 0
	case g == 0:
		return 1
	}
	return math.Exp(g / (1 - g) * math.Log1p(-(1-g)*k*t))
}

// powerMean is the mean of Cs/C0 over the step [t0, t1] of the power-law
// source (Rate > 0): the mass lost over the step, (m(t0) - m(t1))/(k dt),
// computed without cancellation (log1p, expm1). The step does not straddle
// the exhaustion time (a break of the time stepping).
func (h History) powerMean(t0, t1 float64) float64 {
	g, k := h.Exponent, h.Rate
	dt := t1 - t0
	if g == 1 {
		// As the exponential Depletion (History.mean).
		if k*dt < 1e-8 {
			return math.Exp(-k * 0.5 * (t0 + t1))
		}
		return math.Exp(-k*t0) * -math.Expm1(-k*dt) / (k * dt)
	}
	if t0 >= h.exhausted() {
		return 0
	}
	if g == 0 {
		return 1
	}
	if !(k*dt > 1e-300) {
		return h.powerValue(0.5 * (t0 + t1))
	}
	a := (1 - g) * k
	u0 := 1 - a*t0
	m0 := math.Exp(math.Log1p(-a*t0) / (1 - g))
	x := -a * dt / u0 // u1/u0 - 1
	if x <= -1 {
		return m0 / (k * dt) // exhausted within the step: all the rest leaves
	}
	return -m0 * math.Expm1(math.Log1p(x)/(1-g)) / (k * dt)
}

// powerBelow is the time at which Cs/C0 of the power-law source falls
// below exp(-e) (+Inf when it overflows); for Exponent < 1 at most the
// exhaustion time.
func (h History) powerBelow(e float64) float64 {
	g, k := h.Exponent, h.Rate
	switch {
	case g == 1:
		return e / k
	case g < 1:
		return h.exhausted()
	}
	// u^(-g/(g-1)) < exp(-e)  <=>  u > exp(e (g-1)/g), u = 1 + (g-1) k t.
	return math.Expm1(e*(g-1)/g) / ((g - 1) * k)
}
