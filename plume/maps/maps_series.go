package maps

import (
	"context"
	"math"

	"downgradient/plume"
)

// DenseTimes returns n+1 evenly spaced times from 0 to a horizon, in the
// request's time unit, for drawing breakthrough curves: the horizon is the
// largest requested time, or (when larger, or when none was requested) twice
// the retarded travel time R x / v to the farthest receptor downgradient,
// rounded up to a round number. res is a screening of the same scenario.
func DenseTimes(sc plume.Scenario, res *plume.Result, n int) []float64 {
	horizon := 0.0
	for _, t := range sc.Times {
		horizon = math.Max(horizon, t)
	}
	far := 0.0
	for _, rr := range res.Receptors {
		far = math.Max(far, rr.PlumeX)
	}
	if v := res.Derived.SeepageVelocity; v > 0 && far > 0 {
		horizon = math.Max(horizon, 2*res.Derived.Retardation*far/v)
	}
	if sc.Source.Start != nil {
		horizon += *sc.Source.Start
	}
	if !(horizon > 0) || !plume.Finite(horizon) {
		horizon = 1
	}
	horizon = niceStep(horizon)
	n = max(n, 2)
	ts := make([]float64, n+1)
	for i := range ts {
		ts[i] = horizon * float64(i) / float64(n)
	}
	return ts
}

// Breakthroughs screens sc at the given times with its closed-form methods
// only (the numeric cross-check is not rerun for a curve), for drawing.
func Breakthroughs(ctx context.Context, sc plume.Scenario, times []float64, opt plume.Options) (*plume.Result, error) {
	d := sc
	d.Times = times
	d.Methods = nil
	for _, m := range sc.Methods {
		if m != plume.MethodNumeric {
			d.Methods = append(d.Methods, m)
		}
	}
	if len(d.Methods) == 0 {
		d.Methods = []string{plume.MethodExact, plume.MethodDomenico}
	}
	return plume.Screen(ctx, d, opt)
}

// ProfileCurve is the centreline concentration at one time.
type ProfileCurve struct {
	Time MapTime
	// Concentration at each Profile.X, C.
	C []float64
}

// Profile is concentration along the plume centreline (y = 0) at a depth,
// in the request's units.
type Profile struct {
	// Depth below the water table, L.
	Depth float64
	// Distances along the flow from the source face, L.
	X []float64
	// One curve per requested time, then the steady state.
	Curves []ProfileCurve
	// Screening level, C; nil when none is known.
	ScreeningLevel *float64
	// Method used ("exact").
	Method string
}

// CentrelineProfile evaluates the exact solution along the centreline at
// depth (L) at every time of sc and at steady state, at n+1 distances from
// the source face to beyond the farthest receptor and the steady-state
// reach of a hundredth of the screening level (at most MaxPlumeLength).
// compound names the compound of a scenario of several ("" for the first,
// or for a scenario of one); one no closed form gives is refused as
// plume.Model.Focus refuses it (KindInvalid on the field "compound").
func CentrelineProfile(ctx context.Context, sc plume.Scenario, compound string, depth float64, n int, opt plume.Options) (*Profile, error) {
	md, err := plume.Prepare(sc)
	if err != nil {
		return nil, err
	}
	if compound != "" {
		if md, err = md.Focus(compound); err != nil {
			return nil, err
		}
	}
	uf := md.Factors()
	maxX := 0.0
	for _, p := range md.Receptors() {
		maxX = math.Max(maxX, p.X)
	}
	level, haveLevel := md.ScreeningLevel()
	ev := mapEvaluator{md: md, exact: true, top: depth * uf.L, bot: depth * uf.L}
	xmax := maxX * 1.1
	if haveLevel {
		if L, ok := ev.steadyLength(level / 100); ok {
			xmax = math.Max(xmax, L)
		}
	}
	xmax = niceStep(math.Min(math.Max(xmax, 10), MaxPlumeLength))
	n = max(n, 2)
	pr := &Profile{Depth: depth, Method: plume.MethodExact, X: make([]float64, n+1)}
	if haveLevel {
		pr.ScreeningLevel = plume.Ptr(level / uf.C)
	}
	xs := make([]float64, n+1)
	for i := range xs {
		// Denser near the source, where the profile falls fastest.
		f := float64(i) / float64(n)
		xs[i] = xmax * (0.3*f + 0.7*f*f)
		pr.X[i] = xs[i] / uf.L
	}
	times := make([]MapTime, 0, len(sc.Times)+1)
	for _, t := range sc.Times {
		times = append(times, MapTime{Value: t})
	}
	times = append(times, MapTime{Steady: true})
	for _, t := range times {
		ev.tau = math.Inf(1)
		if !t.Steady {
			ev.tau = md.Elapsed(t.Value)
		}
		cv := make([]float64, len(xs))
		for i, x := range xs {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			cv[i] = plume.FloorConcentration(plume.Clean(ev.at(math.Max(x, 1e-6), 0, ev.top, ev.bot)), md.ConcentrationFloor()) / uf.C
		}
		pr.Curves = append(pr.Curves, ProfileCurve{Time: t, C: cv})
	}
	return pr, nil
}
