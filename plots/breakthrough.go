package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Breakthrough is the data of a breakthrough-curve plot at one receptor.
type Breakthrough struct {
	// Receptor identifier, for the title.
	Receptor string
	// Compound shown, named in the title when a scenario has several.
	Compound string
	// Units of time and concentration, for the axis labels.
	TimeUnit, ConcUnit string
	// Curves: every method (and, later, every compound), as lines (dense)
	// or markers (requested times).
	Curves []Curve
	// Screening level, drawn as a horizontal line and always within the
	// axis range; nil for none.
	ScreeningLevel *float64
	// Time the concentration first reaches the screening level, marked on
	// the level with its value; nil when it never does.
	FirstExceedance *float64
	// Scale of the concentration axis: ScaleAuto (default), ScaleLinear or ScaleLog.
	Scale string
	// Floor: concentrations below it are reported as 0; a log axis never
	// reaches below it.
	Floor float64
	// Compact lays the figure out for half a page width (legend below).
	Compact bool
	// Levels are the screening levels of a figure of several compounds
	// (whose curves name their Compound), one per compound that has one:
	// each drawn across the plot in its compound's colour, with the
	// compound's first exceedance ringed on it. ScreeningLevel and
	// FirstExceedance are those of a figure of one compound.
	Levels []CompoundLevel
}

// CompoundLevel is one compound's screening level in a breakthrough
// figure of several compounds.
type CompoundLevel struct {
	Compound string
	Level    float64
	// FirstExceedance is the time the compound first reaches Level; nil
	// when it never does.
	FirstExceedance *float64
}

// LogDecades is the ratio between the larger and the smaller of the peak
// concentration and the screening level above which ScaleAuto picks a
// logarithmic axis (two decades).
const LogDecades = 100

// UsesLog reports whether the figure of b has a logarithmic axis: under
// ScaleAuto when the peak and the screening levels (every compound's, in a
// figure of several) span more than LogDecades.
func (b Breakthrough) UsesLog() bool {
	lv := b.levels()
	switch b.Scale {
	case ScaleLog:
		return b.peak() > 0 || len(lv) > 0
	case ScaleLinear:
		return false
	}
	pk := b.peak()
	if len(lv) == 0 || !(pk > 0) {
		return false
	}
	lo, hi := pk, pk
	for _, l := range lv {
		lo, hi = math.Min(lo, l), math.Max(hi, l)
	}
	return hi/lo > LogDecades
}

// levels are the figure's screening levels: its one compound's, or every
// compound's of several.
func (b Breakthrough) levels() []float64 {
	var out []float64
	if b.ScreeningLevel != nil {
		out = append(out, *b.ScreeningLevel)
	}
	for _, l := range b.Levels {
		out = append(out, l.Level)
	}
	return out
}

// several reports whether b is a figure of several compounds.
func (b Breakthrough) several() bool {
	if len(b.Levels) > 0 {
		return true
	}
	for _, c := range b.Curves {
		if c.Compound != "" {
			return true
		}
	}
	return false
}

// compoundIndex numbers the compounds of a figure of several in the order
// its curves, then its levels, first name them: compound k is drawn in
// compoundStyle(k).
func (b Breakthrough) compoundIndex() map[string]int {
	idx := map[string]int{}
	add := func(name string) {
		if _, ok := idx[name]; !ok {
			idx[name] = len(idx)
		}
	}
	for _, c := range b.Curves {
		add(c.Compound)
	}
	for _, l := range b.Levels {
		add(l.Compound)
	}
	return idx
}

// peak is the largest value of the curves.
func (b Breakthrough) peak() float64 {
	pk := 0.0
	for _, c := range b.Curves {
		for _, v := range c.Y {
			pk = math.Max(pk, v)
		}
	}
	return pk
}

// BreakthroughFigure is concentration against time at one receptor, every
// method on one plot, with the screening level as a line and the first
// exceedance marked; or, for several compounds, a line per compound (each
// curve names its Compound) with every compound's level in its colour (see
// addCompounds). The concentration axis is logarithmic when UsesLog (two
// decades below the smallest of the peak and the levels, never below
// Floor), else linear from 0; either way every level lies inside it.
func BreakthroughFigure(b Breakthrough) (*Figure, error) {
	logAxis := b.UsesLog()
	ylabel := fmt.Sprintf("Concentration (%s)", b.ConcUnit)
	if logAxis {
		ylabel = fmt.Sprintf("Concentration (%s, log scale)", b.ConcUnit)
	}
	title := fmt.Sprintf("Breakthrough at %s", b.Receptor)
	if b.Compound != "" {
		title = fmt.Sprintf("%s at %s", b.Compound, b.Receptor)
	}
	f := newFigure(title,
		fmt.Sprintf("Time since the release began (%s)", b.TimeUnit), ylabel)
	if b.Compact {
		compact(f)
	}
	p := f.Plot
	p.Add(gridLines())
	xmax := 0.0
	for _, c := range b.Curves {
		for _, x := range c.X {
			xmax = math.Max(xmax, x)
		}
	}
	if !(xmax > 0) {
		xmax = 1
	}
	p.X.Min, p.X.Max = 0, xmax
	p.X.Tick.Marker = roundTicks{}
	floor, tr := b.concentrationAxis(f, logAxis)
	if b.several() {
		if err := addCompounds(f, b, xmax, floor, tr); err != nil {
			return nil, err
		}
		return f, nil
	}
	if err := addCurves(f, b.Curves, 0, floor, tr); err != nil {
		return nil, err
	}
	if b.ScreeningLevel != nil {
		addLevelLineAt(f, tr(*b.ScreeningLevel), *b.ScreeningLevel, b.ConcUnit)
		if t := b.FirstExceedance; t != nil && *t >= 0 && *t <= xmax {
			if err := markFirstExceedance(f, *t, tr(*b.ScreeningLevel), b.TimeUnit); err != nil {
				return nil, err
			}
		}
	}
	return f, nil
}

// concentrationAxis sets the range and ticks of the concentration axis and
// returns the lowest value drawn and the map from a concentration to the
// axis (log10 on a log axis: gonum's own log scale misplaces the centred
// axis label, so the axis holds log10 values labelled as concentrations).
func (b Breakthrough) concentrationAxis(f *Figure, logAxis bool) (float64, func(float64) float64) {
	p := f.Plot
	pk := b.peak()
	lv := b.levels()
	top, lowest, highest := pk, math.Inf(1), 0.0
	for _, l := range lv {
		top, lowest, highest = math.Max(top, l), math.Min(lowest, l), math.Max(highest, l)
	}
	if !logAxis {
		ymax := pk
		if len(lv) > 0 {
			ymax = math.Max(ymax, highest*1.5)
		}
		if !(ymax > 0) {
			ymax = 1
		}
		p.Y.Min, p.Y.Max = 0, ymax*1.08
		p.Y.Tick.Marker = roundTicks{}
		return 0, func(v float64) float64 { return v }
	}
	low := top
	if len(lv) > 0 {
		low = lowest
		if pk > 0 {
			low = math.Min(pk, lowest)
		}
	}
	lo := math.Floor(math.Log10(low) - 2)
	if b.Floor > 0 {
		lo = math.Max(lo, math.Log10(b.Floor))
	}
	if len(lv) > 0 && lo > math.Log10(lowest)-0.3 {
		// A level at or below the floor: still in view, a little above the bottom.
		lo = math.Floor(math.Log10(lowest) - 0.3)
	}
	hi := math.Log10(top * 2)
	if hi-lo < 1 {
		lo = hi - 1
	}
	p.Y.Min, p.Y.Max = lo, hi
	p.Y.Tick.Marker = decadeTicks{}
	return math.Pow(10, lo), math.Log10
}

// markFirstExceedance draws a ring on the level at time t, a thin line
// down to the time axis, and a legend entry with the time.
func markFirstExceedance(f *Figure, t, y float64, unit string) error {
	p := f.Plot
	drop, err := plotter.NewLine(plotter.XYs{{X: t, Y: p.Y.Min}, {X: t, Y: y}})
	if err != nil {
		return err
	}
	drop.LineStyle = draw.LineStyle{Color: limitRed, Width: vg.Points(0.8), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}
	p.Add(drop)
	sc, err := plotter.NewScatter(plotter.XYs{{X: t, Y: y}})
	if err != nil {
		return err
	}
	sc.GlyphStyle = draw.GlyphStyle{Color: limitRed, Radius: vg.Points(4.5), Shape: draw.RingGlyph{}}
	p.Add(sc)
	f.addLegend(fmt.Sprintf("first at the level: %s %s", FormatNumber(t), unit), sc)
	return nil
}
