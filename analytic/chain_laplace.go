package analytic

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// The 1D column with a decay chain and any retardation factors, by its
// Laplace transform in time.
//
// Multiplying the chain equations (see chain.go) by R_i and transforming
// t -> s (zero initial concentrations) gives, for the vector of transforms
// c(x, s),
//
//	D c'' - V c' - S(s) c = 0,  S = diag(R_i (s + Mu_i)) - Y,  Y_dp = y_p R_p Mu_p,
//
// a system with constant coefficients whose bounded solution is
// c = exp(Lambda(S) x) b with the matrix function Lambda(sigma) =
// (V - sqrt(V^2 + 4 D sigma)) / (2D). The inlet fixes b: b = c0 hbar(s) for
// a concentration (first-type) inlet, and V b - D Lambda(S) b = V c0
// hbar(s) for a flux (third-type) inlet, with hbar the transform of the
// source history (1/s constant, 1/(s+g) depleting). So c = G(S) c0 hbar with
//
//	G(sigma) = exp(x (V - q)/(2D)),                first-type,
//	G(sigma) = 2V/(V + q) exp(x (V - q)/(2D)),     third-type,   q = sqrt(V^2 + 4 D sigma),
//
// and, S being triangular with each compound on one decay path to each
// descendant, G(S)_ij = (-1)^m prod(y R Mu over the path) G[sigma_j..sigma_i]:
// divided differences of G over the sigma of the path, evaluated by
// ddSet (exact where sigma repeat, as for equal rates and equal R; no
// cancellation where they nearly do). The steady state is G(S(0)) c0
// (lim s c(s)); times are inverted numerically (see talbotInvert).

// chainLaplace is the Laplace-domain solution of one column problem.
type chainLaplace struct {
	c     Chain
	x     float64
	v, d  float64
	flux  bool
	paths [][]chainPath // per compound
	wts   [][]float64   // per path: its weight times prod R along it, times (-1)^m
	set   ddSet
	sig   [MaxCompounds]complex128
	g     laplaceG
}

func newChainLaplace(c Chain, c0 []float64, x float64, p Params, inlet Inlet) *chainLaplace {
	lc := &chainLaplace{c: c, x: x, v: p.V, d: p.Dx, flux: inlet == ThirdType}
	lc.g = laplaceG{x: x, v: p.V, d: p.Dx, flux: lc.flux}
	lc.paths = make([][]chainPath, len(c))
	lc.wts = make([][]float64, len(c))
	for i := range c {
		lc.paths[i] = c.paths(i, c0, nil)
		for _, pa := range lc.paths[i] {
			w := pa.weight
			for k := 1; k < pa.n; k++ {
				w *= c[pa.nodes[k]].R
			}
			if pa.n%2 == 0 {
				w = -w
			}
			lc.wts[i] = append(lc.wts[i], w)
		}
	}
	return lc
}

// eval writes G(S(s)) c0 (without the history factor) into out.
func (lc *chainLaplace) eval(s complex128, out []complex128) {
	n := len(lc.c)
	for i, k := range lc.c {
		lc.sig[i] = complex(k.R, 0) * (s + complex(k.Mu, 0))
	}
	lc.set.reset(&lc.g, lc.sig[:n])
	var idx [MaxCompounds]int
	for i := range lc.c {
		var acc complex128
		for q, pa := range lc.paths[i] {
			for k := 0; k < pa.n; k++ {
				idx[k] = int(pa.nodes[k])
			}
			acc += complex(lc.wts[i][q], 0) * lc.set.divDiff(idx[:pa.n])
		}
		out[i] = acc
	}
}

// laplaceG is G(sigma) of the column (see above) as a ddFunc.
type laplaceG struct {
	x, v, d float64
	flux    bool
}

func (g *laplaceG) value(z complex128) complex128 {
	v := complex(g.v, 0)
	q := cmplx.Sqrt(v*v + complex(4*g.d, 0)*z)
	// x (V - q)/(2D) = -2 x z / (V + q), without cancellation.
	e := -complex(2*g.x, 0) * z / (v + q)
	r := cmplx.Exp(e)
	if g.flux {
		r *= 2 * v / (v + q)
	}
	return r
}

func (g *laplaceG) jet(c complex128, h float64, out []complex128) {
	n := len(out)
	v := complex(g.v, 0)
	a := v*v + complex(4*g.d, 0)*c
	root := cmplx.Sqrt(a)
	var q, e [ddMaxTerms]complex128
	seriesSqrtLinear(root, a, complex(4*g.d*h, 0), q[:n])
	e[0] = -complex(2*g.x, 0) * c / (v + root)
	for k := 1; k < n; k++ {
		e[k] = -complex(g.x/(2*g.d), 0) * q[k]
	}
	if !g.flux {
		seriesExp(e[:n], out)
		return
	}
	var ex, den, rec [ddMaxTerms]complex128
	seriesExp(e[:n], ex[:n])
	copy(den[:n], q[:n])
	den[0] += v
	seriesRecip(den[:n], rec[:n])
	for k := 0; k < n; k++ {
		rec[k] *= 2 * v
	}
	seriesMul(ex[:n], rec[:n], out)
}

// radius: the branch point of q at sigma = -V^2/(4D).
func (g *laplaceG) radius(c complex128) float64 {
	return cmplx.Abs(c + complex(g.v*g.v/(4*g.d), 0))
}

// scale: |d ln G/d sigma| = |x/q| (+ |2D/(q (V+q))| for the flux factor).
func (g *laplaceG) scale(z complex128) float64 {
	v := complex(g.v, 0)
	q := cmplx.Sqrt(v*v + complex(4*g.d, 0)*z)
	s := g.x / cmplx.Abs(q)
	if g.flux {
		s += 2 * g.d / cmplx.Abs(q*(v+q))
	}
	return s
}

// Talbot contour of Weideman (2006, SIAM J. Numer. Anal. 44:2342-2362),
// z(theta) = (N/t) (-sigma + mu theta cot(alpha theta) + i nu theta) on
// -pi < theta < pi, with the parameters optimised there for transforms
// whose singularities lie on the negative real axis (the trapezoidal rule
// then converges like exp(-1.36 N)). From memory of that paper; the tests
// check the inversion against mpmath.
const (
	talbotSigma = 0.6122
	talbotMu    = 0.5017
	talbotAlpha = 0.6407
	talbotNu    = 0.2645
)

// talbotInvert returns f(t) for the vector transform F (evaluated through
// eval into a buffer of n values) with an N-point trapezoidal rule on the
// contour (N even; the nodes come in conjugate pairs, so N/2 evaluations),
// and per value an estimate of the rounding error: eps times the sum of the
// magnitudes of the terms.
func talbotInvert(t float64, nodes, n int, eval func(s complex128, out []complex128), vals, errs []float64) {
	var buf [MaxCompounds]complex128
	var sum [MaxCompounds]float64
	var mag [MaxCompounds]float64
	lam := float64(nodes) / t
	for k := 0; k < nodes/2; k++ {
		th := float64(2*k+1) * math.Pi / float64(nodes)
		at := talbotAlpha * th
		cot := math.Cos(at) / math.Sin(at)
		z := complex(lam*(-talbotSigma+talbotMu*th*cot), lam*talbotNu*th)
		sn := math.Sin(at)
		dz := complex(lam*(talbotMu*cot-talbotMu*at/(sn*sn)), lam*talbotNu)
		eval(z, buf[:n])
		ez := cmplx.Exp(z*complex(t, 0)) * dz
		for i := 0; i < n; i++ {
			w := ez * buf[i]
			sum[i] += imag(w)
			mag[i] += cmplx.Abs(w)
		}
	}
	for i := 0; i < n; i++ {
		vals[i] = 2 * sum[i] / float64(nodes)
		if errs != nil {
			errs[i] = 2 * mag[i] / float64(nodes) * 1e-15
		}
	}
}

// ChainColumnLaplace writes into out the concentrations of the compounds of
// the chain c at distance x >= 0 and time t (+Inf: steady state) in a
// semi-infinite column, for source strengths c0 (the inlet value of each
// compound, in any one concentration unit) with the history h, by the
// Laplace-domain solution above: the steady state in closed form (G(S(0))
// c0, the divided differences at s = 0), times by numerical inversion on a
// Talbot contour. Any retardation factors; p.V and p.Dx are used, p.R and
// p.Mu are not (each compound has its own). A finite source duration is
// the continuous solution minus the one started Duration later; a
// depleting source has the transform 1/(s + Depletion).
//
// Accuracy: the inversion is in float64 and adapts the number of contour
// nodes (see invertAdaptive); errs, when not nil, receives per compound an
// estimate of the absolute error (the change between the last two node
// counts plus the rounding). It is about 1e-13 of the source for Peclet
// numbers V x/D up to about 1000 and grows beyond; where it exceeds 1e-6
// of the largest source strength the function returns ErrInversion
// (wrapped) with the values of the compounds concerned set to 0.
// ChainColumnAt uses the decoupled closed forms instead when the
// retardation factors are equal.
func ChainColumnLaplace(x, t float64, p Params, inlet Inlet, h History, c Chain, c0, out, errs []float64) error {
	return chainColumnLaplace(x, t, p, inlet, h, c, c0, out, errs)
}

// chainColumnLaplace is ChainColumnLaplace.
func chainColumnLaplace(x, t float64, p Params, inlet Inlet, h History, c Chain, c0, out, errs []float64) error {
	h, err := checkChainColumn(p, h, c, c0, out)
	if err != nil {
		return err
	}
	n := len(c)
	for i := 0; i < n; i++ {
		out[i] = 0
		if errs != nil {
			errs[i] = 0
		}
	}
	g := h.Depletion
	steady := math.IsInf(t, 1)
	if x < 0 || math.IsNaN(x) || !(t > 0) || (steady && (g > 0 || h.finite())) {
		return nil
	}
	if x == 0 && inlet == FirstType {
		chainAtFirstTypeInlet(t, h, c0, out[:n])
		return nil
	}
	lc := newChainLaplace(c, c0, x, p, inlet)
	if steady {
		var buf [MaxCompounds]complex128
		lc.eval(0, buf[:n])
		for i := 0; i < n; i++ {
			out[i] = math.Max(real(buf[i]), 0)
		}
		return nil
	}
	if !invertChainColumn(lc, t, h, c0, out[:n], errs) {
		return fmt.Errorf("%w at x = %g, t = %g (Peclet number V x/D = %.3g)", ErrInversion, x, t, p.V*x/p.Dx)
	}
	return nil
}

// checkChainColumn checks the inputs of chainColumnLaplace and returns
// the source history as the chain uses it.
func checkChainColumn(p Params, h History, c Chain, c0, out []float64) (History, error) {
	if err := c.Validate(); err != nil {
		return h, err
	}
	if err := c.checkSources(c0, out); err != nil {
		return h, err
	}
	if err := finitePositive("V", p.V); err != nil {
		return h, err
	}
	if err := finitePositive("Dx", p.Dx); err != nil {
		return h, err
	}
	return chainHistory(h)
}

// chainAtFirstTypeInlet is the chain at x = 0 with a first-type inlet: the
// source concentrations themselves while the source runs (depleted by
// exp(-g t)), 0 after it stopped.
func chainAtFirstTypeInlet(t float64, h History, c0, out []float64) {
	if h.finite() && t > h.Duration {
		return
	}
	f := 1.0
	if g := h.Depletion; g > 0 {
		f = math.Exp(-g * t)
	}
	for i := range out {
		out[i] = c0[i] * f
	}
}

// invertChainColumn inverts the chain's transform at time t for a source
// of history h: the step response depleted by exp(-g t), less the step
// started at the source's end for a finite source. It writes the values
// (clamped at 0) to out and the inversion's error estimates to errs
// (when not nil) and reports whether every estimate is within 1e-6 of
// the largest source concentration.
func invertChainColumn(lc *chainLaplace, t float64, h History, c0, out, errs []float64) bool {
	n, g := len(out), h.Depletion
	eval := func(s complex128, o []complex128) {
		lc.eval(s, o)
		hb := 1 / (s + complex(g, 0))
		for i := range o {
			o[i] *= hb
		}
	}
	var e1, v2, e2 [MaxCompounds]float64
	ref := 0.0
	for _, v := range c0 {
		ref = math.Max(ref, v)
	}
	invertAdaptive(t, ref, n, eval, out, e1[:n])
	if h.finite() && t > h.Duration {
		invertAdaptive(t-h.Duration, ref, n, eval, v2[:n], e2[:n])
		f := math.Exp(-g * h.Duration)
		for i := 0; i < n; i++ {
			out[i] -= v2[i] * f
			e1[i] += e2[i] * f
		}
	}
	ok := true
	for i := 0; i < n; i++ {
		out[i] = math.Max(out[i], 0)
		if errs != nil {
			errs[i] = e1[i]
		}
		if !(e1[i] <= 1e-6*ref) {
			ok = false
		}
	}
	return ok
}

// ErrInversion is returned where the numerical inversion of the Laplace
// transform did not reach an accuracy of 1e-6 of the largest source
// strength (Peclet numbers V x / D of several thousand near the front):
// the values of the compounds concerned are then 0 and their estimates
// +Inf or above that bound; another method (the finite-volume solver)
// must give the answer.
var ErrInversion = errors.New("analytic: the Laplace inversion did not converge")

// invertAdaptive inverts with a growing number of contour nodes (32, 48,
// 72, ... up to talbotMaxNodes) until two successive values agree to 1e-12
// relative (or below floor, absolute), and returns the values with the
// smallest error estimate seen: per value the difference of the last two
// plus the rounding estimate. More nodes resolve the sharp front of high
// Peclet numbers (the transform approaches the pure delay exp(-s R x/V))
// and, before the front arrives, keep the contour where dispersion rather
// than the delay dominates (where exp(z t) times the delay would grow);
// after it, they amplify rounding, so the search also stops once rounding
// has grown twice in a row while the best estimate is already below 1e-9
// of ref (the largest source strength). Values whose estimate exceeds 1e-3
// of ref (the inversion failed: Peclet numbers of several thousand before
// the front arrives) come back as 0 with an estimate of +Inf.
func invertAdaptive(t, ref float64, n int, eval func(s complex128, out []complex128), vals, errs []float64) {
	nodes := 32
	var prev, prnd, cur, crnd, est [MaxCompounds]float64
	talbotInvert(t, nodes, n, eval, prev[:n], prnd[:n])
	best := math.Inf(1)
	found := false
	lastRnd, grew := math.Inf(1), 0
	floor := 1e-15 * ref
	for nodes < talbotMaxNodes {
		next := nodes * 3 / 2
		next += next % 2
		talbotInvert(t, next, n, eval, cur[:n], crnd[:n])
		var score, rnd float64
		converged := true
		for i := 0; i < n; i++ {
			r := math.Max(crnd[i], prnd[i])
			d := math.Abs(cur[i] - prev[i])
			est[i] = d + r
			score = math.Max(score, est[i])
			rnd = math.Max(rnd, r)
			if !(d <= 1e-12*math.Abs(cur[i])+10*r+floor) {
				converged = false
			}
		}
		// Two values that agree only within a rounding error far above
		// the source strengths are not a result.
		if !(rnd <= 1e-6*ref) {
			converged = false
		}
		if !(score >= 0) {
			score = math.Inf(1) // NaN: an overflow in the transform
		}
		if score < best || (converged && !found) {
			best, found = score, true
			copy(vals, cur[:n])
			copy(errs, est[:n])
		}
		if rnd > lastRnd {
			grew++
		} else {
			grew = 0
		}
		lastRnd = rnd
		if converged || (grew >= 2 && best < 1e-9*ref) {
			break
		}
		prev, prnd, nodes = cur, crnd, next
	}
	for i := 0; i < n; i++ {
		if !found || !(errs[i] <= 1e-3*ref) || math.IsNaN(vals[i]) || math.IsInf(vals[i], 0) {
			vals[i], errs[i] = 0, math.Inf(1)
		}
	}
}

// talbotMaxNodes caps the contour nodes of one inversion.
const talbotMaxNodes = 4096
