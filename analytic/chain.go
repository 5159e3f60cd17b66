package analytic

import (
	"errors"
	"fmt"
	"math"
)

// Decay chains: several compounds that share the aquifer (V and the
// dispersion coefficients) and are linked by first-order decay, a parent p
// forming its daughter d with the mass yield y_p (mass of d formed per mass
// of p degraded).
//
// Governing equations (shared/DESIGN.md section 3b). Per unit volume of
// aquifer, compound i holds n C_i dissolved and rho_b Kd_i C_i sorbed, that
// is n R_i C_i in all (n the effective porosity). A half-life acting on
// dissolved and sorbed mass alike ("total") removes mu_i n R_i C_i per unit
// time, of which the yield y_i turns into the daughter; one acting on the
// dissolved phase only ("dissolved") removes mu_i n C_i. Dividing the mass
// balance by n:
//
//	total:     R_i dC_i/dt = div(D grad C_i) - V dC_i/dx - mu_i R_i C_i + sum_p y_p mu_p R_p C_p
//	dissolved: R_i dC_i/dt = div(D grad C_i) - V dC_i/dx - mu_i C_i     + sum_p y_p mu_p C_p
//
// With Mu_i the decay rate of the dissolved concentration in the retarded
// form used throughout this package (Mu = mu for "total", Mu = mu/R for
// "dissolved"; see RetardedDecayRate), both read
//
//	R_i dC_i/dt = div(D grad C_i) - V dC_i/dx - R_i Mu_i C_i + sum_p y_p R_p Mu_p C_p
//
// so the production term of a daughter is y_p R_p Mu_p C_p whatever its
// parent's convention (the parent's Mu carries it), and in the retarded form
// of one compound,
//
//	dC_i/dt = (D/R_i) lap C_i - (V/R_i) dC_i/dx - Mu_i C_i + sum_p y_p (R_p/R_i) Mu_p C_p.
//
// With distinct retardation factors the daughter is formed at the rate its
// parent's total (dissolved plus sorbed) mass decays, but moves at its own
// velocity V/R_i: the factor R_p/R_i converts the parent's stored mass into
// the daughter's dissolved concentration. With equal R it is 1 and the chain
// reduces to the classical form dC_i/dt = L C_i - Mu_i C_i + sum y_p Mu_p C_p
// of Sun, Petersen & Clement (1999, J. Contam. Hydrol. 35:429-440), which a
// triangular change of variables decouples into single-compound problems
// (see Chain.Terms).

// MaxCompounds is the largest number of compounds in one chain.
const MaxCompounds = 20

// NoDaughter marks a compound that decays to nothing modelled.
const NoDaughter = -1

// Compound is one species of a decay chain.
type Compound struct {
	// R is the retardation factor, >= 1.
	R float64
	// Mu is the decay rate of the dissolved concentration in the retarded
	// form (as Params.Mu), 1/T, >= 0. RetardedDecayRate converts a
	// half-life rate and its convention.
	Mu float64
	// Daughter is the index in the chain of the compound this one decays
	// to, or NoDaughter. A compound has at most one daughter; a daughter
	// may have several parents; cycles are not allowed.
	Daughter int
	// Yield is the mass of daughter formed per mass of this compound
	// degraded, >= 0 (ignored without a daughter).
	Yield float64
}

// Chain is a set of compounds linked by decay (a forest of in-trees: each
// compound decays to at most one other). Any compound may also be released
// at the source; the source strengths are passed to the evaluators as a
// slice c0 in the chain's order.
type Chain []Compound

// RetardedDecayRate returns the decay rate Mu of the retarded form for a
// first-order rate mu = ln 2 / half-life: mu itself when the half-life acts
// on dissolved and sorbed mass alike, mu/R when it acts on the dissolved
// phase only.
func RetardedDecayRate(mu, r float64, dissolvedOnly bool) float64 {
	if dissolvedOnly {
		return mu / r
	}
	return mu
}

// ErrDistinctRetardation is returned by the evaluators that need equal
// retardation factors (the decoupling of Chain.Terms) for a chain whose
// factors differ.
var ErrDistinctRetardation = errors.New("analytic: the compounds of the chain have distinct retardation factors")

// equalRTol is the relative spread of retardation factors, and of decay
// rates, below which they count as equal.
const equalRTol = 1e-12

// Validate reports the first inconsistency of the chain: its size, a
// coefficient out of range, a daughter index out of range or naming the
// compound itself, or a cycle.
func (c Chain) Validate() error {
	n := len(c)
	if n == 0 || n > MaxCompounds {
		return fmt.Errorf("%w: a chain has 1 to %d compounds, got %d", ErrInvalid, MaxCompounds, n)
	}
	for i, k := range c {
		if !(k.R >= 1) || math.IsInf(k.R, 0) {
			return fmt.Errorf("%w: compound %d: R must be finite and >= 1, got %g", ErrInvalid, i, k.R)
		}
		if !(k.Mu >= 0) || math.IsInf(k.Mu, 0) {
			return fmt.Errorf("%w: compound %d: Mu must be finite and >= 0, got %g", ErrInvalid, i, k.Mu)
		}
		if k.Daughter == NoDaughter {
			continue
		}
		if k.Daughter < 0 || k.Daughter >= n || k.Daughter == i {
			return fmt.Errorf("%w: compound %d: daughter index %d is not another compound of the chain", ErrInvalid, i, k.Daughter)
		}
		if !(k.Yield >= 0) || math.IsInf(k.Yield, 0) {
			return fmt.Errorf("%w: compound %d: Yield must be finite and >= 0, got %g", ErrInvalid, i, k.Yield)
		}
	}
	for i := range c {
		// With at most one daughter each, a walk of n steps from any
		// compound that has not ended has met a cycle.
		j := i
		for step := 0; j != NoDaughter; step++ {
			if step > n {
				return fmt.Errorf("%w: compound %d: the decay links form a cycle", ErrInvalid, i)
			}
			j = c[j].Daughter
		}
	}
	return nil
}

// EqualRetardation reports whether every compound has the same retardation
// factor (to a relative 1e-12), the condition of the decoupling.
func (c Chain) EqualRetardation() bool {
	if len(c) == 0 {
		return true
	}
	lo, hi := c[0].R, c[0].R
	for _, k := range c {
		lo, hi = math.Min(lo, k.R), math.Max(hi, k.R)
	}
	return hi-lo <= equalRTol*hi
}

// production returns the coefficient of C_p in the production term of p's
// daughter in the retarded form: y_p (R_p/R_d) Mu_p.
func (c Chain) production(p int) float64 {
	k := c[p]
	if k.Daughter == NoDaughter {
		return 0
	}
	return k.Yield * k.R / c[k.Daughter].R * k.Mu
}

// checkSources validates the source strengths and the output slice.
func (c Chain) checkSources(c0, out []float64) error {
	if len(c0) != len(c) {
		return fmt.Errorf("%w: %d source strengths for %d compounds", ErrInvalid, len(c0), len(c))
	}
	if len(out) < len(c) {
		return fmt.Errorf("%w: output slice holds %d values for %d compounds", ErrInvalid, len(out), len(c))
	}
	for i, v := range c0 {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: source strength %d must be finite and >= 0, got %g", ErrInvalid, i, v)
		}
	}
	return nil
}

// chainPath is the decay path from a released compound (its first index)
// down to the compound evaluated (its last): the compounds it passes, and
// the product of the production coefficients along it times the source
// strength of its first compound.
type chainPath struct {
	nodes  [MaxCompounds]int8
	n      int     // number of compounds on the path (>= 1)
	weight float64 // c0[first] * prod over all but the last of production(node)
}

// paths returns, for compound i, every path from a compound released at the
// source (c0 > 0) down to i, i itself included, appended to buf.
func (c Chain) paths(i int, c0 []float64, buf []chainPath) []chainPath {
	for j := range c {
		if !(c0[j] > 0) {
			continue
		}
		var p chainPath
		p.weight = c0[j]
		k := j
		for ; k != NoDaughter && k != i; k = c[k].Daughter {
			p.nodes[p.n] = int8(k)
			p.n++
			p.weight *= c.production(k)
		}
		if k != i {
			continue
		}
		p.nodes[p.n] = int8(i)
		p.n++
		if p.weight > 0 || p.n == 1 {
			buf = append(buf, p)
		}
	}
	return buf
}

// rates returns the decay rates Mu along the path.
func (p *chainPath) rates(c Chain, buf []float64) []float64 {
	buf = buf[:0]
	for _, k := range p.nodes[:p.n] {
		buf = append(buf, c[k].Mu)
	}
	return buf
}
