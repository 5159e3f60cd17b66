package numeric

import (
	"context"
	"fmt"
	"math"
	"sort"
)

// Several sources on one grid (Problem3D.Sources).
//
// Each source is a vertical rectangle across flow on the plane x = X of
// the plume frame (X along flow, any sign: upstream or downstream of
// x = 0), centred on y = Y, Width wide and reaching from the water table
// to Depth, held at Strength times its History factor (Strength is the
// source concentration relative to the reference concentration C_ref of
// the outputs). All sources share the aquifer and the flow direction.
//
// The problem is linear in the source concentrations, and the screening
// model (the closed forms) is the superposition of one half-space problem
// per source: source i contributes nothing upstream of its face and, from
// its face on, the solution of a source held on the plane x = X_i (zero on
// the rest of that plane), whatever the other sources do. The finite-volume
// form carries that superposition on one grid: each source has its own
// field over the cells downstream of its face (the cells upstream hold
// nothing of it and are not stored), advanced with the operators of the
// shared grid and time steps; the values at the receptors are the sum of
// Strength times each field. One field per source is needed twice over:
// the flux limiter of the advection is not linear (one field holding every
// source would differ from the sum of single-source runs by more than
// round-off), and a source downstream of another must not absorb or
// reflect the plume that passes its face (the half-space problem of the
// closed form). So a run with several sources gives the sum of the
// single-source runs on the same grid, bit for bit per source, whenever
// they take the same time steps (the switch-off of every source is a break
// of the common stepping, so the single run of a source that stops at
// another time than the others steps a little differently, a difference
// of the order of the splitting error, not of round-off).
//
// Grid. The x axis starts at the most upstream source face and has a face
// at every source face; the automatic design (designSources) is the one of
// one source (designGrid3) with every face, edge and depth refined. When
// every source is centred on the plume axis (Y = 0) the grid is the half
// y >= 0 mirrored about the axis, as for one source; when any source is
// off the axis the y-symmetry is lost and the grid spans the whole width
// (from 5 transverse spreading lengths beyond the outermost source edges
// and the receptors on either side), about twice the cells across.
//
// Cell budget. CellBudget bounds the cells held in all the fields
// together (GridReport.FieldCells): the sum over the sources of the grid
// cells downstream of each face; the work budget counts these field cells
// times the time steps. So k sources cost up to k times one source's
// memory and work on the same grid, and a full-width grid twice a half.
//
// Mass budget. Every field keeps its own budget (mass in through its own
// face, out through the outflow face, decayed, stored); Result3D.Budget is
// their sum weighted by Strength (relative to C_ref), which closes to
// round-off because each does.
//
// Explicit grid (Problem3D.Grid with Sources). The axes are in the plume
// frame: X.Faces start at or upstream of every source face and contain
// every source face X exactly; Y.Faces start at 0 (the half domain: every
// source must then be on the axis) or below 0 (the whole width, covering
// every source and receptor); Z.Faces start at 0.

// MaxStrength is the largest SourceFace.Strength accepted, so that sums
// over many sources stay far from overflow.
const MaxStrength = 1e6

// SourceFace is one source of a Problem3D with several sources. Lengths
// in L, plume frame.
type SourceFace struct {
	X        float64 // position of the face along flow (any sign)
	Y        float64 // centre of the face across flow
	Width    float64 // across flow, > 0
	Depth    float64 // below the water table, > 0
	Strength float64 // source concentration relative to the reference concentration of the outputs, in (0, MaxStrength]
	History  History // the source's own history (default: continuous, constant)
}

// validateSources is Problem3D.validate with Sources.
func (p *Problem3D) validateSources() error {
	const pre = "Problem3D."
	for _, f := range []struct {
		name string
		v    float64
	}{{"V", p.V}, {"Dx", p.Dx}, {"Dy", p.Dy}, {"Dz", p.Dz}} {
		if err := checkPositive(pre+f.name, f.v); err != nil {
			return err
		}
	}
	if err := checkRetardation(pre+"R", p.R); err != nil {
		return err
	}
	if err := checkNonNegative(pre+"Mu", p.Mu); err != nil {
		return err
	}
	if p.Width != 0 || p.Depth != 0 || p.History != (History{}) {
		return invalid(pre+"Sources", "give either Width, Depth and History (one source) or Sources, not both")
	}
	for i, s := range p.Sources {
		f := fmt.Sprintf("%sSources[%d]", pre, i)
		for _, c := range []struct {
			n        string
			v        float64
			positive bool
		}{{"X", s.X, false}, {"Y", s.Y, false}, {"Width", s.Width, true}, {"Depth", s.Depth, true}, {"Strength", s.Strength, true}} {
			if math.IsNaN(c.v) || math.IsInf(c.v, 0) || (c.positive && !(c.v > 0)) {
				return invalid(f+"."+c.n, "must be finite%s, got %g", map[bool]string{true: " and > 0"}[c.positive], c.v)
			}
		}
		if s.Strength > MaxStrength {
			return invalid(f+".Strength", "must be at most %g (take the largest source concentration as the reference), got %g", float64(MaxStrength), s.Strength)
		}
		if err := s.History.validate(f + ".History"); err != nil {
			return err
		}
	}
	// The modelled aquifer starts at the most upstream source face, or at
	// the first face of an explicit grid upstream of it.
	x0, face := sourcesStart(p.Sources), "every source face"
	if p.Grid != nil && len(p.Grid.X.Faces) > 0 && p.Grid.X.Faces[0] < x0 {
		x0, face = p.Grid.X.Faces[0], "the grid"
	}
	if err := validateReceptorsFrom(pre+"Receptors", p.Receptors, x0, face); err != nil {
		return err
	}
	xEnd := math.Inf(1)
	if p.Grid != nil && len(p.Grid.X.Faces) > 0 {
		xEnd = p.Grid.X.Faces[len(p.Grid.X.Faces)-1]
	}
	if err := validateTransects(pre+"Transects", p.Transects, x0, xEnd); err != nil {
		return err
	}
	if err := p.validateSettings(); err != nil {
		return err
	}
	if p.Grid != nil {
		return p.validateSourceGrid()
	}
	return nil
}

// sourcesStart is the most upstream source face.
func sourcesStart(ss []SourceFace) float64 {
	x0 := math.Inf(1)
	for _, s := range ss {
		x0 = math.Min(x0, s.X)
	}
	return x0
}

// offAxis reports whether any source is centred off the plume axis.
func offAxis(ss []SourceFace) bool {
	for _, s := range ss {
		if s.Y != 0 {
			return true
		}
	}
	return false
}

// validateFaces checks that an axis has at least one cell and finite,
// strictly ascending faces (any start).
func validateFaces(field string, a Axis) error {
	if len(a.Faces) < 2 {
		return invalid(field, "need at least 1 cell (2 faces), got %d faces", len(a.Faces))
	}
	for i, f := range a.Faces {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return invalid(fmt.Sprintf("%s.Faces[%d]", field, i), "must be finite, got %g", f)
		}
		if i > 0 && !(f > a.Faces[i-1]) {
			return invalid(fmt.Sprintf("%s.Faces[%d]", field, i), "cell spacing must be > 0: face %g does not exceed the previous face %g", f, a.Faces[i-1])
		}
	}
	return nil
}

// validateSourceGrid checks an explicit grid given with Sources (see the
// comment at the top of this file).
func (p *Problem3D) validateSourceGrid() error {
	const pre = "Problem3D.Grid."
	g := p.Grid
	for _, a := range []struct {
		n  string
		ax Axis
	}{{"X", g.X}, {"Y", g.Y}, {"Z", g.Z}} {
		if err := validateFaces(pre+a.n, a.ax); err != nil {
			return err
		}
	}
	xf := g.X.Faces
	for i, s := range p.Sources {
		k := sort.SearchFloat64s(xf, s.X)
		if k == len(xf) || xf[k] != s.X || k == len(xf)-1 {
			return invalid(pre+"X", "Sources[%d].X = %g must be a face of the axis, upstream of its last face %g", i, s.X, xf[len(xf)-1])
		}
	}
	if xr := maxOf(p.Receptors, func(r Receptor) float64 { return r.X }); xr > xf[len(xf)-1] {
		return invalid(pre+"X", "last face %g does not reach the farthest receptor (%g)", xf[len(xf)-1], xr)
	}
	if err := g.Z.validate(pre + "Z"); err != nil {
		return err
	}
	if zr := maxOf(p.Receptors, func(r Receptor) float64 { return r.Bottom }); zr > g.Z.Length() {
		return invalid(pre+"Z", "extent %g does not reach the farthest receptor (%g)", g.Z.Length(), zr)
	}
	y0, y1 := g.Y.Faces[0], g.Y.Faces[len(g.Y.Faces)-1]
	switch {
	case y0 > 0:
		return invalid(pre+"Y.Faces[0]", "must be 0 (half domain) or < 0 (whole width), got %g", y0)
	case y0 == 0:
		if offAxis(p.Sources) {
			return invalid(pre+"Y", "starts at 0 (the half y >= 0 mirrored about the plume axis), but a source is centred off the axis; give the whole width (Faces[0] < 0)")
		}
		if yr := maxOf(p.Receptors, func(r Receptor) float64 { return math.Abs(r.Y) }); yr > y1 {
			return invalid(pre+"Y", "extent %g does not reach the farthest receptor (%g)", y1, yr)
		}
	default:
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, s := range p.Sources {
			lo, hi = math.Min(lo, s.Y-0.5*s.Width), math.Max(hi, s.Y+0.5*s.Width)
		}
		for _, r := range p.Receptors {
			lo, hi = math.Min(lo, r.Y), math.Max(hi, r.Y)
		}
		if lo < y0 || hi > y1 {
			return invalid(pre+"Y", "[%g, %g] does not cover the sources and receptors [%g, %g]", y0, y1, lo, hi)
		}
	}
	return nil
}

// layout3 is the shared grid of a run with several sources: x relative to
// x0 (the first x face; faces from 0), y in the plume frame (from 0 in the
// half domain), z from the water table.
type layout3 struct {
	x0      float64
	x, y, z Axis
	full    bool
}

// gridLayout is the layout of an explicit grid.
func gridLayout(g *Grid3D) layout3 {
	x0 := g.X.Faces[0]
	rel := make([]float64, len(g.X.Faces))
	for i, f := range g.X.Faces {
		rel[i] = f - x0
	}
	return layout3{x0: x0, x: Axis{Faces: rel}, y: g.Y, z: g.Z, full: g.Y.Faces[0] < 0}
}

// faceIndex is the x face of the layout nearest to the source face at
// plume x (exactly it on an explicit grid and on the automatic one, where
// every source face is a break of the axis).
func (l *layout3) faceIndex(x float64) int {
	d := x - l.x0
	f := l.x.Faces
	k := sort.SearchFloat64s(f, d)
	if k == len(f) || (k > 0 && d-f[k-1] < f[k]-d) {
		k--
	}
	return min(k, len(f)-2)
}

// fieldCells is the number of cells held in the fields of the sources.
func (l *layout3) fieldCells(ss []SourceFace) float64 {
	n := 0.0
	per := float64(l.y.N()) * float64(l.z.N())
	for _, s := range ss {
		n += float64(l.x.N()-l.faceIndex(s.X)) * per
	}
	return n
}

// setPatch marks the inflow-face cells of the source centred on y = yc,
// half-width hw, reaching to depth (a cell belongs to it when its centre
// does; on the half domain yc = 0 gives the patch of newGrid3).
func (g *grid3) setPatch(yc, hw, depth float64) {
	g.patchArea = 0
	for k := 0; k < g.nz; k++ {
		for j := 0; j < g.ny; j++ {
			p := k*g.ny + j
			g.patch[p] = 0
			if math.Abs(g.yc[j]-yc) < hw && g.zc[k] < depth {
				g.patch[p] = 1
				g.patchArea += g.area[p]
			}
		}
	}
}

// mirror is the factor from the grid's budget to the whole plume's: 2 on
// the half domain, 1 on the whole width.
func (g *grid3) mirror() float64 {
	if g.fullY {
		return 1
	}
	return 2
}

// runSources is Screen3D with Sources.
func runSources(ctx context.Context, p Problem3D) (*Result3D, error) {
	if err := p.validate(); err != nil {
		return nil, err
	}
	lay, err := sourceLayout(&p)
	if err != nil {
		return nil, err
	}
	m := newMulti3(&p, lay)
	plan := m.plan(&p, lay)
	var marched float64
	vals, st, err := march(ctx, m, len(p.Receptors)+len(p.Transects), plan, &marched)
	if err != nil {
		return nil, err
	}
	vals, disch := splitDischarge(vals, len(p.Receptors))
	rep := report3(m.comps[0], p.V, p.Dx)
	rep.NX, rep.XLength = lay.x.N(), lay.x.Length()
	rep.DXMin, rep.DXMax = lay.x.minMax()
	rep.PecletX = p.V * rep.DXMax / p.Dx
	rep.Cells = rep.NX * rep.NY * rep.NZ
	rep.XStart, rep.FullWidth, rep.Sources = lay.x0, lay.full, len(p.Sources)
	if lay.full {
		rep.YStart = lay.y.Faces[0]
	}
	rep.FieldCells = int(plan.cells)
	rep.Steps, rep.CellSteps, rep.SteadyFrom = st.steps, plan.cells*float64(st.steps), st.settled
	if st.steps > 0 {
		rep.TimeStep = plan.dtMax
		rep.Courant = p.V * plan.dtMax / (p.R * rep.DXMin)
	}
	out := &Result3D{C: vals, Grid: rep, Budget: m.budget(), Discharge: disch}
	if st.steady != nil {
		b := st.steady.budget
		out.SteadyBudget = &b
		out.Grid.SteadyIterations, out.Grid.SteadyResidual = st.steady.iterations, st.steady.residual
	}
	return out, nil
}

// sourceLayout checks the explicit grid against the cell budget, or
// designs the grid.
func sourceLayout(p *Problem3D) (layout3, error) {
	budget := p.CellBudget
	if budget == 0 {
		budget = DefaultCellBudget3D
	}
	if p.Grid == nil {
		return designSourcesFor(p, budget)
	}
	lay := gridLayout(p.Grid)
	if n := lay.fieldCells(p.Sources); n > float64(budget) {
		return lay, cellBudgetError("Problem3D.CellBudget", n, budget, "the given grid holds %.4g cells in the fields of its %d sources but the budget is %d", n, len(p.Sources), budget)
	}
	return lay, nil
}

// nearStepSources is nearStep for several sources: the nearest receptor
// downstream of any source face.
func nearStepSources(p *Problem3D) float64 {
	x := math.Inf(1)
	for _, r := range p.Receptors {
		for _, s := range p.Sources {
			if d := r.X - s.X; d > 0 {
				x = math.Min(x, d)
			}
		}
	}
	return p.R * x / (p.V * stepsPerTravel)
}
