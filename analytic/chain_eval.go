package analytic

import (
	"fmt"
	"math"
)

// Evaluators of a decay chain at one receptor and time. Each writes the
// concentration of every compound of c into out (same order as the chain),
// for the source strengths c0 (the source concentration of each compound,
// any one unit; the results are in that unit), the common source geometry
// and history, and the transport coefficients of p. p.R and p.Mu are not
// used: each compound has its own (Compound.R, Compound.Mu). t = +Inf asks
// for the steady state. The values are finite and non-negative.

// chainKappaExact and chainKappaClosed bound the cancellation accepted in
// the decoupled terms: the ratio of the sum of their magnitudes to the
// magnitude of their sum. The exact 3D value carries a relative error
// below 1e-7 (its quadrature tolerance), so a ratio of 30 keeps about 1e-6;
// the 1D closed forms are good to about 1e-14, so 1e4 keeps 1e-10.
const (
	chainKappaExact  = 30
	chainKappaClosed = 1e4
)

// ChainExact3DAt evaluates a chain with equal retardation factors at pt by
// the exact 3D solution (see Exact3DAt), decoupled as in Chain.Terms: each
// compound is the sum of its terms with F = Exact3DAt at the term's rate.
// Where the terms of a compound would cancel (rates on a decay path equal
// or within a few per cent of each other over the travel time: the
// repeated-rate limit and its neighbourhood), that compound is computed
// instead as the age integral of its Bateman weights (see chain_age.go), to
// a relative accuracy of 1e-10. A chain with distinct retardation factors
// returns ErrDistinctRetardation.
func ChainExact3DAt(pt Point, t float64, p Params, s Source, h History, c Chain, c0, out []float64) error {
	if err := chainCheck(p, true, c, c0, out); err != nil {
		return err
	}
	h, err := chainHistory(h)
	if err != nil {
		return err
	}
	if err := chainCheckSource(s); err != nil {
		return err
	}
	if !c.EqualRetardation() {
		return ErrDistinctRetardation
	}
	q := p
	q.R = c[0].R
	f := func(k float64) float64 {
		q.Mu = k
		return Exact3DAt(pt, t, q, s, h)
	}
	if chainTrivial(pt.X, t, c0, f, out) {
		return nil
	}
	need := chainByTerms(c, c0, f, chainKappaExact, out)
	if len(need) > 0 {
		ageGroup(pt, t, q, s, h, c, c0, need, false, out)
	}
	return nil
}

// ChainColumnAt evaluates a chain in the 1D column (first- or third-type
// inlet, any source history) at distance x. With equal retardation factors
// it sums the decoupled terms of Chain.Terms with F = OgataBanksAt (closed
// forms), switching a compound whose terms would cancel to its age
// integral (relative accuracy 1e-10; at x = 0 with a flux inlet, to the
// Laplace-domain solution). With distinct factors it is
// ChainColumnLaplace.
func ChainColumnAt(x, t float64, p Params, inlet Inlet, h History, c Chain, c0, out []float64) error {
	if err := chainCheck(p, false, c, c0, out); err != nil {
		return err
	}
	h, err := chainHistory(h)
	if err != nil {
		return err
	}
	if !c.EqualRetardation() {
		return chainColumnLaplace(x, t, p, inlet, h, c, c0, out, nil)
	}
	q := p
	q.R = c[0].R
	f := func(k float64) float64 {
		q.Mu = k
		return OgataBanksAt(x, t, q, inlet, h)
	}
	if inlet == FirstType && chainTrivial(x, t, c0, f, out) {
		return nil
	}
	if x < 0 || math.IsNaN(x) || !(t > 0) {
		for i := range c {
			out[i] = 0
		}
		return nil
	}
	need := chainByTerms(c, c0, f, chainKappaClosed, out)
	if len(need) == 0 {
		return nil
	}
	if x == 0 {
		// Flux inlet at the inlet face: the age kernel is singular there.
		var all [MaxCompounds]float64
		if err := chainColumnLaplace(x, t, p, inlet, h, c, c0, all[:len(c)], nil); err != nil {
			return err
		}
		for _, i := range need {
			out[i] = all[i]
		}
		return nil
	}
	inf := math.Inf(1)
	ageGroup(Point{X: x}, t, q, Source{Width: inf, Depth: inf}, h, c, c0, need, inlet == ThirdType, out)
	return nil
}

// chainHistory is h in the form the chain evaluators take (see
// History.normalized): a power-law source function other than the
// exponential and the constant one returns ErrInvalid, since one source
// mass cannot feed several compounds' concentrations by one law.
func chainHistory(h History) (History, error) {
	h = h.normalized()
	if h.power() {
		return h, fmt.Errorf("%w: a source depleting by its mass (History.Rate with an exponent other than 0 or 1) is not supported for decay chains", ErrInvalid)
	}
	return h, nil
}

// chainCheck validates the common inputs of the evaluators.
func chainCheck(p Params, threeD bool, c Chain, c0, out []float64) error {
	if err := c.Validate(); err != nil {
		return err
	}
	if err := c.checkSources(c0, out); err != nil {
		return err
	}
	q := p
	q.R, q.Mu = 1, 0
	return q.Validate(threeD)
}

// chainCheckSource accepts a source with positive (possibly infinite)
// width and depth.
func chainCheckSource(s Source) error {
	if !(s.Width > 0) || !(s.Depth > 0) {
		return fmt.Errorf("%w: source width and depth must be > 0 (or +Inf), got %g and %g", ErrInvalid, s.Width, s.Depth)
	}
	return nil
}

// chainTrivial handles the receptor upgradient of or on the source plane,
// and times not after the start: on the plane every compound holds its own
// source value (f is the same for every rate there).
func chainTrivial(x, t float64, c0 []float64, f func(float64) float64, out []float64) bool {
	switch {
	case x < 0 || math.IsNaN(x) || !(t > 0):
		for i := range c0 {
			out[i] = 0
		}
		return true
	case x == 0:
		v := f(0)
		for i := range c0 {
			out[i] = c0[i] * v
		}
		return true
	}
	return false
}

// chainByTerms sums the decoupled terms with F = f, writing the compounds
// it settles into out, and returns the compounds left for the age
// integral: those with terms of order above 0 (repeated rates) and those
// whose terms cancel beyond kappa.
func chainByTerms(c Chain, c0 []float64, f func(float64) float64, kappa float64, out []float64) []int {
	terms, _ := c.Terms(c0)
	var rates, vals [2 * MaxCompounds]float64
	nr := 0
	value := func(k float64) float64 {
		for j := 0; j < nr; j++ {
			if rates[j] == k {
				return vals[j]
			}
		}
		v := f(k)
		if nr < len(rates) {
			rates[nr], vals[nr] = k, v
			nr++
		}
		return v
	}
	var need []int
	for i, ts := range terms {
		var sum, mag float64
		repeated := false
		for _, tm := range ts {
			if tm.Order > 0 {
				repeated = true
				break
			}
		}
		if repeated {
			need = append(need, i)
			continue
		}
		for _, tm := range ts {
			v := tm.Coef * value(tm.Rate)
			sum += v
			mag += math.Abs(v)
		}
		if mag > kappa*math.Abs(sum) || sum < 0 {
			need = append(need, i)
			continue
		}
		out[i] = sum
	}
	return need
}
