package numeric

import (
	"math"
)

// autoAxis1D designs a uniform grid: spacing the smallest of PecletMax Dx/V,
// the spreading length sqrt(2 Dx t1/R) at the first output time divided by
// perSpread, and 1/50 of the domain, divided by Refine; the domain reaches past the
// farthest receptor by the outflow boundary layer (12 Dx/V, where the
// influence of the free outflow face has decayed by exp(-12)) or to beyond
// the front (V t/R + 5 sqrt(2 Dx t/R)), whichever is shorter.
func autoAxis1D(p *Problem1D, perSpread float64) (Axis, error) {
	xr := 0.0
	for _, x := range p.Receptors {
		xr = math.Max(xr, x)
	}
	tl, steady := lastFinite(p.Times)
	front := math.Inf(1)
	if !steady {
		front = p.V*tl/p.R + 5*math.Sqrt(2*p.Dx*tl/p.R)
	}
	layer := 12 * p.Dx / p.V
	pe := orDefault(p.PecletMax, 2)
	refine := orDefault(p.Refine, 1)
	hPe := pe * p.Dx / p.V
	h := hPe
	if t1 := firstPositive(p.Times); t1 > 0 && !math.IsInf(t1, 1) {
		h = math.Min(h, math.Sqrt(2*p.Dx*t1/p.R)/perSpread)
	}
	L := math.Max(xr, math.Min(front, xr+layer))
	L = math.Max(L, 1e-300)
	h = math.Min(h, L/50) / refine
	L += 2 * h
	nf := math.Ceil(L / h)
	budget := p.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget1D
	}
	if !(nf <= float64(budget)) {
		hFit := L / float64(budget)
		return Axis{}, cellBudgetError("Problem1D.CellBudget", nf, budget, "need %.3g cells (spacing %.3g over %.4g) for grid Peclet <= %.3g but the budget is %d; a budget of %d fits spacing %.3g, grid Peclet <= %.3g",
			nf, h, L, math.Min(pe, p.V*h/p.Dx), budget, budget, hFit, p.V*hFit/p.Dx)
	}
	return UniformAxis(L, int(nf)), nil
}
