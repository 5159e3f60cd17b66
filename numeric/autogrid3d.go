package numeric

import (
	"fmt"
	"math"
)

// design3 is a grid design of Problem3D, counted but not built.
type design3 struct {
	x, y, z gradedAxis
}

// cells is the number of cells, in float64 (exact in magnitude however
// large the design).
func (d *design3) cells() float64 { return d.x.cells * d.y.cells * d.z.cells }

// build places the faces of the three axes; only for a design that fits
// the budget.
func (d *design3) build() (x, y, z Axis) { return d.x.build(), d.y.build(), d.z.build() }

// peclet is the grid Peclet number V dx/Dx along flow at the coarsest x
// cell (at the mean x cell when the x axis has more than limit cells and
// is not built).
func (d *design3) peclet(p *Problem3D, limit float64) float64 {
	return p.V * d.x.maxWidth(limit) / p.Dx
}

// fmtCount formats a cell count: the integer when it is moderate, else three
// significant digits.
func fmtCount(n float64) string {
	if n <= 1e9 {
		return fmt.Sprintf("%.0f", n)
	}
	return fmt.Sprintf("%.3g", n)
}

// Growth rates of the graded axes: a cell is at most this fraction larger
// than its neighbour (common practice for stretched finite-volume grids is
// 1.1 to 1.3).
const (
	growthX  = 0.15
	growthYZ = 0.1
)

// designGrid3 chooses the grid of Problem3D. scale multiplies every spacing
// (1 = the default design; Refine divides it).
//
// Extent. Along x the domain reaches past the farthest receptor by the
// outflow boundary layer 12 Dx/V (the free outflow face, which carries no
// dispersive flux, perturbs the solution upstream by about exp(-V d/Dx)), or
// to beyond the front V t/R + 5 sqrt(2 Dx t/R) at the last time if that is
// shorter. Across, it reaches past the source edge by 5 spreading lengths
// sigma(x) = sqrt(2 D x/V) at the end of the plume (Dy for y, Dz for z), and
// past every receptor.
//
// Spacing. Along x at most PecletMax Dx/V (grid Peclet <= 2 by default),
// 1/30 of the domain and 0.15 of the longitudinal spreading length
// sqrt(2 Dx t1/R) at the first output time t1 (the early front), and finer
// near the source face (at x = 0 a sixth of the smallest of PecletMax Dx/V,
// sqrt(2 Dx t1/R)/4 and 1/30 of the domain, growing by growthX per unit
// distance; this smallest cell sets the time step through the Courant
// limit). Across,
// fine at the source edges y = W/2 and z = Z (a third of the source
// half-width or depth, or a sixth of the spreading length at the nearest
// receptor, whichever is smaller), growing by growthYZ per unit distance, at
// most half the spreading length at the end of the plume. The source edges
// are cell faces. With these choices (and the time step limit of nearStep)
// the typical screening case of the benchmark stays within 5 % of the exact
// solution wherever C/C0 > 1e-3 at receptors from 10 m on (measured worst
// 4.2 % with receptors from 25 m, 3.7 % with receptors also at 10 m).
func designGrid3(p *Problem3D, scale float64) design3 {
	b, zs := 0.5*p.Width, p.Depth
	xrMax, yrMax, zrMax := 0.0, 0.0, 0.0
	xrMin := math.Inf(1)
	for _, r := range p.Receptors {
		xrMax = math.Max(xrMax, r.X)
		yrMax = math.Max(yrMax, math.Abs(r.Y))
		zrMax = math.Max(zrMax, r.Bottom)
		if r.X > 0 {
			xrMin = math.Min(xrMin, r.X)
		}
	}
	xrMax = math.Max(xrMax, transectX(p.Transects))
	tl, steady := lastFinite(p.Times)
	front := math.Inf(1)
	if !steady {
		front = p.V*tl/p.R + 5*math.Sqrt(2*p.Dx*tl/p.R)
	}
	layer := 12 * p.Dx / p.V
	lx := math.Max(xrMax, math.Min(front, xrMax+layer))
	lx = math.Max(lx, math.Min(front, layer))
	if !(lx > 0) {
		lx = layer
	}
	hxMax, hx0 := xSpacing(p, lx)
	lx += hxMax * scale // the farthest receptor lies inside, not on the outflow face
	if math.IsInf(xrMin, 1) {
		xrMin = 0
	}
	xRef := math.Max(xrMin, 2*hx0)
	xEnd := math.Min(lx, front)
	sig := func(d, x float64) float64 { return math.Sqrt(2 * d * x / p.V) }

	hy0 := math.Min(b/3, sig(p.Dy, xRef)/6)
	hyMax := math.Max(hy0, 0.5*sig(p.Dy, xEnd))
	ly := math.Max(b+5*sig(p.Dy, xEnd), yrMax+hyMax*scale)

	hz0 := math.Min(zs/3, sig(p.Dz, xRef)/6)
	hzMax := math.Max(hz0, 0.5*sig(p.Dz, xEnd))
	lz := math.Max(zs+5*sig(p.Dz, xEnd), zrMax+hzMax*scale)

	return design3{
		x: newGradedAxis(lx, nil, []refinePoint{{0, hx0}}, hxMax, growthX, scale),
		y: newGradedAxis(ly, []float64{b}, []refinePoint{{b, hy0}}, hyMax, growthYZ, scale),
		z: newGradedAxis(lz, []float64{zs}, []refinePoint{{zs, hz0}}, hzMax, growthYZ, scale),
	}
}

// defaultResolution divides every spacing of designGrid3 in Screen3D (on
// top of Refine): the margin that keeps the benchmark's typical case within
// 5 % (measured worst 4.2 %, against 5.2 % without it) rather than at the edge of it.
const defaultResolution = 1.15

// designFor designs the grid, counts it and builds it when it fits the
// budget. When it does not, it searches (by counting only, so the search
// costs microseconds whatever the inputs) the coarsening that would fit and
// says so in a BudgetError.
func designFor(p *Problem3D, budget int) (x, y, z Axis, err error) {
	refine := orDefault(p.Refine, 1) * defaultResolution
	d := designGrid3(p, 1/refine)
	need := d.cells()
	if need <= float64(budget) {
		x, y, z = d.build()
		return x, y, z, nil
	}
	// Coarsen all spacings by a common factor until the grid fits.
	lo, hi := 1/refine, 1/refine
	found := false
	for k := 0; k < 60 && !found; k++ {
		hi *= 2
		c := designGrid3(p, hi)
		found = c.cells() <= float64(budget)
	}
	if !found {
		c := designGrid3(p, hi)
		return x, y, z, cellBudgetError("Problem3D.CellBudget", need, budget, "need %.3g cells (%s x %s x %s) for grid Peclet <= %.3g but the budget is %d, and even all spacings %.3g times coarser need %s cells; reduce the extent of the domain (%.4g along flow: the farthest receptor, the latest time)",
			need, fmtCount(d.x.cells), fmtCount(d.y.cells), fmtCount(d.z.cells), d.peclet(p, float64(budget)), budget, hi*refine, fmtCount(c.cells()), d.x.length())
	}
	for k := 0; k < 40; k++ {
		mid := math.Sqrt(lo * hi)
		if c := designGrid3(p, mid); c.cells() <= float64(budget) {
			hi = mid
		} else {
			lo = mid
		}
	}
	fit := designGrid3(p, hi)
	b := float64(budget)
	return x, y, z, cellBudgetError("Problem3D.CellBudget", need, budget, "need %.3g cells (%s x %s x %s) for grid Peclet <= %.3g but the budget is %d; a budget of %d fits grid Peclet <= %.3g (all spacings %.3g times coarser, %s x %s x %s cells), which is less accurate; raise CellBudget to at least %s or loosen PecletMax/Refine",
		need, fmtCount(d.x.cells), fmtCount(d.y.cells), fmtCount(d.z.cells), d.peclet(p, b), budget, budget, fit.peclet(p, b), hi*refine,
		fmtCount(fit.x.cells), fmtCount(fit.y.cells), fmtCount(fit.z.cells), fmtCount(need))
}

// xSpacing returns the automatic 3D grid's largest x spacing and its
// spacing at the source faces, m, for a domain of length lx: the grid
// Peclet number's limit (default 2), a quarter of the dispersion length at
// the first requested time and a thirtieth of the domain; the largest
// spacing is then held to 0.15 of that dispersion length (the face spacing
// is a sixth of the spacing before that).
func xSpacing(p *Problem3D, lx float64) (hxMax, hx0 float64) {
	pe := orDefault(p.PecletMax, 2)
	hxMax = pe * p.Dx / p.V
	t1 := firstPositive(p.Times)
	early := t1 > 0 && !math.IsInf(t1, 1)
	if early {
		hxMax = math.Min(hxMax, 0.25*math.Sqrt(2*p.Dx*t1/p.R))
	}
	hxMax = math.Min(hxMax, lx/30)
	hx0 = hxMax / 6
	if early {
		hxMax = math.Min(hxMax, 0.15*math.Sqrt(2*p.Dx*t1/p.R))
	}
	return hxMax, hx0
}
