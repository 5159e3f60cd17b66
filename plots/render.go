// Package plots draws the pictures of a screening with gonum.org/v1/plot:
// breakthrough curves at a receptor, the centreline profile and the plan
// view of the plume. It is pure rendering: it draws the numbers it is given
// (computed by package plume) and computes nothing of the model.
//
// Every figure has plain axis labels with units, a legend in a column to
// the right of the data, and colours and symbols of this project's own
// choosing (see style.go). Output is SVG or PNG.
package plots

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

func init() {
	// A sans-serif face reads better at small sizes (Liberation ships with gonum plot).
	plot.DefaultFont = font.Font{Typeface: "Liberation", Variant: "Sans"}
	plotter.DefaultFont = plot.DefaultFont
}

// Formats of Render.
const (
	SVG = "svg"
	PNG = "png"
)

// Default figure size.
var (
	DefaultWidth  = 7.2 * vg.Inch
	DefaultHeight = 4.2 * vg.Inch
)

// Figure is a plot with its legend drawn in a column to its right.
type Figure struct {
	Plot   *plot.Plot
	Legend plot.Legend
	// EqualScale keeps one data unit the same length along both axes (maps).
	EqualScale bool
	// Overlays are drawn over the data area after the plot (north arrow,
	// scale bar), with the plot's data transforms.
	Overlays []func(c draw.Canvas, x, y func(float64) vg.Length)
}

// newFigure returns a plot and legend in the house style.
func newFigure(title, xlabel, ylabel string) *Figure {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(13)
	p.Title.Padding = vg.Points(6)
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font.Size = vg.Points(11)
		ax.Tick.Label.Font.Size = vg.Points(9.5)
		ax.LineStyle.Color = inkGrey
		ax.Tick.LineStyle.Color = inkGrey
	}
	p.BackgroundColor = color.White
	lg := plot.NewLegend()
	lg.Top = true
	lg.Left = true
	lg.TextStyle.Font.Size = vg.Points(9.5)
	lg.ThumbnailWidth = vg.Points(22)
	lg.Padding = vg.Points(3)
	return &Figure{Plot: p, Legend: lg}
}

// Size is the figure's size for a width w: DefaultHeight, or for a figure
// at one scale on both axes the height that fits its data ranges (between
// 3 and 8 inches).
func (f *Figure) Size(w vg.Length) (vg.Length, vg.Length) {
	if !f.EqualScale {
		return w, DefaultHeight
	}
	p := f.Plot
	xr, yr := p.X.Max-p.X.Min, p.Y.Max-p.Y.Min
	if !(xr > 0) || !(yr > 0) {
		return w, DefaultHeight
	}
	// Approximate data width: less the legend column and the axis margins.
	dw := float64(w) - 2.3*float64(vg.Inch) - 60
	h := vg.Length(dw*yr/xr + 75)
	return w, vg.Length(math.Min(math.Max(float64(h), float64(3*vg.Inch)), float64(8*vg.Inch)))
}

// roundTicks places major ticks at 1, 2 or 5 times a power of ten, about
// six across the range, labelled without trailing zeros.
type roundTicks struct{}

func (roundTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return nil
	}
	step := math.Pow(10, math.Floor(math.Log10((hi-lo)/6)))
	for _, k := range []float64{1, 2, 5, 10} {
		if (hi-lo)/(k*step) <= 7 {
			step *= k
			break
		}
	}
	var ts []plot.Tick
	for v := math.Ceil(lo/step) * step; v <= hi+step*1e-9; v += step {
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(math.Round(v/step)*step, 'f', -1, 64)})
		for m := 1; m < 5; m++ {
			if mv := v + float64(m)*step/5; mv <= hi {
				ts = append(ts, plot.Tick{Value: mv})
			}
		}
	}
	return ts
}

// decadeTicks is the tick marker of an axis holding log10 of a value: the
// powers of ten within the range are labelled as plain numbers (0.001, 1,
// 100), with minor ticks at 2 to 9 times each power.
type decadeTicks struct{}

func (decadeTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	var ts []plot.Tick
	for e := math.Floor(lo); e <= math.Ceil(hi); e++ {
		if e >= lo && e <= hi {
			ts = append(ts, plot.Tick{Value: e, Label: strconv.FormatFloat(math.Pow(10, e), 'f', -1, 64)})
		}
		for k := 2.0; k <= 9; k++ {
			if v := e + math.Log10(k); v >= lo && v <= hi {
				ts = append(ts, plot.Tick{Value: v})
			}
		}
	}
	return ts
}

// Render draws f at the given size as SVG or PNG (150 dpi).
func Render(f *Figure, w, h vg.Length, format string) ([]byte, error) {
	var cw vg.CanvasWriterTo
	switch format {
	case SVG:
		cw = vgsvg.New(w, h)
	case PNG:
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(150), vgimg.UseBackgroundColor(color.White))}
	default:
		return nil, fmt.Errorf("plots: unknown format %q", format)
	}
	if err := f.draw(draw.New(cw)); err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if _, err := cw.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// legendWidth is the width of the legend column for f's entries.
func (f *Figure) legendWidth(c draw.Canvas) vg.Length {
	r := f.Legend.Rectangle(c)
	w := r.Max.X - r.Min.X
	return vg.Length(math.Min(float64(w+vg.Points(16)), float64(c.Max.X-c.Min.X)*0.38))
}

func (f *Figure) draw(c draw.Canvas) (err error) {
	defer func() {
		if r := recover(); r != nil { // gonum plot panics on degenerate input
			err = fmt.Errorf("plots: %v", r)
		}
	}()
	c.SetColor(color.White)
	c.Fill(c.Rectangle.Path())
	lw := f.legendWidth(c)
	plotArea := draw.Crop(c, 0, -lw, 0, 0)
	legendArea := draw.Crop(c, c.Max.X-c.Min.X-lw+vg.Points(8), 0, 0, -vg.Points(34))
	if f.EqualScale {
		equalise(f.Plot, plotArea)
	}
	f.Plot.Draw(plotArea)
	f.Legend.Draw(legendArea)
	if len(f.Overlays) > 0 {
		dc := f.Plot.DataCanvas(plotArea)
		x, y := f.Plot.Transforms(&dc)
		for _, o := range f.Overlays {
			o(dc, x, y)
		}
	}
	return nil
}

// equalise widens one axis range so that a data unit has the same length
// on both axes in the data area of c.
func equalise(p *plot.Plot, c draw.Canvas) {
	for range 2 { // tick labels change the data area a little: twice
		dc := p.DataCanvas(c)
		w, h := float64(dc.Max.X-dc.Min.X), float64(dc.Max.Y-dc.Min.Y)
		xr, yr := p.X.Max-p.X.Min, p.Y.Max-p.Y.Min
		if w <= 0 || h <= 0 || xr <= 0 || yr <= 0 {
			return
		}
		s := math.Max(xr/w, yr/h)
		cx, cy := (p.X.Min+p.X.Max)/2, (p.Y.Min+p.Y.Max)/2
		p.X.Min, p.X.Max = cx-s*w/2, cx+s*w/2
		p.Y.Min, p.Y.Max = cy-s*h/2, cy+s*h/2
	}
}

// InlineSVG strips the XML prolog of an SVG document so it can sit inside
// an HTML page, and lets it scale to its container.
func InlineSVG(svg []byte) string {
	s := string(svg)
	if i := strings.Index(s, "<svg"); i >= 0 {
		s = s[i:]
	}
	// Fixed point sizes become a responsive width; the viewBox keeps the shape.
	if i := strings.Index(s, ">"); i > 0 {
		head := dropAttr(dropAttr(s[:i], "width"), "height")
		s = head + ` style="width:100%;height:auto" role="img"` + s[i:]
	}
	return s
}

func dropAttr(tag, name string) string {
	key := " " + name + `="`
	i := strings.Index(tag, key)
	if i < 0 {
		return tag
	}
	j := strings.Index(tag[i+len(key):], `"`)
	if j < 0 {
		return tag
	}
	return tag[:i] + tag[i+len(key)+j+1:]
}
