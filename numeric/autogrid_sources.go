package numeric

import "math"

// sourceDesign is a grid design of Problem3D with Sources, counted but not
// built: the axes (x relative to x0, y relative to y0) and the source
// faces relative to x0.
type sourceDesign struct {
	d      design3
	x0, y0 float64
	faces  []float64
	full   bool
}

// fieldCells is the number of cells the fields of the sources would hold.
func (s *sourceDesign) fieldCells() float64 {
	n := 0.0
	for _, f := range s.faces {
		n += s.d.x.cellsFrom(f)
	}
	return n * s.d.y.cells * s.d.z.cells
}

// layout builds the axes; only for a design that fits the budget.
func (s *sourceDesign) layout() layout3 {
	x, y, z := s.d.build()
	if s.full {
		f := make([]float64, len(y.Faces))
		for i, v := range y.Faces {
			f[i] = v + s.y0
		}
		y = Axis{Faces: f}
	}
	return layout3{x0: s.x0, x: x, y: y, z: z, full: s.full}
}

// designSources is designGrid3 for several sources (with one source on
// the axis at x = 0 it is the same design). Along x the domain starts at
// the most upstream face and every source face is a face of the grid,
// refined as the one source face is; the extent is the one of designGrid3
// with distances from the most upstream face, reaching the front or
// outflow layer beyond the most downstream face too. Across, every source
// edge and depth is a face refined as the one source's are (with the
// nearest receptor downstream of any face setting the scale), and the
// domain reaches 5 spreading lengths beyond the outermost edges: on the
// half y >= 0 when every source is on the axis, else on both sides
// (the whole width).
func designSources(p *Problem3D, scale float64) sourceDesign {
	ss := p.Sources
	sd := sourceDesign{x0: sourcesStart(ss), full: offAxis(ss)}
	xsMax := math.Inf(-1)
	for _, s := range ss {
		xsMax = math.Max(xsMax, s.X)
		sd.faces = append(sd.faces, s.X-sd.x0)
	}
	xrMax, zrMax := 0.0, 0.0
	xrMin := math.Inf(1)
	for _, r := range p.Receptors {
		xrMax = math.Max(xrMax, r.X-sd.x0)
		zrMax = math.Max(zrMax, r.Bottom)
		for _, s := range ss {
			if d := r.X - s.X; d > 0 {
				xrMin = math.Min(xrMin, d)
			}
		}
	}
	for _, t := range p.Transects {
		xrMax = math.Max(xrMax, t.X-sd.x0)
	}
	tl, steady := lastFinite(p.Times)
	front := math.Inf(1)
	if !steady {
		front = p.V*tl/p.R + 5*math.Sqrt(2*p.Dx*tl/p.R)
	}
	layer := 12 * p.Dx / p.V
	dS := xsMax - sd.x0
	lx := math.Max(xrMax, math.Min(dS+front, xrMax+layer))
	lx = math.Max(lx, dS+math.Min(front, layer))
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
	var xp []refinePoint
	for _, f := range sd.faces {
		xp = append(xp, refinePoint{f, hx0})
	}
	sd.d.x = newGradedAxis(lx, sd.faces, xp, hxMax, growthX, scale)
	sd.d.y, sd.y0 = p.designAcross(xRef, xEnd, sd.full, scale)
	sd.d.z = p.designDepth(xRef, xEnd, zrMax, scale)
	return sd
}

// designAcross is the y axis of designSources and its start y0 (0 on the
// half domain).
func (p *Problem3D) designAcross(xRef, xEnd float64, full bool, scale float64) (gradedAxis, float64) {
	sig := func(x float64) float64 { return math.Sqrt(2 * p.Dy * x / p.V) }
	hyMax := 0.5 * sig(xEnd)
	hy0 := make([]float64, len(p.Sources))
	for i, s := range p.Sources {
		hy0[i] = math.Min(0.5*s.Width/3, sig(xRef)/6)
		hyMax = math.Max(hy0[i], hyMax)
	}
	if !full {
		var breaks []float64
		var pts []refinePoint
		ly := 0.0
		for i, s := range p.Sources {
			b := 0.5 * s.Width
			breaks, pts = append(breaks, b), append(pts, refinePoint{b, hy0[i]})
			ly = math.Max(ly, b+5*sig(xEnd))
		}
		ly = math.Max(ly, maxOf(p.Receptors, func(r Receptor) float64 { return math.Abs(r.Y) })+hyMax*scale)
		return newGradedAxis(ly, breaks, pts, hyMax, growthYZ, scale), 0
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range p.Sources {
		b := 0.5 * s.Width
		lo, hi = math.Min(lo, s.Y-b-5*sig(xEnd)), math.Max(hi, s.Y+b+5*sig(xEnd))
	}
	for _, r := range p.Receptors {
		lo, hi = math.Min(lo, r.Y-hyMax*scale), math.Max(hi, r.Y+hyMax*scale)
	}
	var breaks []float64
	var pts []refinePoint
	for i, s := range p.Sources {
		b := 0.5 * s.Width
		for _, e := range []float64{s.Y - b - lo, s.Y + b - lo} {
			breaks, pts = append(breaks, e), append(pts, refinePoint{e, hy0[i]})
		}
	}
	return newGradedAxis(hi-lo, breaks, pts, hyMax, growthYZ, scale), lo
}

// designDepth is the z axis of designSources.
func (p *Problem3D) designDepth(xRef, xEnd, zrMax, scale float64) gradedAxis {
	sig := func(x float64) float64 { return math.Sqrt(2 * p.Dz * x / p.V) }
	hzMax := 0.5 * sig(xEnd)
	var breaks []float64
	var pts []refinePoint
	lz := 0.0
	for _, s := range p.Sources {
		h0 := math.Min(s.Depth/3, sig(xRef)/6)
		hzMax = math.Max(h0, hzMax)
		breaks, pts = append(breaks, s.Depth), append(pts, refinePoint{s.Depth, h0})
		lz = math.Max(lz, s.Depth+5*sig(xEnd))
	}
	lz = math.Max(lz, zrMax+hzMax*scale)
	return newGradedAxis(lz, breaks, pts, hzMax, growthYZ, scale)
}

// designSourcesFor designs the grid of several sources and builds it when
// its field cells fit the budget; otherwise it returns a BudgetError that
// says what would fit (found by counting only, as designFor does).
func designSourcesFor(p *Problem3D, budget int) (layout3, error) {
	refine := orDefault(p.Refine, 1) * defaultResolution
	d := designSources(p, 1/refine)
	need := d.fieldCells()
	b := float64(budget)
	if need <= b {
		return d.layout(), nil
	}
	lo, hi := 1/refine, 1/refine
	found := false
	for k := 0; k < 60 && !found; k++ {
		hi *= 2
		c := designSources(p, hi)
		found = c.fieldCells() <= b
	}
	what := "the grid of %d sources needs %.3g field cells (%s x %s x %s cells, each source's field covering the grid downstream of its face%s) for grid Peclet <= %.3g but the budget is %d"
	full := ""
	if d.full {
		full = "; the whole width, as a source is off the plume axis"
	}
	args := []any{len(p.Sources), need, fmtCount(d.d.x.cells), fmtCount(d.d.y.cells), fmtCount(d.d.z.cells), full, d.d.peclet(p, b), budget}
	if !found {
		return layout3{}, cellBudgetError("Problem3D.CellBudget", need, budget, what+", and even all spacings %.3g times coarser do not fit; reduce the extent of the domain (%.4g along flow: the farthest receptor, the latest time) or the number of sources",
			append(args, hi*refine, d.d.x.length())...)
	}
	for k := 0; k < 40; k++ {
		mid := math.Sqrt(lo * hi)
		if c := designSources(p, mid); c.fieldCells() <= b {
			hi = mid
		} else {
			lo = mid
		}
	}
	fit := designSources(p, hi)
	return layout3{}, cellBudgetError("Problem3D.CellBudget", need, budget, what+"; a budget of %d fits grid Peclet <= %.3g (all spacings %.3g times coarser), which is less accurate; raise CellBudget to at least %s or loosen PecletMax/Refine",
		append(args, budget, fit.d.peclet(p, b), hi*refine, fmtCount(need))...)
}
