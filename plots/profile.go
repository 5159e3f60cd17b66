package plots

import (
	"fmt"
	"math"
)

// Profile is the data of a centreline profile: concentration against the
// distance along the flow from the source face, at several times.
type Profile struct {
	// Units, for the axis labels.
	LengthUnit, ConcUnit string
	// Depth of the centreline below the water table, for the title.
	Depth float64
	// Compound shown, named in the title when a scenario has several.
	Compound string
	// One curve per time (Label "3650 d" or "steady state").
	Curves []Curve
	// Screening level, drawn as a horizontal line; nil for none.
	ScreeningLevel *float64
	// Receptors' distances along the flow (X), marked along the top of the
	// plot with their ids under the label policy.
	Receptors []Mark
	// Labels: LabelAuto (default), LabelAll, LabelExceedances or LabelNone.
	Labels string
	// Floor: concentrations below it are reported as 0; the axis never
	// reaches below it.
	Floor float64
}

// ProfileFigure is concentration (log scale) along the plume centreline at
// the chosen times. The axis reaches five decades below the highest value
// (and a decade below the level); each curve stops where it falls below
// the axis rather than running along it.
func ProfileFigure(pr Profile) (*Figure, error) {
	title := "Centreline profile at the water table"
	if pr.Depth > 0 {
		title = fmt.Sprintf("Centreline profile, %s %s below the water table", FormatNumber(pr.Depth), pr.LengthUnit)
	}
	if pr.Compound != "" {
		title = pr.Compound + ": c" + title[1:]
	}
	f := newFigure(title,
		fmt.Sprintf("Distance downgradient of the source face (%s)", pr.LengthUnit),
		fmt.Sprintf("Concentration (%s, log scale)", pr.ConcUnit))
	p := f.Plot
	// The axis holds log10 of the concentration (gonum's log scale
	// misplaces a centred axis label), labelled as concentrations.
	p.Y.Tick.Marker = decadeTicks{}
	p.X.Tick.Marker = roundTicks{}
	ymax, xmax := 0.0, 0.0
	for _, c := range pr.Curves {
		for i := range c.Y {
			ymax = math.Max(ymax, c.Y[i])
			xmax = math.Max(xmax, c.X[i])
		}
	}
	if !(ymax > 0) {
		ymax = 1
	}
	floor := ymax * 1e-5
	if pr.ScreeningLevel != nil {
		floor = math.Min(floor, *pr.ScreeningLevel/10)
		ymax = math.Max(ymax, *pr.ScreeningLevel*2)
	}
	if pr.Floor > 0 {
		floor = math.Max(floor, pr.Floor)
	}
	lo, hi := math.Log10(floor), math.Log10(ymax*2)
	p.X.Min, p.X.Max = 0, math.Max(xmax, 1)
	p.Y.Min, p.Y.Max = lo, hi
	p.Add(gridLines())
	if err := addCurves(f, pr.Curves, len(pr.Curves), floor, math.Log10); err != nil {
		return nil, err
	}
	if pr.ScreeningLevel != nil {
		addLevelLineAt(f, math.Log10(*pr.ScreeningLevel), *pr.ScreeningLevel, pr.ConcUnit)
	}
	// Receptors along the top edge, clear of the curves' low ends.
	var marks []Mark
	top := hi - 0.04*(hi-lo)
	for _, m := range pr.Receptors {
		if m.X >= 0 && m.X <= p.X.Max {
			m.Y = top
			marks = append(marks, m)
		}
	}
	ident := func(v float64) float64 { return v }
	if err := addMarks(f, marks, ident); err != nil {
		return nil, err
	}
	f.Overlays = append(f.Overlays, markLabels(marks, labelSpec{policy: policyOr(pr.Labels), tr: ident, stack: true}))
	return f, nil
}
