package analytic

import "math"

// Term is one term of the decoupled form of a chain with equal retardation
// factors (see Chain.Terms): Coef times the age moment of order Order of
// the single-compound solution with decay rate Rate and a unit source,
//
//	M_n(k) = integral tau^n/n! exp(-k tau) w(tau) dtau = (-1)^n/n! d^n F/dk^n (k),
//
// where F(k) is that solution (OgataBanksAt, Exact3DAt, ... with Params.Mu =
// k) and w(tau) its no-decay response per unit age tau (the density of the
// ages of the water at the receptor, weighted by the source history).
// Order 0 is F itself; orders above 0 occur only where rates on a decay
// path repeat.
type Term struct {
	Coef  float64
	Rate  float64
	Order int
}

// Terms returns, for each compound i of a chain with equal retardation
// factors, the terms whose sum is its concentration for the source
// strengths c0:
//
//	C_i = sum over terms of Coef * M_Order(Rate).
//
// Derivation (Sun, Petersen & Clement 1999, J. Contam. Hydrol.
// 35:429-440, generalised to several parents and repeated rates). With
// equal R every compound obeys dC/dt = L C - K C, where L is the common
// transport operator and K the triangular matrix of decay rates (K_ii =
// Mu_i) and production coefficients (K_dp = -y_p Mu_p). As L commutes with
// K, the solution for the common source geometry and history is C =
// F(K) c0, the single-compound solution as a function of its decay rate
// applied to the matrix K. Each compound j lies on one path j -> ... -> i
// to each of its descendants, so by the divided-difference form of
// functions of triangular matrices (Opitz 1964)
//
//	C_i = sum_j c0_j (prod over the path but i of y Mu) (-1)^m F[k_j, ..., k_i],
//
// F[...] the divided difference in the rate over the m+1 rates of the
// path. With distinct rates it is sum_l F(k_l) / prod_{r != l} (k_r - k_l)
// up to sign: the coefficients k_p/(k_i - k_p) of Sun, Petersen & Clement.
// Where rates repeat (equal within a relative 1e-12), the partial-fraction
// expansion of 1/prod (z - k_r) has poles of higher order and the divided
// difference takes derivatives of F: those are the age moments of order
// above 0 (the repeated-rate limit; for two equal rates, C_d = y k c0
// M_1(k) = y k c0 integral tau exp(-k tau) w dtau, the Bateman term
// y k tau exp(-k tau) averaged over the ages).
//
// The terms are exact; where two rates on a path differ but only slightly,
// their coefficients are large and of opposite sign and the sum cancels.
// The evaluators (ChainColumnAt, ChainExact3DAt, ChainDomenicoAt) measure
// that cancellation and switch to a form without it; a caller summing the
// terms with its own F should do likewise.
func (c Chain) Terms(c0 []float64) ([][]Term, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	if err := c.checkSources(c0, c0); err != nil {
		return nil, err
	}
	if !c.EqualRetardation() {
		return nil, ErrDistinctRetardation
	}
	out := make([][]Term, len(c))
	var ps [MaxCompounds]chainPath
	var rs [MaxCompounds]float64
	for i := range c {
		for _, p := range c.paths(i, c0, ps[:0]) {
			out[i] = appendPathTerms(out[i], p.rates(c, rs[:0]), p.weight)
		}
	}
	return out, nil
}

// sameRate reports whether two rates count as equal.
func sameRate(a, b float64) bool {
	return math.Abs(a-b) <= equalRTol*math.Max(math.Abs(a), math.Abs(b))
}

// appendPathTerms adds weight * (-1)^m F[rates] as age-moment terms.
func appendPathTerms(terms []Term, rates []float64, weight float64) []Term {
	m := len(rates) - 1
	// Distinct rates and their multiplicities.
	var kv [MaxCompounds]float64
	var mult [MaxCompounds]int
	nd := 0
	for _, r := range rates {
		found := false
		for q := 0; q < nd; q++ {
			if sameRate(kv[q], r) {
				mult[q]++
				found = true
				break
			}
		}
		if !found {
			kv[nd], mult[nd] = r, 1
			nd++
		}
	}
	sign := 1.0
	if m%2 == 1 {
		sign = -1
	}
	for q := 0; q < nd; q++ {
		// Taylor coefficients of Q(z) = prod_{other} (z - k')^(-m') at
		// z = k_q, up to order mult[q]-1.
		var qc [MaxCompounds]float64
		qc[0] = 1
		mq := mult[q]
		for o := 0; o < nd; o++ {
			if o == q {
				continue
			}
			d := kv[q] - kv[o]
			for rep := 0; rep < mult[o]; rep++ {
				// Divide the series by (d + delta).
				prev := 0.0
				for n := 0; n < mq; n++ {
					qc[n] = (qc[n] - prev) / d
					prev = qc[n]
				}
			}
		}
		// The residue of order n (1..mq) is qc[mq-n]; the pole of order n
		// brings F^(n-1)/(n-1)! = (-1)^(n-1) M_(n-1).
		for n := 1; n <= mq; n++ {
			coef := weight * sign * qc[mq-n]
			if (n-1)%2 == 1 {
				coef = -coef
			}
			if coef == 0 {
				continue
			}
			terms = addTerm(terms, Term{Coef: coef, Rate: kv[q], Order: n - 1})
		}
	}
	return terms
}

// addTerm merges t into the list (same rate and order add up).
func addTerm(terms []Term, t Term) []Term {
	for k := range terms {
		if terms[k].Order == t.Order && sameRate(terms[k].Rate, t.Rate) {
			terms[k].Coef += t.Coef
			return terms
		}
	}
	return append(terms, t)
}
