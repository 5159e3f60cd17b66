package maps

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"downgradient/internal/contour"
	"downgradient/plume"
)

// CaveatMapResolution notes that the map grid is coarse next to the source.
const CaveatMapResolution = "map_grid_coarse"

// PlumeLengthMethod says how Map.SteadyPlumeLength is found.
const PlumeLengthMethod = "root of the steady-state exact solution along the centreline (y = 0) at the map depth: bracketed by doubling, then bisection to 1e-9 relative"

// PlumeMap computes a gridded concentration field of a scenario, the
// outlines of its levels and the steady-state plume length (DESIGN.md
// section 4b). Validation failures come back as an *plume.Error of kind
// KindInvalid (paths of the request body: "scenario.aquifer...",
// "levels[0]", "time"); a grid over the limits as kind KindOverLimit; a
// cancelled ctx as ctx.Err(). The grid is evaluated on all cores.
func PlumeMap(ctx context.Context, sc plume.Scenario, mo MapOptions, opt plume.Options) (*Map, error) {
	opt = opt.WithDefaults()
	md, err := prepareMap(sc, mo)
	if err != nil {
		return nil, err
	}
	method := mo.Method
	if method == "" {
		method = plume.MethodExact
	}
	view := mo.View
	if view == "" {
		view = ViewPlan
	}
	mt := MapTime{Steady: true}
	if mo.Time != nil {
		mt = *mo.Time
	}
	// Derived parameters and caveats exactly as a screening reports them.
	res, err := md.With([]string{method}, nil).Screen(ctx, opt)
	if err != nil {
		return nil, err
	}
	levels, err := mapLevels(md, mo)
	if err != nil {
		return nil, err
	}
	ev := newEvaluator(md, method == plume.MethodExact, mt, mo, view)
	g, err := ev.grid(ctx, view, mo, levels)
	if err != nil {
		return nil, err
	}
	out := newMap(md, res, mo, view, mt, method, &ev)
	uf := md.Factors()
	// Grid and levels in the request's units.
	g.X0, g.Y0, g.DX, g.DY = g.X0/uf.L, g.Y0/uf.L, g.DX/uf.L, g.DY/uf.L
	floor := md.ConcentrationFloor()
	for i, v := range g.Values {
		g.Values[i] = plume.FloorConcentration(plume.Clean(v), floor) / uf.C
	}
	out.Grid = g
	for _, l := range levels {
		lv := l / uf.C
		out.Levels = append(out.Levels, lv)
		out.Outlines = append(out.Outlines, outlineOf(&g, lv, view, out.Frame))
	}
	out.addLengthAndCaveats(md, &ev, &g)
	return out, nil
}

// prepareMap validates the map options and the scenario together (every
// bad field at once) and prepares the scenario.
func prepareMap(sc plume.Scenario, mo MapOptions) (*plume.Model, error) {
	bad, over := validateMapOptions(mo)
	md, err := plume.Prepare(sc)
	if err != nil {
		if e, ok := plume.AsError(err); ok && e.Kind == plume.KindInvalid {
			bad = append(e.Fields.Prefixed("scenario."), bad...)
		} else {
			return nil, err
		}
	}
	if md != nil {
		if focused, err := md.Focus(mo.Compound); err != nil {
			bad = append(bad, plume.FieldsOf(err)...)
		} else {
			md = focused
		}
	}
	if len(bad) == 0 {
		bad = checkOptionsFinite(md, mo)
	}
	if len(bad) > 0 {
		return nil, bad.Err()
	}
	if len(over) > 0 {
		return nil, over.OverLimit("the map is over the limits")
	}
	return md, nil
}

// checkOptionsFinite refuses options that are valid one by one but whose
// canonical values overflow: a time beyond float64 once in days, and a
// plan-view extent whose corners overflow in the plume frame (far from
// the source).
func checkOptionsFinite(md *plume.Model, mo MapOptions) plume.FieldErrors {
	var bad plume.FieldErrors
	uf := md.Factors()
	if t := mo.Time; t != nil && !t.Steady && !plume.Finite(md.Elapsed(t.Value)) {
		bad.Add("time", fmt.Sprintf("out of range: %g %s is beyond the floating-point range in days", t.Value, md.Units().Time))
	}
	if e := mo.Extent; e != nil && mo.View != ViewSection {
		fr := md.Frame()
		for _, c := range [][2]float64{{e.XMin, e.YMin}, {e.XMax, e.YMin}, {e.XMin, e.YMax}, {e.XMax, e.YMax}} {
			px, py := fr.ToPlume(c[0]*uf.L, c[1]*uf.L)
			if !plume.Finite(px) || !plume.Finite(py) || !plume.Finite(px-py) {
				bad.Add("extent", "the extent lies too far from the source: its distances from the source overflow")
				break
			}
		}
	}
	return bad
}

// mapLevels are the outline levels, canonical: the given ones, else the
// screening level and 10 and 100 times it.
func mapLevels(md *plume.Model, mo MapOptions) ([]float64, error) {
	uf := md.Factors()
	var levels []float64
	if len(mo.Levels) > 0 {
		for _, l := range mo.Levels {
			levels = append(levels, l*uf.C)
		}
	} else if s, ok := md.ScreeningLevel(); ok {
		levels = []float64{s, 10 * s, 100 * s}
	} else {
		return nil, plume.Invalid("levels", "no screening level is known (give scenario.contaminant.screening_level or a compound of the reference table), so give the levels")
	}
	return levels, nil
}

// newEvaluator sets the method, time and depths of a map.
func newEvaluator(md *plume.Model, exact bool, mt MapTime, mo MapOptions, view string) mapEvaluator {
	uf := md.Factors()
	ev := mapEvaluator{md: md, exact: exact, tau: math.Inf(1)}
	if !mt.Steady {
		ev.tau = md.Elapsed(mt.Value)
	}
	if mo.Depth != nil {
		ev.top = *mo.Depth * uf.L
	}
	ev.bot = ev.top
	if mo.DepthBottom != nil && view == ViewPlan {
		ev.bot = *mo.DepthBottom * uf.L
	}
	return ev
}

// grid lays out the nodes (the given extent, or one around the plume
// above the lowest level) and fills them, canonical units.
func (ev *mapEvaluator) grid(ctx context.Context, view string, mo MapOptions, levels []float64) (contour.Grid, error) {
	uf := ev.md.Factors()
	lowest := math.Inf(1)
	for _, l := range levels {
		lowest = math.Min(lowest, l)
	}
	var g contour.Grid
	var err error
	if mo.Extent != nil {
		e := *mo.Extent
		e = Extent{e.XMin * uf.L, e.XMax * uf.L, e.YMin * uf.L, e.YMax * uf.L}
		g, err = layout(e, view, mo, uf)
	} else {
		g, err = layout(ev.autoExtent(ctx, view, lowest), view, mo, uf)
	}
	if err != nil {
		return contour.Grid{}, err
	}
	if err := ev.fill(ctx, &g, view, ev.md.Frame()); err != nil {
		return contour.Grid{}, err
	}
	return g, nil
}

// newMap fills the map's description from the model and the screening res.
func newMap(md *plume.Model, res *plume.Result, mo MapOptions, view string, mt MapTime, method string, ev *mapEvaluator) *Map {
	uf, sc := md.Factors(), md.Scenario()
	out := &Map{
		Engine:    plume.Engine{Version: res.Engine.Version, InputSHA256: mapInputSHA256(sc, mo)},
		Units:     md.Units(),
		View:      view,
		Time:      mt,
		Depth:     ev.top / uf.L,
		Method:    method,
		Derived:   res.Derived,
		Caveats:   res.Caveats,
		Frame:     md.SiteFrame(),
		CRS:       sc.CRS,
		Receptors: make([]MapPoint, len(res.Receptors)),
	}
	if mo.DepthBottom != nil && view == ViewPlan {
		out.DepthBottom = plume.Ptr(ev.bot / uf.L)
	}
	if src := md.SourceTerm(); src.Kind == plume.SourceKind3D {
		out.SourceWidth = src.Width / uf.L
	}
	for i, rr := range res.Receptors {
		if view == ViewSection {
			out.Receptors[i] = MapPoint{ID: rr.ID, X: rr.PlumeX, Y: rr.Z}
		} else {
			out.Receptors[i] = MapPoint{ID: rr.ID, X: *sc.Receptors[i].X, Y: *sc.Receptors[i].Y}
		}
	}
	return out
}

// addLengthAndCaveats adds the steady plume length and the resolution note.
func (out *Map) addLengthAndCaveats(md *plume.Model, ev *mapEvaluator, g *contour.Grid) {
	uf, units, src := md.Factors(), md.Units(), md.SourceTerm()
	if s, ok := md.ScreeningLevel(); ok {
		pl := &PlumeLength{Level: s / uf.C, Depth: ev.top / uf.L, Method: PlumeLengthMethod}
		if L, ok := ev.steadyLength(s); ok {
			pl.Length = plume.Ptr(L / uf.L)
		}
		out.SteadyPlumeLength = pl
	}
	if w := src.Width; src.Kind == plume.SourceKind3D && math.Max(g.DX, g.DY)*uf.L > w/2 {
		out.Caveats = append(out.Caveats, plume.Caveat{Code: CaveatMapResolution, Severity: plume.SeverityNote, Message: fmt.Sprintf(
			"The map's nodes are %.4g %s apart, more than half the source width (%.4g %s): outlines are interpolated between nodes, so features narrower than about two node spacings are smoothed. Ask for more cells or a smaller extent for detail.",
			math.Max(g.DX, g.DY), units.Length, w/uf.L, units.Length)})
	}
}

// mapInputSHA256 hashes the canonical JSON of the scenario and the map options.
func mapInputSHA256(sc plume.Scenario, mo MapOptions) string {
	b, err := json.Marshal(struct {
		Scenario plume.Scenario `json:"scenario"`
		MapOptions
	}{sc, mo})
	if err != nil {
		b = []byte(err.Error())
	}
	sum := sha256.Sum256(b)
	return hex.EncodeToString(sum[:])
}

// mapEvaluator evaluates the chosen closed form, canonical units.
type mapEvaluator struct {
	md       *plume.Model
	exact    bool
	tau      float64 // elapsed time since the source started, d (+Inf: steady)
	top, bot float64 // depth interval of a plan view, m
}

// method is the evaluator's method name.
func (ev *mapEvaluator) method() string {
	if ev.exact {
		return plume.MethodExact
	}
	return plume.MethodDomenico
}

// at is the concentration at plume-frame (px, py) over depths [top, bot], mg/L.
func (ev *mapEvaluator) at(px, py, top, bot float64) float64 {
	return ev.md.Value(ev.method(), ev.md.Locate(px, py, top, bot), ev.tau)
}

// steadyLength finds the centreline distance where the steady-state exact
// concentration falls to level, m; ok false when it does not within
// MaxPlumeLength or the source is not constant and continuous. A compound
// formed by decay (none at the source face) rises downgradient before it
// falls: its length is where it falls to level beyond the first of the
// distances 1, 2, 4, ... m at which it is above it; 0 when it is above it
// at none.
func (ev *mapEvaluator) steadyLength(level float64) (float64, bool) {
	md := ev.md
	if !md.SourceTerm().Continuous {
		return 0, false
	}
	f := func(x float64) float64 {
		p := plume.Point{X: x, Top: ev.top, Bottom: ev.bot, Screen: ev.bot > ev.top}
		return md.Value(plume.MethodExact, p, math.Inf(1)) - level
	}
	lo := 1e-6
	for x := 1.0; f(lo) < 0; x *= 2 {
		if x > MaxPlumeLength {
			return 0, true
		}
		lo = x
	}
	hi := 2 * max(lo, 0.5)
	for f(hi) >= 0 {
		lo = hi
		hi *= 2
		if hi > MaxPlumeLength {
			return 0, false
		}
	}
	for range 200 {
		mid := 0.5 * (lo + hi)
		if f(mid) >= 0 {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo <= 1e-9*hi {
			break
		}
	}
	return 0.5 * (lo + hi), true
}

// autoExtent is the default extent, canonical: the region above the lowest
// level (found along the centreline and across it), the source and the
// receptors, with margins. Plan: site x, y; section: plume_x, depth.
func (ev *mapEvaluator) autoExtent(ctx context.Context, view string, lowest float64) Extent {
	src, fr := ev.md.SourceTerm(), ev.md.Frame()
	top, bot := ev.top, ev.bot
	if view == ViewSection {
		top, bot = 0, 0
	}
	// Reach along the centreline: a geometric scan (the front of a spill or
	// of a finite release may be detached from the source).
	reach := 0.0
	for x := 0.25; x <= 1e5 && ctx.Err() == nil; x *= 1.15 {
		if ev.at(x, 0, top, bot) >= lowest {
			reach = x * 1.15
		}
	}
	w := 0.0
	if src.Kind == plume.SourceKind3D {
		w = src.Width
	}
	pad := math.Max(math.Max(w, 0.05*reach), 2)
	// Half-width (plan) or depth reach (section) at stations along the plume.
	spread := 0.0
	for s := 1; s <= 10 && reach > 0 && ctx.Err() == nil; s++ {
		x := reach * float64(s) / 10
		g := func(d float64) bool {
			if view == ViewSection {
				return ev.at(x, 0, d, d) >= lowest
			}
			return ev.at(x, d, top, bot) >= lowest
		}
		if !g(0) {
			continue
		}
		hi := math.Max(w/2, 1)
		for g(hi) && hi < 1e5 {
			hi *= 2
		}
		lo := 0.0
		for range 30 {
			mid := 0.5 * (lo + hi)
			if g(mid) {
				lo = mid
			} else {
				hi = mid
			}
		}
		spread = math.Max(spread, hi)
	}
	if view == ViewSection {
		zmax := math.Max(spread*1.15, 1)
		if src.Kind == plume.SourceKind3D {
			zmax = math.Max(zmax, 1.5*src.Depth)
		}
		xmax := math.Max(reach*1.05+pad, 10*pad)
		return Extent{XMin: -pad, XMax: xmax, YMin: 0, YMax: zmax}
	}
	half := math.Max(spread*1.1+pad/2, math.Max(w, 5))
	xmax := math.Max(reach*1.05+pad, 10*pad)
	b := orb.Bound{Min: orb.Point{math.Inf(1), math.Inf(1)}, Max: orb.Point{math.Inf(-1), math.Inf(-1)}}
	for _, pc := range [][2]float64{{-pad, -half}, {xmax, -half}, {xmax, half}, {-pad, half}} {
		x, y := fr.ToSite(pc[0], pc[1])
		b = b.Extend(orb.Point{x, y})
	}
	for _, r := range ev.md.Canonical().Receptors {
		b = b.Extend(orb.Point{*r.X, *r.Y})
	}
	mx := 0.04 * math.Max(b.Max[0]-b.Min[0], b.Max[1]-b.Min[1])
	return Extent{b.Min[0] - mx, b.Max[0] + mx, b.Min[1] - mx, b.Max[1] + mx}
}

// niceStep rounds a spacing up to 1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6 or 8 times
// a power of ten, so that grid coordinates are round numbers.
func niceStep(d float64) float64 {
	if !(d > 0) || !plume.Finite(d) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(d)))
	for _, k := range []float64{1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10} {
		if k*p >= d*(1-1e-12) {
			return k * p
		}
	}
	return 10 * p
}

// layout chooses the nodes of a grid covering e (canonical) within the
// node budget, with round spacings and an origin on a multiple of them.
func layout(e Extent, view string, mo MapOptions, uf plume.UnitFactors) (contour.Grid, error) {
	budget := DefaultMapCells
	if mo.Cells != nil {
		budget = *mo.Cells
	}
	w, h := e.XMax-e.XMin, e.YMax-e.YMin
	// Round numbers in the request's unit.
	nice := func(d float64) float64 { return niceStep(d/uf.L) * uf.L }
	var dx, dy float64
	switch {
	case view == ViewPlan && mo.Spacing != nil:
		dx, dy = *mo.Spacing*uf.L, *mo.Spacing*uf.L
	case view == ViewPlan:
		d := math.Sqrt(w * h / float64(budget))
		for dx = nice(d); (math.Floor(w/dx)+2)*(math.Floor(h/dx)+2) > float64(budget); dx = nice(dx * 1.01) {
		}
		dy = dx
	case mo.Spacing != nil:
		dx = *mo.Spacing * uf.L
		dy = nice(h / 50)
	default:
		nz := math.Max(11, math.Min(201, math.Round(math.Sqrt(float64(budget)/4))))
		dy = nice(h / (nz - 1))
		nzz := math.Floor(h/dy) + 2
		for dx = nice(w / (float64(budget)/nzz - 1)); (math.Floor(w/dx)+2)*nzz > float64(budget); dx = nice(dx * 1.01) {
		}
	}
	x0 := math.Floor(e.XMin/dx) * dx
	y0 := math.Floor(e.YMin/dy) * dy
	if view == ViewSection {
		y0 = math.Max(y0, 0)
	}
	nxf := math.Ceil((e.XMax-x0)/dx*(1-1e-12)) + 1
	nyf := math.Ceil((e.YMax-y0)/dy*(1-1e-12)) + 1
	if mo.Spacing == nil && nxf*nyf > float64(budget) {
		// Rounding the origin down added a row or column: drop it.
		nxf = math.Min(nxf, math.Floor(float64(budget)/nyf))
	}
	// Negated so that a NaN (an origin or a count that overflowed) is over.
	if !(nxf*nyf <= MaxMapCells && nxf <= MaxMapCells && nyf <= MaxMapCells) ||
		!plume.Finite(x0+nxf*dx) || !plume.Finite(y0+nyf*dy) {
		return contour.Grid{}, plume.FieldErrors{{Field: "spacing", Message: fmt.Sprintf(
			"the grid would hold %.0f x %.0f nodes; at most %d allowed: give a larger spacing or a smaller extent", nxf, nyf, MaxMapCells)}}.OverLimit("the map is over the limits")
	}
	nx, ny := max(int(nxf), 2), max(int(nyf), 2)
	return contour.Grid{X0: x0, Y0: y0, DX: dx, DY: dy, NX: nx, NY: ny, Values: make([]float64, nx*ny)}, nil
}

// fill evaluates every node of g (canonical) on all cores, row by row,
// stopping when ctx is done.
func (ev *mapEvaluator) fill(ctx context.Context, g *contour.Grid, view string, fr plume.Frame) error {
	workers := min(runtime.GOMAXPROCS(0), g.NY, 8)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				j := int(next.Add(1) - 1)
				if j >= g.NY || ctx.Err() != nil {
					return
				}
				y := g.Y(j)
				row := g.Values[j*g.NX : (j+1)*g.NX]
				for i := range row {
					x := g.X(i)
					if view == ViewSection {
						row[i] = ev.at(x, 0, y, y)
					} else {
						px, py := fr.ToPlume(x, y)
						row[i] = ev.at(px, py, ev.top, ev.bot)
					}
				}
			}
		}()
	}
	wg.Wait()
	return ctx.Err()
}

// outlineOf contours g at level and measures the outline; fr is the flow
// frame in the grid's unit (plan view).
func outlineOf(g *contour.Grid, level float64, view string, fr plume.Frame) Outline {
	o := Outline{Level: level, Geometry: contour.Contour(g, level)}
	if o.Geometry == nil {
		o.Geometry = orb.MultiPolygon{}
	}
	if len(o.Geometry) == 0 {
		return o
	}
	o.Area = planar.Area(o.Geometry)
	o.Perimeter = planar.Length(o.Geometry)
	minX, maxX, minY, maxY := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, poly := range o.Geometry {
		for _, p := range poly[0] {
			px, py := p[0], p[1]
			if view == ViewPlan {
				px, py = fr.ToPlume(p[0], p[1])
			}
			minX, maxX = math.Min(minX, px), math.Max(maxX, px)
			minY, maxY = math.Min(minY, py), math.Max(maxY, py)
		}
	}
	o.Length, o.Width, o.Reach = maxX-minX, maxY-minY, maxX
	return o
}
