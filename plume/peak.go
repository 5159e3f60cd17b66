package plume

import (
	"math"
	"slices"
	"sort"

	"downgradient/internal/roots"
)

// PeakMethod describes how peaks and first-exceedance times are found; it is
// reported in Derived.PeakMethod.
const PeakMethod = "Constant continuous sources rise monotonically toward the steady state, " +
	"so their peak is the steady state (time null). Otherwise the solution is sampled at 8 " +
	"log-spaced times per decade from 1e-3 to 1e3 characteristic travel times (and past the " +
	"release), plus the arrival, release-end and requested times; the largest sample is refined " +
	"by golden-section search to 1e-9 relative in time. The first exceedance is the root of " +
	"C(t) = screening level found by Brent's method on the first bracketing pair of samples " +
	"(monotone sources: a bracket from the requested times or by doubling, and with the exact " +
	"method Newton steps on the probit erfcinv(2 C/C_steady) inside it), to 1e-7 relative in time " +
	"(the closed forms themselves are accurate to 1e-6)."

// timeline is the sampled history of one receptor: elapsed times tau (d,
// ascending) and concentrations (mg/L) of the primary method.
type timeline struct {
	tau, c []float64
}

// charTime is the characteristic time of a receptor, d: the retarded
// advective travel time to it, at least the travel time over alpha_L.
func (m *model) charTime(p Point) float64 {
	if len(m.extra) > 0 {
		// Several sources: the earliest arrival of any of them, on the
		// first source's clock.
		t := math.Inf(1)
		for i := range m.sourceCount() {
			s := m.source(i)
			q := m.localPoint(p, i)
			one := model{aquiferParams: m.aquiferParams, compoundParams: m.compoundParams, sourceParams: *s}
			t = math.Min(t, s.lag+one.charTime(q))
		}
		return math.Max(t, 1e-9)
	}
	dist := math.Max(p.X, 0)
	if m.kind == SourceKindInstantaneous {
		dist = math.Hypot(p.X, p.Y)
	}
	dist = math.Max(dist, math.Max(m.aquiferFor(p).alpha[0], 1e-3))
	return m.r * dist / m.v
}

// sample evaluates f on the scan grid of the peak search.
func (m *model) sample(f func(float64) float64, p Point, extra []float64) timeline {
	t0 := m.charTime(p)
	lo := 1e-3 * t0
	hi := 1e3 * t0
	for i := range m.sourceCount() {
		s := m.source(i)
		if !math.IsInf(s.duration, 1) {
			hi = math.Max(hi, 10*(s.lag+s.duration+t0))
		}
		if s.depletion > 0 {
			hi = math.Max(hi, s.lag+50/s.depletion)
		}
		if ex := s.exhausted(); s.rate > 0 && !math.IsInf(ex, 1) {
			hi = math.Max(hi, 10*(s.lag+ex+t0))
		} else if s.rate > 0 {
			hi = math.Max(hi, s.lag+50/s.rate)
		}
	}
	taus := make([]float64, 0, scanSamples(lo, hi)+8+len(extra))
	for i := range scanSamples(lo, hi) {
		taus = append(taus, lo*math.Pow(10, float64(i)/perDecade))
	}
	taus = append(taus, t0)
	for i := range m.sourceCount() {
		s := m.source(i)
		if !math.IsInf(s.duration, 1) {
			taus = append(taus, s.lag+t0+s.duration/2, s.lag+t0+s.duration, s.lag+s.duration)
		}
		if ex := s.exhausted(); !math.IsInf(ex, 1) {
			taus = append(taus, s.lag+t0+ex/2, s.lag+t0+ex, s.lag+ex)
		}
		if s.lag > 0 {
			taus = append(taus, s.lag)
		}
	}
	for _, e := range extra {
		taus = append(taus, e)
	}
	taus = slices.DeleteFunc(taus, func(t float64) bool { return !(t > 0) || !Finite(t) })
	sort.Float64s(taus)
	tl := timeline{tau: taus[:0], c: make([]float64, 0, len(taus))}
	prev := math.NaN()
	for _, t := range taus {
		if t == prev {
			continue
		}
		prev = t
		tl.tau = append(tl.tau, t)
		tl.c = append(tl.c, f(t))
	}
	return tl
}

// Samples per decade of the peak scan, and the most decades it covers.
const (
	perDecade      = 8
	maxScanDecades = 40
)

// scanSamples is the number of log-spaced samples from lo to hi, counted
// in float64 first: at most maxScanDecades decades (a span beyond that,
// from a near-zero velocity or decay rate, would be a count beyond int;
// the times past it are beyond any physical meaning), none when lo is not
// a positive finite time.
func scanSamples(lo, hi float64) int {
	if !(lo > 0) || !Finite(lo) {
		return 0
	}
	decades := math.Log10(hi / lo)
	if !(decades <= maxScanDecades) { // also NaN and +Inf
		decades = maxScanDecades
	}
	return int(math.Ceil(perDecade*max(decades, 0))) + 1
}

// peakResult is the peak of one receptor in elapsed time (d) and mg/L.
type peakResult struct {
	tau      float64 // elapsed time of the peak, d; +Inf when approached as t -> infinity
	c        float64 // peak concentration, mg/L
	timeline timeline
}

// findPeak locates the highest value of f (elapsed time tau -> mg/L).
// steady is f(+Inf).
func (m *model) findPeak(f func(float64) float64, p Point, steady float64, extra []float64) peakResult {
	switch {
	case p.upgradient():
		return peakResult{tau: math.Inf(1), c: 0}
	case p.inside() && len(m.extra) == 0:
		return peakResult{tau: 0, c: m.c0}
	case m.allContinuous():
		return peakResult{tau: math.Inf(1), c: steady}
	}
	tl := m.sample(f, p, extra)
	if len(tl.c) == 0 {
		return peakResult{tau: math.Inf(1), c: 0, timeline: tl}
	}
	best := 0
	for i, c := range tl.c {
		if c > tl.c[best] {
			best = i
		}
	}
	if !(tl.c[best] > 0) {
		return peakResult{tau: math.Inf(1), c: 0, timeline: tl}
	}
	a := tl.tau[max(best-1, 0)]
	b := tl.tau[min(best+1, len(tl.tau)-1)]
	if best == 0 {
		a = 0
	}
	x, fx := roots.GoldenMax(f, a, b, 1e-9)
	if fx < tl.c[best] {
		x, fx = tl.tau[best], tl.c[best]
	}
	// Insert the refined peak into the timeline so the exceedance search
	// sees a sample at or above any level the peak reaches.
	i := sort.SearchFloat64s(tl.tau, x)
	if i == len(tl.tau) || tl.tau[i] != x {
		tl.tau = append(tl.tau, 0)
		tl.c = append(tl.c, 0)
		copy(tl.tau[i+1:], tl.tau[i:])
		copy(tl.c[i+1:], tl.c[i:])
		tl.tau[i], tl.c[i] = x, fx
	}
	return peakResult{tau: x, c: fx, timeline: tl}
}

// firstExceedance returns the earliest elapsed time, d, at which f reaches
// level (mg/L), or ok == false when it never does. pk is the receptor's
// peak; known holds values of f already computed (the requested times).
func (m *model) firstExceedance(f func(float64) float64, exact bool, p Point, pk peakResult, known timeline, level float64) (tau float64, ok bool) {
	if !(pk.c >= level) || p.upgradient() {
		return 0, false
	}
	if p.inside() && len(m.extra) == 0 {
		return 0, true
	}
	g := func(t float64) float64 { return f(t) - level }
	const rel = 1e-7
	if m.allContinuous() {
		return m.monotoneExceedance(f, exact, p, known, level, pk.c, rel)
	}
	tl := pk.timeline
	for i, c := range tl.c {
		if c >= level {
			lo, flo := 0.0, -level
			if i > 0 {
				lo, flo = tl.tau[i-1], tl.c[i-1]-level
			}
			return roots.Brent(g, lo, tl.tau[i], flo, c-level, rel*tl.tau[i], 200), true
		}
	}
	return 0, false
}

// allContinuous reports whether every source is constant forever (the
// value at any place then rises monotonically to its steady state).
func (m *model) allContinuous() bool {
	for i := range m.sourceCount() {
		if !m.source(i).continuous() {
			return false
		}
	}
	return true
}
