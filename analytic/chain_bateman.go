package analytic

import (
	"fmt"
	"math"
)

// Bateman writes into out the concentrations at age tau of a decay chain
// without transport, started from the concentrations c0 at age 0 (Bateman
// 1910, Proc. Cambridge Philos. Soc. 15:423-427, with yields and several
// parents): the solution of dC_i/dtau = -Mu_i C_i + sum_p y_p (R_p/R_i) Mu_p C_p.
//
// With equal retardation it is what a parcel of water released at the source
// carries after a travel time tau, so it is the chain solution without
// dispersion (tau = R x / V) and the factor that turns a single-compound
// instantaneous release (a puff, whose mass all has the same age) into a
// chain. Each term is a divided difference of exp(-Mu tau) over the rates on
// a decay path, evaluated without cancellation for equal or nearly equal
// rates (see expDivDiff); the values are finite and non-negative for every
// valid chain and finite tau >= 0.
func (c Chain) Bateman(tau float64, c0, out []float64) error {
	if err := c.Validate(); err != nil {
		return err
	}
	if err := c.checkSources(c0, out); err != nil {
		return err
	}
	if !(tau >= 0) || math.IsInf(tau, 1) {
		return fmt.Errorf("%w: age must be finite and >= 0, got %g", ErrInvalid, tau)
	}
	var ps [MaxCompounds]chainPath
	var rs [MaxCompounds]float64
	for i := range c {
		out[i] = 0
		for _, p := range c.paths(i, c0, ps[:0]) {
			out[i] += p.weight * batemanFactor(p.rates(c, rs[:0]), tau, 0, 0)
		}
	}
	return nil
}

// batemanFactor returns exp(shift*tau + extra) (-1)^m g[rates] with g(k) =
// exp(-k tau) (m+1 the number of rates): the contribution of a unit amount
// of the first compound of a decay path to the last, per unit product of
// the production coefficients along it, times a factor the caller needs
// (exp(shift tau) removes a common decay, exp(extra) adds a history
// weight) folded in without leaving the float64 range on the way. In terms
// of the dimensionless a_k = k tau,
//
//	(-1)^m g[rates] = tau^m E[a],  E[a] = (-1)^m e[a_0..a_m],  e(z) = exp(-z),
//
// E is positive and at most exp(-min a)/m!.
func batemanFactor(rates []float64, tau, shift, extra float64) float64 {
	m := len(rates) - 1
	if m == 0 {
		return math.Exp(-(rates[0]-shift)*tau + extra)
	}
	var a [MaxCompounds]float64
	lo := math.Inf(1)
	for k, r := range rates {
		a[k] = r * tau
		lo = math.Min(lo, a[k])
	}
	e := expDivDiff(a[:m+1], lo)
	// tau^m exp(shift tau - lo) folded in last, in logarithms when the
	// parts would leave the float64 range.
	x := shift*tau + extra - lo
	lpm := float64(m) * math.Log(tau)
	if lpm < 600 && x > -700 && x < 700 {
		return math.Pow(tau, float64(m)) * e * math.Exp(x)
	}
	if e == 0 {
		return 0
	}
	return math.Exp(lpm + logSub(e) + x)
}

// expDivDiff returns E = exp(lo) (-1)^m e[a_0..a_m] for e(z) = exp(-z),
// the points a_k >= lo (lo their minimum), without cancellation where
// points are close: the points are sorted, and the divided difference of a
// span of them is taken from the Newton recurrence where its two end
// points differ by more than 1 (the two differences subtracted then differ
// by a factor bounded away from 1, since e is completely monotone) and
// from the Taylor series about the middle of the span otherwise,
//
//	(-1)^q e[c+d_0..c+d_q] = exp(-c) sum_k (-1)^k h_k(d_0..d_q) / (k+q)!,
//
// with h_k the complete homogeneous symmetric polynomials and |d| <= 1/2,
// whose terms fall at least like 1/(2^k k! q!). Spans are computed from
// the whole set down, each once, so a set within a span of 1 costs one
// series.
func expDivDiff(a []float64, lo float64) float64 {
	var t expTable
	m := len(a) - 1
	for k := range a {
		t.s[k] = a[k] - lo
	}
	sortFloats(t.s[:m+1])
	return t.span(0, m)
}

// expTable memoises the spans of expDivDiff.
type expTable struct {
	s    [MaxCompounds]float64
	memo [MaxCompounds][MaxCompounds]float64
	done [MaxCompounds][MaxCompounds]bool
}

func (t *expTable) span(l, r int) float64 {
	if t.done[l][r] {
		return t.memo[l][r]
	}
	var v float64
	switch {
	case l == r:
		v = math.Exp(-t.s[l])
	case t.s[r]-t.s[l] > 1:
		v = (t.span(l, r-1) - t.span(l+1, r)) / (t.s[r] - t.s[l])
	default:
		v = expDivDiffTaylor(t.s[l:r+1], r-l)
	}
	t.memo[l][r], t.done[l][r] = v, true
	return v
}

// expDivDiffTaylor is (-1)^q e[pts] for points within a span of at most 1.
func expDivDiffTaylor(pts []float64, q int) float64 {
	lo, hi := pts[0], pts[len(pts)-1]
	c := (lo + hi) / 2
	// 1/q!.
	f := 1.0
	for j := 2; j <= q; j++ {
		f /= float64(j)
	}
	half := (hi - lo) / 2
	if half == 0 {
		return math.Exp(-c) * f
	}
	// |d| <= half <= 1/2 bounds term k by half^k/(k! q!); stop below 1e-18
	// of the first (the sum is at least exp(-half)/q!).
	kmax := 1
	for b := half; b > 1e-18 && kmax < 20; kmax++ {
		b *= half / float64(kmax+1)
	}
	var h [21]float64
	h[0] = 1
	for _, p := range pts {
		dd := p - c
		for k := 1; k <= kmax; k++ {
			h[k] += dd * h[k-1]
		}
	}
	sum, sign := 0.0, 1.0
	for k := 0; k <= kmax; k++ {
		if k > 0 {
			f /= float64(k + q)
		}
		sum += sign * h[k] * f
		sign = -sign
	}
	return math.Exp(-c) * sum
}
