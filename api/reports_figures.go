package api

import (
	"context"
	"fmt"
	"sort"

	"github.com/paulmach/orb"

	"downgradient/plots"
	"downgradient/plume"
	"downgradient/plume/maps"
)

// Figure kinds of POST /v1/plots and of the report.
const (
	kindBreakthrough = "breakthrough"
	kindProfile      = "profile"
	kindMap          = "map"
)

// denseSteps is the number of intervals of a drawn breakthrough curve or profile.
const denseSteps = 160

// methodLabel is a method's name in a legend.
func methodLabel(m string, markers bool) string {
	l := map[string]string{
		plume.MethodExact:    "exact (time integral)",
		plume.MethodDomenico: "Domenico (1987) approximation",
		plume.MethodNumeric:  "finite-volume cross-check",
	}[m]
	if markers {
		l += ", requested times"
	}
	return l
}

// breakthroughData is the breakthrough plot of receptor i: the closed forms
// as dense curves (dense is a screening at DenseTimes), the numeric values
// at the requested times as markers (from res, when it ran).
func breakthroughData(res, dense *plume.Result, i int) plots.Breakthrough {
	b := plots.Breakthrough{Receptor: res.Receptors[i].ID, TimeUnit: res.Units.Time, ConcUnit: res.Units.Concentration,
		ScreeningLevel: res.Derived.ScreeningLevel}
	dr := dense.Receptors[i]
	for _, m := range []string{plume.MethodExact, plume.MethodDomenico} {
		c := plots.Curve{Label: methodLabel(m, false), Method: m}
		for _, sp := range dr.Series {
			if v := plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric); v != nil {
				c.X, c.Y = append(c.X, sp.Time), append(c.Y, *v)
			}
		}
		if len(c.X) > 0 {
			b.Curves = append(b.Curves, c)
		}
	}
	num := plots.Curve{Label: methodLabel(plume.MethodNumeric, true), Method: plume.MethodNumeric, Markers: true}
	for _, sp := range res.Receptors[i].Series {
		if sp.Numeric != nil {
			num.X, num.Y = append(num.X, sp.Time), append(num.Y, *sp.Numeric)
		}
	}
	if len(num.X) > 0 {
		b.Curves = append(b.Curves, num)
	}
	return b
}

// profileData turns a centreline profile into plot data.
func profileData(pr *maps.Profile, res *plume.Result) plots.Profile {
	p := plots.Profile{LengthUnit: res.Units.Length, ConcUnit: res.Units.Concentration, Depth: pr.Depth,
		ScreeningLevel: pr.ScreeningLevel}
	for _, c := range pr.Curves {
		label := "steady state"
		if !c.Time.Steady {
			label = fmt.Sprintf("%g %s after the release began", c.Time.Value, res.Units.Time)
		}
		p.Curves = append(p.Curves, plots.Curve{Label: label, X: pr.X, Y: c.C})
	}
	for _, rr := range res.Receptors {
		if rr.PlumeX > 0 {
			p.Receptors = append(p.Receptors, plots.Mark{Label: rr.ID, X: rr.PlumeX})
		}
	}
	return p
}

// mapData turns a plan-view map into plot data: the outlines, the source
// face and zone (one source width upgradient of the face, the convention of
// the receptor_inside_source caveat) and the receptors.
func mapData(mp *maps.Map) plots.PlanMap {
	u := mp.Units
	when := "at steady state"
	if !mp.Time.Steady {
		when = fmt.Sprintf("%g %s after the release began", mp.Time.Value, u.Time)
	}
	depth := fmt.Sprintf("%g %s below the water table", mp.Depth, u.Length)
	if mp.Depth == 0 {
		depth = "at the water table"
	}
	if mp.DepthBottom != nil {
		depth = fmt.Sprintf("averaged over %g-%g %s depth", mp.Depth, *mp.DepthBottom, u.Length)
	}
	g := mp.Grid
	pm := plots.PlanMap{
		Title:      fmt.Sprintf("Plume %s, %s (%s solution)", when, depth, mp.Method),
		LengthUnit: u.Length, ConcUnit: u.Concentration,
		XMin: g.X0, XMax: g.X(g.NX - 1), YMin: g.Y0, YMax: g.Y(g.NY - 1),
		FlowAzimuthDeg: mp.Frame.AzimuthDeg,
	}
	// Outlines lowest level first.
	idx := make([]int, len(mp.Outlines))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return mp.Outlines[idx[a]].Level < mp.Outlines[idx[b]].Level })
	for _, i := range idx {
		pm.Outlines = append(pm.Outlines, plots.Outline{Level: mp.Outlines[i].Level, Geometry: mp.Outlines[i].Geometry})
	}
	site := func(px, py float64) orb.Point {
		x, y := mp.Frame.ToSite(px, py)
		return orb.Point{x, y}
	}
	w := mp.SourceWidth
	pm.SourceFace = [2]orb.Point{site(0, -w/2), site(0, w/2)}
	if w > 0 {
		pm.SourceZone = orb.Ring{site(0, -w/2), site(0, w/2), site(-w, w/2), site(-w, -w/2), site(0, -w/2)}
	}
	for _, r := range mp.Receptors {
		pm.Receptors = append(pm.Receptors, plots.Mark{Label: r.ID, X: r.X, Y: r.Y})
	}
	return pm
}

// figureInputs are the computations the pictures need.
type figureInputs struct {
	res     *plume.Result
	dense   *plume.Result
	profile *maps.Profile
	planMap *maps.Map
}

// computeFigures runs what the requested kinds need (nil kinds: all).
func (s *server) computeFigures(ctx context.Context, sc plume.Scenario, res *plume.Result, kinds map[string]bool) (*figureInputs, error) {
	opt := s.engineOptions()
	fi := &figureInputs{res: res}
	var err error
	if kinds == nil || kinds[kindBreakthrough] {
		if fi.dense, err = maps.Breakthroughs(ctx, sc, maps.DenseTimes(sc, res, denseSteps), opt); err != nil {
			return nil, err
		}
	}
	if kinds == nil || kinds[kindProfile] {
		if fi.profile, err = maps.CentrelineProfile(ctx, sc, 0, denseSteps, opt); err != nil {
			return nil, err
		}
	}
	if kinds == nil || kinds[kindMap] {
		mo := maps.MapOptions{Levels: maps.FigureLevels(sc, res.Derived.ScreeningLevel)}
		if fi.planMap, err = maps.PlumeMap(ctx, sc, mo, opt); err != nil {
			return nil, err
		}
	}
	return fi, nil
}

// receptorOrder lists receptor indices by decreasing peak concentration.
func receptorOrder(res *plume.Result) []int {
	idx := make([]int, len(res.Receptors))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool {
		return res.Receptors[idx[a]].Peak.Concentration > res.Receptors[idx[b]].Peak.Concentration
	})
	return idx
}
