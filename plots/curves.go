package plots

import (
	"fmt"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Curve is one line of a plot: Y against X (same length), finite numbers.
type Curve struct {
	// Label in the legend (a method name, or a time).
	Label string
	// Compound the values are of, when a figure shows several; empty for
	// the scenario's one compound (the legend then does not name it).
	Compound string
	// Method ("exact", "domenico", "numeric") picks the line style; empty
	// for a time in a profile.
	Method string
	X, Y   []float64
	// Markers draws symbols only (values at the requested times).
	Markers bool
	// Points draws symbols at the values joined by straight lines (values
	// at the requested times only, in a figure of several compounds).
	Points bool
}

// legendLabel is the curve's legend text, with its compound when named.
func (c Curve) legendLabel() string {
	if c.Compound == "" {
		return c.Label
	}
	return c.Compound + ", " + c.Label
}

// Scales of a concentration axis.
const (
	// ScaleAuto is logarithmic when the values to show span more than two
	// decades (see BreakthroughFigure), else linear.
	ScaleAuto = "auto"
	// ScaleLinear is a linear axis from 0.
	ScaleLinear = "linear"
	// ScaleLog is a logarithmic axis.
	ScaleLog = "log"
)

// segments splits a curve into the runs of points whose value is at least
// floor, so that a line stops where the value falls below what the axis
// shows instead of running along it; ys are mapped by tr.
func segments(c Curve, floor float64, tr func(float64) float64) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	for i := range c.X {
		if !(c.Y[i] >= floor) {
			if len(cur) > 0 {
				out = append(out, cur)
				cur = nil
			}
			continue
		}
		cur = append(cur, plotter.XY{X: c.X[i], Y: tr(c.Y[i])})
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// curveStyle is the colour and dash pattern of curve c: its method's, or
// (ramp > 0, no method) colour k of a ramp of n.
func curveStyle(c Curve, k, ramp int) draw.LineStyle {
	clr, dash := methodStyle(c.Method)
	if ramp > 0 && c.Method == "" {
		clr, dash = timeRamp(k, ramp), nil
	}
	return draw.LineStyle{Color: clr, Width: vg.Points(2), Dashes: dash}
}

// addCurves draws the curves, each stopped where it falls below floor
// (values mapped by tr): methods in their styles, or (ramp > 0) times along
// a colour ramp. A curve with nothing to draw still gets its legend entry,
// marked "(below the axis)".
func addCurves(f *Figure, curves []Curve, ramp int, floor float64, tr func(float64) float64) error {
	k := 0
	for _, c := range curves {
		if len(c.X) == 0 {
			continue
		}
		ls := curveStyle(c, k, ramp)
		if ramp > 0 && c.Method == "" {
			k++
		}
		if err := drawCurve(f, c, ls, floor, tr); err != nil {
			return err
		}
	}
	return nil
}

// drawCurve draws curve c in style ls, stopped where it falls below floor
// (values mapped by tr), and adds its legend entry.
func drawCurve(f *Figure, c Curve, ls draw.LineStyle, floor float64, tr func(float64) float64) error {
	segs := segments(c, floor, tr)
	label := c.legendLabel()
	if len(segs) == 0 {
		label += " (below the axis)"
	}
	if c.Markers {
		return addMarkers(f, c, segs, ls, label)
	}
	var first *plotter.Line
	var all plotter.XYs
	for _, s := range segs {
		ln, err := plotter.NewLine(s)
		if err != nil {
			return err
		}
		ln.LineStyle = ls
		f.Plot.Add(ln)
		if first == nil {
			first = ln
		}
		all = append(all, s...)
	}
	if first == nil {
		first = &plotter.Line{LineStyle: ls}
	}
	if !c.Points {
		f.addLegend(label, first)
		return nil
	}
	gs := draw.GlyphStyle{Color: ls.Color, Radius: vg.Points(2.8), Shape: methodGlyph(c.Method)}
	if len(all) > 0 {
		sc, err := plotter.NewScatter(all)
		if err != nil {
			return err
		}
		sc.GlyphStyle = gs
		f.Plot.Add(sc)
	}
	f.addLegend(label, first, glyphThumb{gs})
	return nil
}

// addMarkers draws a curve as symbols only.
func addMarkers(f *Figure, c Curve, segs []plotter.XYs, ls draw.LineStyle, label string) error {
	var all plotter.XYs
	for _, s := range segs {
		all = append(all, s...)
	}
	gs := draw.GlyphStyle{Color: ls.Color, Radius: vg.Points(3.2), Shape: methodGlyph(c.Method)}
	if len(all) == 0 {
		f.addLegend(label, glyphThumb{gs})
		return nil
	}
	sc, err := plotter.NewScatter(all)
	if err != nil {
		return err
	}
	sc.GlyphStyle = gs
	f.Plot.Add(sc)
	f.addLegend(label, sc)
	return nil
}

// glyphThumb is a legend thumbnail of one symbol.
type glyphThumb struct{ draw.GlyphStyle }

func (g glyphThumb) Thumbnail(c *draw.Canvas) {
	c.DrawGlyph(g.GlyphStyle, c.Center())
}

// addLevelLineAt draws the screening level across the plot at axis value y.
func addLevelLineAt(f *Figure, y, level float64, unit string) {
	fn := plotter.NewFunction(func(float64) float64 { return y })
	fn.LineStyle = levelStyle()
	fn.Samples = 2
	f.Plot.Add(fn)
	f.addLegend(fmt.Sprintf("screening level %s %s", FormatNumber(level), unit), fn)
}

// levelStyle is the dash-dot line of a screening level.
func levelStyle() draw.LineStyle {
	return draw.LineStyle{Color: limitRed, Width: vg.Points(1.4), Dashes: []vg.Length{vg.Points(8), vg.Points(3), vg.Points(2), vg.Points(3)}}
}

func gridLines() *plotter.Grid {
	g := plotter.NewGrid()
	g.Vertical.Color = gridGrey
	g.Horizontal.Color = gridGrey
	g.Vertical.Width = vg.Points(0.6)
	g.Horizontal.Width = vg.Points(0.6)
	return g
}
