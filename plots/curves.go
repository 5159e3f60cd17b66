package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Curve is one line of a plot: Y against X (same length), finite numbers.
type Curve struct {
	// Label in the legend (a method name, or a time).
	Label string
	// Method ("exact", "domenico", "numeric") picks the line style; empty
	// for a time in a profile.
	Method string
	X, Y   []float64
	// Markers draws symbols only (values at the requested times).
	Markers bool
}

// Breakthrough is the data of a breakthrough-curve plot at one receptor.
type Breakthrough struct {
	// Receptor identifier, for the title.
	Receptor string
	// Units of time and concentration, for the axis labels.
	TimeUnit, ConcUnit string
	// Curves: every method, as lines (dense) or markers (requested times).
	Curves []Curve
	// Screening level, drawn as a horizontal line; nil for none.
	ScreeningLevel *float64
}

// BreakthroughFigure is concentration against time at one receptor, every
// method on one plot, with the screening level as a line.
func BreakthroughFigure(b Breakthrough) (*Figure, error) {
	f := newFigure(fmt.Sprintf("Breakthrough at %s", b.Receptor),
		fmt.Sprintf("Time since the release began (%s)", b.TimeUnit),
		fmt.Sprintf("Concentration (%s)", b.ConcUnit))
	p := f.Plot
	p.Add(gridLines())
	ymax, xmax := 0.0, 0.0
	for _, c := range b.Curves {
		for i := range c.Y {
			ymax = math.Max(ymax, c.Y[i])
			xmax = math.Max(xmax, c.X[i])
		}
	}
	if b.ScreeningLevel != nil {
		ymax = math.Max(ymax, *b.ScreeningLevel*1.5)
	}
	if !(ymax > 0) {
		ymax = 1
	}
	if !(xmax > 0) {
		xmax = 1
	}
	p.X.Min, p.X.Max = 0, xmax
	p.Y.Min, p.Y.Max = 0, ymax*1.08
	p.X.Tick.Marker = roundTicks{}
	p.Y.Tick.Marker = roundTicks{}
	if err := addCurves(f, b.Curves, 0); err != nil {
		return nil, err
	}
	if b.ScreeningLevel != nil {
		addLevelLine(f, *b.ScreeningLevel, b.ConcUnit)
	}
	return f, nil
}

// Profile is the data of a centreline profile: concentration against the
// distance along the flow from the source face, at several times.
type Profile struct {
	// Units, for the axis labels.
	LengthUnit, ConcUnit string
	// Depth of the centreline below the water table, for the title.
	Depth float64
	// One curve per time (Label "3650 d" or "steady state").
	Curves []Curve
	// Screening level, drawn as a horizontal line; nil for none.
	ScreeningLevel *float64
	// Receptors' distances along the flow, marked on the axis with their ids.
	Receptors []Mark
}

// Mark is a labelled position.
type Mark struct {
	Label string
	X, Y  float64
}

// ProfileFigure is concentration (log scale) along the plume centreline at
// the chosen times.
func ProfileFigure(pr Profile) (*Figure, error) {
	title := "Centreline profile at the water table"
	if pr.Depth > 0 {
		title = fmt.Sprintf("Centreline profile, %g %s below the water table", pr.Depth, pr.LengthUnit)
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
	p.X.Min, p.X.Max = 0, math.Max(xmax, 1)
	p.Y.Min, p.Y.Max = math.Log10(floor), math.Log10(ymax*2)
	p.Add(gridLines())
	// Clip each curve at the floor (a log axis cannot show 0).
	clipped := make([]Curve, len(pr.Curves))
	for k, c := range pr.Curves {
		cc := c
		cc.Y = make([]float64, len(c.Y))
		for i, v := range c.Y {
			cc.Y[i] = math.Log10(math.Max(v, floor))
		}
		clipped[k] = cc
	}
	if err := addCurves(f, clipped, len(clipped)); err != nil {
		return nil, err
	}
	if pr.ScreeningLevel != nil {
		addLevelLineAt(f, math.Log10(*pr.ScreeningLevel), *pr.ScreeningLevel, pr.ConcUnit)
	}
	if len(pr.Receptors) > 0 {
		xys := make(plotter.XYs, 0, len(pr.Receptors))
		labels := make([]string, 0, len(pr.Receptors))
		for _, m := range pr.Receptors {
			if m.X < 0 || m.X > p.X.Max {
				continue
			}
			xys = append(xys, plotter.XY{X: m.X, Y: math.Log10(floor)})
			labels = append(labels, m.Label)
		}
		if len(xys) > 0 {
			sc, err := plotter.NewScatter(xys)
			if err != nil {
				return nil, err
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: wellBlue, Radius: vg.Points(4), Shape: draw.PyramidGlyph{}}
			p.Add(sc)
			f.Legend.Add("receptor (distance along flow)", sc)
		}
	}
	return f, nil
}

// addCurves draws the curves: methods in their styles, or (ramp > 0) times
// along a colour ramp.
func addCurves(f *Figure, curves []Curve, ramp int) error {
	k := 0
	for _, c := range curves {
		if len(c.X) == 0 {
			continue
		}
		xys := make(plotter.XYs, len(c.X))
		for i := range c.X {
			xys[i] = plotter.XY{X: c.X[i], Y: c.Y[i]}
		}
		clr, dash := methodStyle(c.Method)
		if ramp > 0 && c.Method == "" {
			clr, dash = timeRamp(k, ramp), nil
			k++
		}
		if c.Markers {
			sc, err := plotter.NewScatter(xys)
			if err != nil {
				return err
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: clr, Radius: vg.Points(3.2), Shape: methodGlyph(c.Method)}
			f.Plot.Add(sc)
			f.Legend.Add(c.Label, sc)
			continue
		}
		ln, err := plotter.NewLine(xys)
		if err != nil {
			return err
		}
		ln.LineStyle = draw.LineStyle{Color: clr, Width: vg.Points(2), Dashes: dash}
		f.Plot.Add(ln)
		f.Legend.Add(c.Label, ln)
	}
	return nil
}

// addLevelLine draws the screening level across the plot.
func addLevelLine(f *Figure, level float64, unit string) { addLevelLineAt(f, level, level, unit) }

// addLevelLineAt draws the level at axis value y.
func addLevelLineAt(f *Figure, y, level float64, unit string) {
	fn := plotter.NewFunction(func(float64) float64 { return y })
	fn.LineStyle = draw.LineStyle{Color: limitRed, Width: vg.Points(1.4), Dashes: []vg.Length{vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)}}
	fn.Samples = 2
	f.Plot.Add(fn)
	f.Legend.Add(fmt.Sprintf("screening level %g %s", level, unit), fn)
}

func gridLines() *plotter.Grid {
	g := plotter.NewGrid()
	g.Vertical.Color = gridGrey
	g.Horizontal.Color = gridGrey
	g.Vertical.Width = vg.Points(0.6)
	g.Horizontal.Width = vg.Points(0.6)
	return g
}
