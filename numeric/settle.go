package numeric

import "math"

// How long to march. For a source that is constant from t = 0 on, the
// field approaches its steady state, and for one that stops or depletes it
// approaches 0; past some time, time stepping changes nothing that float64
// can show, and its cost grows without bound with the requested time (an
// output time of 1e20 d would take some 1e19 steps). Output times past
// that time are answered with the limit directly: the steady state solved
// by solveSteady, or 0.
//
// The time is estimated from the decay rate of the difference w = C - Css
// between the field and its limit. w solves the homogeneous equation with
// homogeneous boundary conditions (the inlet value or flux fixed, no flux
// across, free outflow). With w = exp(V x/(2D)) u the advection term drops
// out, u obeys R du/dt = D u'' + Dy u_yy + Dz u_zz - (V^2/(4D) + R Mu) u,
// and the boundary terms of the energy -(V/2) u^2 at the inlet (flux
// inlet) and at the free outflow face are <= 0, so every mode of u decays
// at least as fast as exp(-lambda t) with lambda = V^2/(4 D R) + Mu (the
// standard Liouville transformation of the advection-dispersion operator).
// Back in C the factor exp(V x/(2D)) <= exp(V L/(2D)) on a domain of
// length L; relative to the steady value, which falls off like
// exp(-(U - V) x/(2D)) with U = sqrt(V^2 + 4 Mu R D), the amplitude is at
// most exp(U L/(2D)). Hence the relative difference is below exp(-k) after
//
//	t_k = (U L/(2D) + k)/lambda + sum over the directions across of
//	      L_i sqrt(R/(lambda D_i)),
//
// where the last terms cover the far corners of the domain across flow,
// whose steady value is made of the longest travel times (the steady value
// at distance y across is dominated by travel times near
// y sqrt(R/(4 D_y lambda)), and its tail beyond t is below
// exp(-lambda t + y sqrt(lambda R/D_y)) of it). Checked against the exact
// solution of the 1D column (Ogata & Banks 1961): without decay, at t_36 =
// 2 R L/V + 144 D R/V^2 the erfc argument (V t - R L)/(2 sqrt(D R t)) is at
// least 6 at every x <= L whatever V L/D, so the step response is within
// erfc(6) = 2.2e-17 of the steady state (TestSettleTimeOgataBanks checks
// it, with decay too, against analytic.OgataBanks).
// The numeric dispersion of the scheme, at most V h/2 on a cell of size h,
// is added to D, which only makes lambda smaller and t_k longer, and
// TestSettleTimeStationary checks on the solver itself that the field at
// t_36 no longer changes.

const (
	// settleEFolds is k for the steady state of a constant source: a
	// relative difference below exp(-36) = 2.3e-16, the float64 epsilon.
	settleEFolds = 36
	// zeroEFolds is k for the limit 0 of a source that stops or depletes:
	// exp(-760) = 1e-330 is below the smallest positive float64 (4.9e-324)
	// by a factor of more than 1e6, so 0 is the float64 value.
	zeroEFolds = 760
)

// across is the extent and dispersion coefficient of a direction across
// flow.
type across struct{ l, d float64 }

// settleTime is t_k for flow V, dispersion D (including the scheme's), R,
// Mu, domain length L along flow and the directions across.
func settleTime(v, d, r, mu, l float64, acr []across, k float64) float64 {
	lambda := v*v/(4*d*r) + mu
	u := math.Sqrt(v*v + 4*mu*r*d)
	t := (u*l/(2*d) + k) / lambda
	for _, a := range acr {
		t += a.l * math.Sqrt(r/(lambda*a.d))
	}
	if !(t >= 0) {
		return math.Inf(1) // overflow (Inf/Inf): never settle, march within the work budget
	}
	return t
}

// settledFrom is the time from which the output times are answered with
// the long-time limit of source history h (see settleTime): the steady
// state of a constant source after t_36; 0 after the source stopped for
// t_760, or after t_760 + 760/Depletion for a depleting source (the
// emissions of the last t_760 are below exp(-760) of the first), or after
// t_760 plus the time a power-law source takes to fall below exp(-760).
func settledFrom(h History, tk func(k float64) float64) float64 {
	off := h.switchOff()
	if !h.fades() {
		return tk(settleEFolds)
	}
	t := off + tk(zeroEFolds)
	if h.Depletion > 0 {
		t = math.Min(t, tk(zeroEFolds)+zeroEFolds/h.Depletion)
	}
	if h.Rate > 0 {
		// Power law: the source is below exp(-760) after powerBelow (which
		// overflows to +Inf for large exponents: then only the stop, if
		// any, settles it).
		t = math.Min(t, tk(zeroEFolds)+h.powerBelow(zeroEFolds))
	}
	return t
}
