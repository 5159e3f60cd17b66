package api

import (
	"fmt"
	"math"
	"sort"

	"downgradient/plots"
	"downgradient/plume"
	"downgradient/plume/maps"
)

// Figure kinds of POST /v1/plots and of the report.
const (
	kindBreakthrough = "breakthrough"
	kindProfile      = "profile"
	kindMap          = "map"
	kindSection      = "section"
)

// denseSteps is the number of intervals of a drawn breakthrough curve or profile.
const denseSteps = 160

// methodNames are the methods in words (legends, tables, the footer).
var methodNames = map[string]string{
	plume.MethodExact:    "exact (time integral)",
	plume.MethodDomenico: "Domenico (1987) approximation",
	plume.MethodNumeric:  "finite-volume cross-check",
}

// shortMethodNames are the methods' names in a compact legend.
var shortMethodNames = map[string]string{
	plume.MethodExact:    "exact",
	plume.MethodDomenico: "Domenico (1987)",
	plume.MethodNumeric:  "finite volume",
}

// methodLabel is a method's name in a legend (short: a compact figure's).
func methodLabel(m string, markers, short bool) string {
	l := methodNames[m]
	if short {
		l = shortMethodNames[m]
	}
	if markers {
		l += ", requested times"
	}
	return l
}

// markOf is a receptor's mark: its outcome picks the symbol, its peak
// orders the labels.
func markOf(rr plume.ReceptorResult, x, y float64) plots.Mark {
	m := plots.Mark{Label: rr.ID, X: x, Y: y, Status: plots.MarkBelow, Weight: rr.Peak.Concentration}
	switch {
	case rr.Status == plume.StatusUpgradient || rr.ExceedsScreeningLevel == nil:
		m.Status, m.Weight = plots.MarkNotCompared, 0
	case *rr.ExceedsScreeningLevel:
		m.Status = plots.MarkExceeds
	}
	return m
}

// breakthroughData is the breakthrough plot of receptor i of the view v
// (one compound): the closed forms as dense curves (dr: the receptor in a
// screening at denseTimes, seen through the same compound), the numeric
// values at the requested times as markers (when it ran), the first
// exceedance of the primary method.
func breakthroughData(v memoView, dr plume.ReceptorResult, i int, o figureOptions) plots.Breakthrough {
	res := v.Res
	rr := res.Receptors[i]
	b := plots.Breakthrough{Receptor: rr.ID, Compound: v.Name, TimeUnit: res.Units.Time, ConcUnit: res.Units.Concentration,
		ScreeningLevel: res.Derived.ScreeningLevel, FirstExceedance: rr.FirstExceedanceTime, Scale: o.Scale,
		Floor: res.Derived.ConcentrationFloor, Compact: o.compact}
	if rr.Status == plume.StatusUpgradient {
		b.Receptor += " (not modelled)"
	}
	for _, m := range []string{plume.MethodExact, plume.MethodDomenico} {
		c := plots.Curve{Label: methodLabel(m, false, o.compact), Method: m}
		for _, sp := range dr.Series {
			if v := plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric); v != nil {
				c.X, c.Y = append(c.X, sp.Time), append(c.Y, *v)
			}
		}
		if len(c.X) > 0 {
			b.Curves = append(b.Curves, c)
		}
	}
	num := plots.Curve{Label: methodLabel(plume.MethodNumeric, true, o.compact), Method: plume.MethodNumeric, Markers: true}
	for _, sp := range rr.Series {
		if sp.Numeric != nil {
			num.X, num.Y = append(num.X, sp.Time), append(num.Y, *sp.Numeric)
		}
	}
	if len(num.X) > 0 {
		b.Curves = append(b.Curves, num)
	}
	return b
}

// compoundsBreakthroughData is the breakthrough plot of receptor i with a
// line per compound of several (views): each compound's primary method,
// the one its results-table row shows (primaryMethod: the closed form
// where one gives the compound, densely from dense, the screening of the
// plotted receptors at denseTimes; else the finite-volume values at the
// requested times, as points joined by lines), and each compound's level
// with its first exceedance.
func compoundsBreakthroughData(views []memoView, dense *plume.Result, di, i int, o figureOptions) (plots.Breakthrough, error) {
	res := views[0].Res
	rr := res.Receptors[i]
	b := plots.Breakthrough{Receptor: rr.ID, TimeUnit: res.Units.Time, ConcUnit: res.Units.Concentration, Scale: o.Scale,
		Floor: res.Derived.ConcentrationFloor, Compact: o.compact}
	if rr.Status == plume.StatusUpgradient {
		b.Receptor += " (not modelled)"
	}
	for _, v := range views {
		m := primaryMethod(methodsRan(v.Res))
		c := plots.Curve{Compound: v.Name, Method: m, Label: shortMethodNames[m]}
		cr := v.Res.Receptors[i]
		if m == plume.MethodNumeric {
			c.Points = true
			for _, sp := range cr.Series {
				if sp.Numeric != nil {
					c.X, c.Y = append(c.X, sp.Time), append(c.Y, *sp.Numeric)
				}
			}
		} else if hasValues(cr, m) {
			dv, err := dense.Focus(v.Name)
			if err != nil {
				return b, err
			}
			for _, sp := range dv.Receptors[di].Series {
				if val := plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric); val != nil {
					c.X, c.Y = append(c.X, sp.Time), append(c.Y, *val)
				}
			}
		}
		switch {
		case cr.Status == plume.StatusUpgradient:
			c.Label = "not modelled"
		case len(c.X) == 0:
			c.Label = "no values"
		}
		b.Curves = append(b.Curves, c)
		if l := v.Res.Derived.ScreeningLevel; l != nil {
			b.Levels = append(b.Levels, plots.CompoundLevel{Compound: v.Name, Level: *l, FirstExceedance: cr.FirstExceedanceTime})
		}
	}
	return b, nil
}

// hasValues reports whether method m gave the receptor a value at some
// requested time or at steady state (a compound no closed form gives has
// none, whatever its dense curve holds at time 0).
func hasValues(rr plume.ReceptorResult, m string) bool {
	if plume.MethodValue(m, rr.SteadyState.Exact, rr.SteadyState.Domenico, rr.SteadyState.Numeric) != nil {
		return true
	}
	for _, sp := range rr.Series {
		if plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric) != nil {
			return true
		}
	}
	return false
}

// profileData turns a centreline profile into plot data (the profile of
// the compound of v).
func profileData(pr *maps.Profile, v memoView, o figureOptions) plots.Profile {
	res := v.Res
	p := plots.Profile{LengthUnit: res.Units.Length, ConcUnit: res.Units.Concentration, Depth: pr.Depth, Compound: v.Name,
		ScreeningLevel: pr.ScreeningLevel, Labels: o.Labels, Floor: res.Derived.ConcentrationFloor}
	for _, c := range pr.Curves {
		label := "steady state"
		if !c.Time.Steady {
			label = fmt.Sprintf("%s %s after the release began", plots.FormatNumber(c.Time.Value), res.Units.Time)
		}
		p.Curves = append(p.Curves, plots.Curve{Label: label, X: pr.X, Y: c.C})
	}
	for _, rr := range res.Receptors {
		if rr.PlumeX > 0 && rr.Status != plume.StatusUpgradient {
			p.Receptors = append(p.Receptors, markOf(rr, rr.PlumeX, 0))
		}
	}
	return p
}

// whenText is a map time in words.
func whenText(t maps.MapTime, timeUnit string) string {
	if t.Steady {
		return "at steady state"
	}
	return fmt.Sprintf("%s %s after the release began", plots.FormatNumber(t.Value), timeUnit)
}

// mapData turns a plan-view map into plot data: the outlines, every
// source's face and zone, and the receptors by outcome (the map and v are
// of one compound).
func mapData(mp *maps.Map, v memoView, sc plume.Scenario, o figureOptions) plots.PlanMap {
	u := mp.Units
	depth := fmt.Sprintf("%s %s below the water table", plots.FormatNumber(mp.Depth), u.Length)
	if mp.Depth == 0 {
		depth = "at the water table"
	}
	if mp.DepthBottom != nil {
		depth = fmt.Sprintf("averaged over %s-%s %s depth", plots.FormatNumber(mp.Depth), plots.FormatNumber(*mp.DepthBottom), u.Length)
	}
	g := mp.Grid
	pm := plots.PlanMap{
		Title:      compoundTitle(v.Name, fmt.Sprintf("Plume %s, %s (%s solution)", whenText(mp.Time, u.Time), depth, mp.Method)),
		FitTitle:   v.Name != "",
		LengthUnit: u.Length, ConcUnit: u.Concentration, Labels: o.Labels,
		XMin: g.X0, XMax: g.X(g.NX - 1), YMin: g.Y0, YMax: g.Y(g.NY - 1),
		FlowAzimuthDeg: mp.Frame.AzimuthDeg,
		Outlines:       sortedOutlines(mp),
		Sources:        sourceShapes(sc),
	}
	for i, r := range mp.Receptors {
		pm.Receptors = append(pm.Receptors, markOf(v.Res.Receptors[i], r.X, r.Y))
	}
	return pm
}

// sortedOutlines are a map's outlines, lowest level first.
func sortedOutlines(mp *maps.Map) []plots.Outline {
	idx := make([]int, len(mp.Outlines))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return mp.Outlines[idx[a]].Level < mp.Outlines[idx[b]].Level })
	out := make([]plots.Outline, 0, len(idx))
	for _, i := range idx {
		out = append(out, plots.Outline{Level: mp.Outlines[i].Level, Geometry: mp.Outlines[i].Geometry})
	}
	return out
}

// sectionCorridor is the half-width, in the map's length unit, of the
// strip either side of the plume axis whose receptors a section shows
// (projected onto it): the source width, or a tenth of the section's
// length when larger.
func sectionCorridor(mp *maps.Map) float64 {
	g := mp.Grid
	return math.Max(mp.SourceWidth, (g.X(g.NX-1)-g.X0)/10)
}

// sectionData turns a vertical section map into plot data: the receptors
// within sectionCorridor of the axis, screens as bars.
func sectionData(mp *maps.Map, v memoView, sc plume.Scenario, o figureOptions) plots.Section {
	u, g, res := mp.Units, mp.Grid, v.Res
	s := plots.Section{
		Title:      compoundTitle(v.Name, fmt.Sprintf("Section along the plume axis %s (%s solution)", whenText(mp.Time, u.Time), mp.Method)),
		FitTitle:   v.Name != "",
		LengthUnit: u.Length, ConcUnit: u.Concentration, Labels: o.Labels,
		Outlines: sortedOutlines(mp),
		XMin:     g.X0, XMax: g.X(g.NX - 1), DepthMax: g.Y(g.NY - 1),
	}
	if src := sc.PrimarySource(); res.Derived.SourceKind == plume.SourceKind3D && src.Depth != nil {
		s.SourceDepth = *src.Depth
	}
	corridor := sectionCorridor(mp)
	for _, rr := range res.Receptors {
		if math.Abs(rr.PlumeY) > corridor || rr.PlumeX < s.XMin || rr.PlumeX > s.XMax {
			continue
		}
		m := markOf(rr, rr.PlumeX, rr.Z)
		if rr.ScreenTop != nil && rr.ScreenBottom != nil {
			m.Y, m.Bottom = *rr.ScreenTop, *rr.ScreenBottom
		}
		s.Receptors = append(s.Receptors, m)
	}
	return s
}

// receptorOrder lists receptor indices as the verdict table does:
// exceedances first, then by decreasing peak concentration; receptors not
// modelled last.
func receptorOrder(res *plume.Result) []int {
	idx := make([]int, len(res.Receptors))
	for i := range idx {
		idx[i] = i
	}
	key := func(i int) (bool, float64) {
		rr := res.Receptors[i]
		if rr.Status == plume.StatusUpgradient {
			return false, -1
		}
		return rr.ExceedsScreeningLevel != nil && *rr.ExceedsScreeningLevel, rr.Peak.Concentration
	}
	sort.SliceStable(idx, func(a, b int) bool {
		ea, pa := key(idx[a])
		eb, pb := key(idx[b])
		if ea != eb {
			return ea
		}
		return pa > pb
	})
	return idx
}
