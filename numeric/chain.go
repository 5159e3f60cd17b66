package numeric

import (
	"fmt"
	"math"
)

// Decay chains: several species sharing the flow and dispersion, each with
// its own retardation factor R_i and decay rate Mu_i, a parent forming its
// daughter with the mass yield y (mass of daughter per mass of parent
// degraded). In the retarded form of the package (see doc.go),
//
//	R_i dC_i/dt = div(D grad C_i) - V dC_i/dx - R_i Mu_i C_i + sum_p y_p R_p Mu_p C_p,
//
// the production term y_p R_p Mu_p C_p being the yield times the parent's
// decayed mass (dissolved and sorbed) per unit volume and time, whatever
// the decay convention behind Mu (Mu = mu for decay of the total mass,
// mu/R for decay of the dissolved phase only).
//
// Each species is transported by the single-species steps (advection,
// dispersion) on the shared grid with its own storage R_i times the cell
// volume; decay and production of all species together form the reaction
// step, solved exactly for the step: with K the triangular matrix of the
// retarded form (K_ii = Mu_i, K_dp = -y_p (R_p/R_d) Mu_p) and
// Phi = integral_0^dt exp(-K s) ds, the values of a cell go from c to
// c - K Phi c, and w = Phi c is the time integral of the concentrations
// over the step, so species i loses R_i Mu_i w_i per unit volume (its
// decayed mass) and its daughter gains y_i R_i Mu_i w_i (the mass passed
// down the chain). The reaction step takes the place of the decay step in
// the alternating (Strang) sequence of the single-species solver, so the
// scheme keeps its order; the budget of each species closes to round-off
// by construction (the update and the budget use the same w).

// Species is one compound of a decay chain in the finite-volume solver.
type Species struct {
	R  float64 // retardation factor, >= 1
	Mu float64 // decay rate of the dissolved concentration in the retarded equation, 1/T, >= 0
	// Daughter is the index of the species this one decays to, or -1. At
	// most one daughter; several parents allowed; no cycles.
	Daughter int
	Yield    float64 // mass of daughter formed per mass of this species degraded, >= 0
	// Source is the inlet value of this species (times the History
	// factor), in any unit common to all species; the results are in that
	// unit. >= 0.
	Source float64
}

// MaxSpecies is the largest number of species of a chain.
const MaxSpecies = 20

// SpeciesBudget is the mass budget of one species of a chain run (or of the
// chain as a whole), in the units of MassBudget times the unit of
// Species.Source.
type SpeciesBudget struct {
	InletAdvective  float64 // carried in through the inlet by advection
	InletDispersive float64 // carried in (net) through the inlet by dispersion
	In              float64 // InletAdvective + InletDispersive
	Outflow         float64 // carried out through the outflow face
	Decayed         float64 // removed by its first-order decay
	// Produced is the mass formed by the decay of its parents: the sum
	// over the parents of their yield times their decayed mass. For the
	// chain as a whole it is the mass passed down the chain.
	Produced float64
	Stored   float64 // in the domain at the end of the run
	// ClosureError is |Stored - (In - Outflow - Decayed + Produced)|
	// divided by the largest of |In|, Produced, Decayed, Outflow and
	// Stored (0 when all are 0); the solver keeps it at round-off level.
	ClosureError float64
}

func (b *SpeciesBudget) close() {
	b.In = b.InletAdvective + b.InletDispersive
	scale := math.Max(math.Max(math.Abs(b.In), b.Produced), math.Max(b.Decayed, math.Max(b.Outflow, b.Stored)))
	b.ClosureError = 0
	if scale > 0 {
		b.ClosureError = math.Abs(b.Stored-(b.In-b.Outflow-b.Decayed+b.Produced)) / scale
	}
}

// add accumulates o into b (the chain as a whole).
func (b *SpeciesBudget) add(o SpeciesBudget) {
	b.InletAdvective += o.InletAdvective
	b.InletDispersive += o.InletDispersive
	b.Outflow += o.Outflow
	b.Decayed += o.Decayed
	b.Produced += o.Produced
	b.Stored += o.Stored
}

// validateSpecies checks the chain: its size, every coefficient, the
// daughter links (in range, not the species itself, no cycle).
func validateSpecies(field string, sp []Species) error {
	n := len(sp)
	if n == 0 || n > MaxSpecies {
		return invalid(field, "a chain has 1 to %d species, got %d", MaxSpecies, n)
	}
	for i, s := range sp {
		f := fmt.Sprintf("%s[%d]", field, i)
		if err := checkRetardation(f+".R", s.R); err != nil {
			return err
		}
		if err := checkNonNegative(f+".Mu", s.Mu); err != nil {
			return err
		}
		if err := checkNonNegative(f+".Yield", s.Yield); err != nil {
			return err
		}
		if err := checkNonNegative(f+".Source", s.Source); err != nil {
			return err
		}
		if s.Daughter != -1 && (s.Daughter < 0 || s.Daughter >= n || s.Daughter == i) {
			return invalid(f+".Daughter", "must be -1 or the index of another species, got %d", s.Daughter)
		}
	}
	for i := range sp {
		j := i
		for step := 0; j != -1; step++ {
			if step > n {
				return invalid(fmt.Sprintf("%s[%d].Daughter", field, i), "the decay links form a cycle")
			}
			j = sp[j].Daughter
		}
	}
	return nil
}

// reaction is the exact reaction step of a chain for one time step.
type reaction struct {
	n    int
	sp   []Species
	prod []float64 // prod[p] = y_p (R_p/R_d) Mu_p, the production coefficient into p's daughter
	phi  []float64 // n x n, row-major: integral_0^dt exp(-K s) ds
	// nz[i] lists the columns j of row i of phi that can be non-zero (i
	// and its ancestors); vals[i] the matching entries.
	nz   [][]int
	vals [][]float64
}

func newReaction(sp []Species) *reaction {
	n := len(sp)
	r := &reaction{n: n, sp: sp, prod: make([]float64, n), phi: make([]float64, n*n), nz: make([][]int, n), vals: make([][]float64, n)}
	for p, s := range sp {
		if s.Daughter >= 0 {
			r.prod[p] = s.Yield * s.R / sp[s.Daughter].R * s.Mu
		}
	}
	for j := range sp {
		for i := j; i != -1; i = sp[i].Daughter {
			r.nz[i] = append(r.nz[i], j)
		}
	}
	for i := range r.vals {
		r.vals[i] = make([]float64, len(r.nz[i]))
	}
	return r
}

// setStep computes Phi = dt phi1(-K dt), phi1(Z) = sum Z^k/(k+1)!, by
// scaling and squaring: Taylor series (18 terms) for Y = Z/2^s with
// |Y| <= 1/2 (row-sum norm), then s doublings phi1(2Y) = phi1(Y)(e^Y + I)/2,
// e^(2Y) = (e^Y)^2, with e^Y = I + Y phi1(Y).
func (r *reaction) setStep(dt float64) {
	n := r.n
	z := make([]float64, n*n)
	for i, s := range r.sp {
		z[i*n+i] = -s.Mu * dt
	}
	for p, s := range r.sp {
		if s.Daughter >= 0 {
			z[s.Daughter*n+p] += r.prod[p] * dt
		}
	}
	norm := 0.0
	for i := 0; i < n; i++ {
		row := 0.0
		for j := 0; j < n; j++ {
			row += math.Abs(z[i*n+j])
		}
		norm = math.Max(norm, row)
	}
	sq := 0
	for norm > 0.5 && sq < 1100 {
		norm /= 2
		sq++
	}
	scale := math.Ldexp(1, -sq)
	for i := range z {
		z[i] *= scale
	}
	// phi1(Y) by Horner: (((Y/19 + I)/18 ... ) in the form sum Y^k/(k+1)!.
	phi := identity(n)
	for k := 18; k >= 1; k-- {
		phi = matMul(z, phi, n)
		for i := range phi {
			phi[i] /= float64(k + 1)
		}
		for i := 0; i < n; i++ {
			phi[i*n+i]++
		}
	}
	e := matMul(z, phi, n)
	for i := 0; i < n; i++ {
		e[i*n+i]++
	}
	for k := 0; k < sq; k++ {
		ep := append([]float64(nil), e...)
		for i := 0; i < n; i++ {
			ep[i*n+i]++
		}
		phi = matMul(phi, ep, n)
		for i := range phi {
			phi[i] /= 2
		}
		e = matMul(e, e, n)
	}
	for i := range phi {
		r.phi[i] = phi[i] * dt
	}
	for i, js := range r.nz {
		for k, j := range js {
			r.vals[i][k] = r.phi[i*n+j]
		}
	}
}

func identity(n int) []float64 {
	m := make([]float64, n*n)
	for i := 0; i < n; i++ {
		m[i*n+i] = 1
	}
	return m
}

func matMul(a, b []float64, n int) []float64 {
	c := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for k := 0; k < n; k++ {
			aik := a[i*n+k]
			if aik == 0 {
				continue
			}
			for j := 0; j < n; j++ {
				c[i*n+j] += aik * b[k*n+j]
			}
		}
	}
	return c
}

// cell applies the reaction step to the values c of one cell (updated in
// place), with w a scratch slice; it writes into dec[i] the decayed
// concentration-time Mu_i w_i of species i and into prd[i] the produced
// one (prod_p w_p summed over i's parents p), each to be multiplied by the
// species' storage for a mass.
func (r *reaction) cell(c, w, dec, prd []float64) {
	for i, js := range r.nz {
		s := 0.0
		vs := r.vals[i]
		for k, j := range js {
			s += vs[k] * c[j]
		}
		w[i] = s
		prd[i] = 0
	}
	for i, s := range r.sp {
		lost := s.Mu * w[i]
		dec[i] = lost
		c[i] -= lost
		if s.Daughter >= 0 {
			g := r.prod[i] * w[i]
			c[s.Daughter] += g
			prd[s.Daughter] += g
		}
	}
}
