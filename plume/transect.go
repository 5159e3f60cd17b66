package plume

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// transectPlan is a transect in canonical units and the first source's
// plume frame: the line from p0 along the unit vector dir for length, over
// depths top..bottom.
type transectPlan struct {
	id          string
	p0          [2]float64 // plume frame of the first source, m
	site0       [2]float64 // site frame, m
	dir, siteD  [2]float64 // unit vectors along the line (plume, site)
	length      float64    // m
	top, bottom float64    // m
	normal      float64    // |component of the flow direction normal to the line|
	streamFlow  *float64   // m^3/d
	level       *float64   // mg/L
	floor       float64    // discharges below it are reported as 0, g/d
}

// newTransectPlan places a canonical transect.
func (m *model) newTransectPlan(t Transect, i int) transectPlan {
	tp := transectPlan{id: t.ID, site0: t.From, streamFlow: t.StreamFlow, level: t.ScreeningLevel}
	if tp.id == "" {
		tp.id = fmt.Sprintf("T%d", i+1)
	}
	dx, dy := t.To[0]-t.From[0], t.To[1]-t.From[1]
	tp.length = math.Hypot(dx, dy)
	tp.siteD = [2]float64{dx / tp.length, dy / tp.length}
	x0, y0 := m.frame.ToPlume(t.From[0], t.From[1])
	x1, y1 := m.frame.ToPlume(t.To[0], t.To[1])
	tp.p0 = [2]float64{x0, y0}
	tp.dir = [2]float64{(x1 - x0) / tp.length, (y1 - y0) / tp.length}
	tp.normal = math.Abs(tp.dir[1]) // flow runs along the plume frame's x axis
	tp.top = derefOr(t.Top, 0)
	tp.bottom = *t.Bottom
	return tp
}

// point is the transect's depth interval at distance s along the line.
func (m *model) transectPoint(tp *transectPlan, s float64) Point {
	p := Point{Top: tp.top, Bottom: tp.bottom, Screen: tp.bottom > tp.top, hasSite: true}
	p.site = [2]float64{tp.site0[0] + s*tp.siteD[0], tp.site0[1] + s*tp.siteD[1]}
	p.X, p.Y = tp.p0[0]+s*tp.dir[0], tp.p0[1]+s*tp.dir[1]
	m.classify(&p)
	return p
}

// massDischarge is the advective mass discharge through the transect at
// elapsed time tau (d; +Inf: steady state), g/d: the Darcy flux n_e v
// times its component normal to the line, times the integral of the
// concentration over the line and the depth interval (mg/L m^3/d = g/d).
// The depth integral is the closed form's screen average times the
// interval; the line integral is Gauss-Legendre quadrature (transectNodes
// nodes, gonum quad.Legendre) on panels about four transverse spreads wide,
// placed around each source's plume where the line crosses it; the
// concentration changes across the plume on the scale of that spread, so
// the rule is accurate far beyond 1e-7 (checked against 30-digit
// references in transect_test.go).
func (m *model) massDischarge(tp *transectPlan, exact bool, tau float64) float64 {
	if tp.normal == 0 || !(tau > 0) {
		return 0
	}
	f := func(s float64) float64 { return m.closedForm(exact, m.transectPoint(tp, s), tau) }
	tiny := 1e-3 * ConcentrationFloorFraction * m.referenceConcentration()
	total := 0.0
	for _, w := range m.transectWindows(tp, tau) {
		if !w.plume && negligible(f, w.a, w.b, tiny) {
			continue // a tail beyond eight transverse spreads of every plume
		}
		n := max(1, int(math.Ceil((w.b-w.a)/w.panel)))
		h := (w.b - w.a) / float64(n)
		for k := range n {
			a := w.a + float64(k)*h
			total += quad.Fixed(f, a, a+h, transectNodes, quad.Legendre{}, 0)
		}
	}
	depth := tp.bottom - tp.top
	return m.porosity * m.v * tp.normal * depth * total
}

// transectNodes is the Gauss-Legendre order of a transect panel.
const transectNodes = 16

// negligible reports whether f stays below tiny at five points of [a, b].
func negligible(f func(float64) float64, a, b, tiny float64) bool {
	for k := range 5 {
		if f(a+(b-a)*float64(k)/4) > tiny {
			return false
		}
	}
	return true
}

// transectWindow is a stretch of the line: inside a plume (integrated on
// panels of about four transverse spreads) or outside every plume.
type transectWindow struct {
	a, b  float64
	plume bool
	panel float64
}

// transectWindows splits [0, length] at the edges of each source's plume
// where the line crosses its axis: the source's half-width plus eight
// transverse spreads sqrt(2 D_y t'/R) (t' the retarded travel time, at
// most tau), measured along the line. Outside these windows the
// concentration is negligible, so a narrow plume in a long transect is
// never missed by the quadrature.
func (m *model) transectWindows(tp *transectPlan, tau float64) []transectWindow {
	type span struct{ a, b, panel float64 }
	var spans []span
	sin := math.Abs(tp.dir[1])
	for i := range m.sourceCount() {
		src := m.source(i)
		// Where the line meets the source's axis (y = 0 in its own frame).
		a := m.localPoint(m.transectPoint(tp, 0), i)
		b := m.localPoint(m.transectPoint(tp, tp.length), i)
		if a.Y == b.Y {
			continue
		}
		s := tp.length * a.Y / (a.Y - b.Y)
		q := m.localPoint(m.transectPoint(tp, math.Max(0, math.Min(tp.length, s))), i)
		x := math.Max(q.X, 0)
		if src.kind == SourceKindInstantaneous {
			x = math.Hypot(q.X, q.Y)
		}
		aq := m.aquiferFor(q)
		t := x * m.r / m.v
		if !math.IsInf(tau, 1) {
			t = math.Min(t, tau-src.lag)
		}
		spread := math.Sqrt(2*aq.disp[1]*math.Max(t, 0)/m.r) + 1e-3
		half := 8 * spread
		if src.kind == SourceKind3D {
			half += src.width / 2
		}
		w := half / math.Max(sin, 1e-12)
		spans = append(spans, span{s - w, s + w, 4 * spread / math.Max(sin, 1e-12)})
	}
	breaks := []float64{0, tp.length}
	for _, sp := range spans {
		for _, e := range []float64{sp.a, (sp.a + sp.b) / 2, sp.b} {
			if e > 0 && e < tp.length {
				breaks = append(breaks, e)
			}
		}
	}
	breaks = sortedUnique(breaks)
	out := make([]transectWindow, 0, len(breaks)-1)
	for k := 1; k < len(breaks); k++ {
		w := transectWindow{a: breaks[k-1], b: breaks[k], panel: math.Inf(1)}
		mid := (w.a + w.b) / 2
		for _, sp := range spans {
			if mid > sp.a && mid < sp.b {
				w.plume = true
				w.panel = math.Min(w.panel, sp.panel)
			}
		}
		out = append(out, w)
	}
	return out
}

// sortedUnique sorts xs and drops repeats.
func sortedUnique(xs []float64) []float64 {
	for i := 1; i < len(xs); i++ {
		for j := i; j > 0 && xs[j] < xs[j-1]; j-- {
			xs[j], xs[j-1] = xs[j-1], xs[j]
		}
	}
	return uniq(xs)
}

// screenTransects computes every transect's mass discharge at the
// requested times and at steady state, with the primary method; values in
// canonical units (g/d, mg/L), converted by fromCanonical.
func (m *model) screenTransects(c Scenario, sp screenPlan) []TransectResult {
	if len(c.Transects) == 0 {
		return nil
	}
	exact := sp.primaryExact || m.kind == SourceKindInstantaneous
	method := MethodExact
	if !exact {
		method = MethodDomenico
	}
	// Discharges below ConcentrationFloorFraction of the sources' own are
	// reported as 0, as concentrations below the floor are.
	floor := 0.0
	for i := range m.sourceCount() {
		s := m.source(i)
		floor += ConcentrationFloorFraction * m.faceFlow(s) * s.c0
	}
	out := make([]TransectResult, len(c.Transects))
	for i, t := range c.Transects {
		tp := m.newTransectPlan(t, i)
		tp.floor = floor
		tr := TransectResult{ID: tp.id, Length: tp.length, Top: tp.top, Bottom: tp.bottom, Method: method,
			Series: make([]TransectPoint, len(sp.taus))}
		for j, tau := range sp.taus {
			tr.Series[j] = TransectPoint{Time: sp.reqTimes[j], TransectValue: tp.value(m.massDischarge(&tp, exact, tau))}
		}
		tr.SteadyState = tp.value(m.massDischarge(&tp, exact, math.Inf(1)))
		out[i] = tr
	}
	return out
}

// value completes a mass discharge, g/d, with the stream concentration,
// mg/L, and its comparison with the transect's level.
func (tp *transectPlan) value(md float64) TransectValue {
	if md < tp.floor {
		md = 0
	}
	v := TransectValue{MassDischarge: md}
	if tp.streamFlow != nil {
		c := md / *tp.streamFlow // g/d over m^3/d = g/m^3 = mg/L
		v.StreamConcentration = &c
		if tp.level != nil {
			v.ExceedsScreeningLevel = new(c >= *tp.level && c > 0)
		}
	}
	return v
}
