package numeric

import "math"

// MassBudget accounts for the mass of a run. Masses are porosity-scaled:
// concentration (relative to C0) times volume, dissolved plus sorbed
// (R C), so multiply by C0 and the effective porosity for a physical mass.
// For the 3D problem the figures are for the whole plume (both halves of the
// symmetric domain); for the 1D problem they are per unit of the area scale
// of A(x) (per unit cross-section for a uniform column).
type MassBudget struct {
	InletAdvective  float64 // carried in through the inlet by advection, V C
	InletDispersive float64 // carried in through the inlet by dispersion (net; negative where the inlet face drains the domain)
	In              float64 // net mass in, InletAdvective + InletDispersive
	Outflow         float64 // carried out through the outflow face
	Decayed         float64 // removed by first-order decay
	Stored          float64 // in the domain at the end of the run
	// ClosureError is |Stored - (In - Outflow - Decayed)| / In (0 when
	// nothing came in); the solver keeps it at round-off level.
	ClosureError float64
}

// kahan is a compensated accumulator so that long runs keep the budget at
// round-off level.
type kahan struct{ sum, c float64 }

func (k *kahan) add(v float64) {
	y := v - k.c
	t := k.sum + y
	k.c = (t - k.sum) - y
	k.sum = t
}

type budgetAcc struct {
	advIn, dispIn, out, decayed kahan
}

func (b *budgetAcc) result(stored, scale float64) MassBudget {
	mb := MassBudget{
		InletAdvective:  scale * b.advIn.sum,
		InletDispersive: scale * b.dispIn.sum,
		Outflow:         scale * b.out.sum,
		Decayed:         scale * b.decayed.sum,
		Stored:          scale * stored,
	}
	mb.In = mb.InletAdvective + mb.InletDispersive
	if mb.In > 0 {
		mb.ClosureError = math.Abs(mb.Stored-(mb.In-mb.Outflow-mb.Decayed)) / mb.In
	}
	return mb
}
