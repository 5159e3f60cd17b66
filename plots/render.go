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
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
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
	// CompactWidth and CompactHeight are the size of a figure with its
	// legend below, two of which sit side by side on a printed page.
	CompactWidth  = 3.6 * vg.Inch
	CompactHeight = 3.1 * vg.Inch
)

// Figure is a plot with its legend drawn in a column to its right, or
// (LegendBelow) in two columns under it.
type Figure struct {
	Plot   *plot.Plot
	Legend plot.Legend
	// EqualScale keeps one data unit the same length along both axes (maps).
	EqualScale bool
	// LegendBelow puts the legend under the plot in two columns, for a
	// figure printed at half the page width.
	LegendBelow bool
	// Overlays are drawn over the data area after the plot (north arrow,
	// scale bar, labels), with the plot's data transforms.
	Overlays []func(c draw.Canvas, x, y func(float64) vg.Length)
	// entries are the legend's entries, kept to lay them out in columns.
	entries []legendEntry
	// legendSplit is the number of entries in the first column of a
	// legend below the plot; 0 for half of them (the first column the longer).
	legendSplit int
	// grow lets the figure grow taller with its legend, whose entries are
	// then wrapped to the legend's room in either layout (a breakthrough
	// figure of several compounds); otherwise the size is fixed.
	grow bool
	// fitTitle sets a title wider than the plot in smaller type (fitTitle).
	fitTitle bool
}

// legendEntry is one line of the legend.
type legendEntry struct {
	text   string
	thumbs []plot.Thumbnailer
}

// addLegend adds an entry to the legend.
func (f *Figure) addLegend(text string, thumbs ...plot.Thumbnailer) {
	f.Legend.Add(text, thumbs...)
	f.entries = append(f.entries, legendEntry{text, thumbs})
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

// compact sets smaller type and the legend below, for a figure printed at
// half the page width (CompactWidth).
func compact(f *Figure) {
	f.LegendBelow = true
	p := f.Plot
	p.Title.TextStyle.Font.Size = vg.Points(10.5)
	p.Title.Padding = vg.Points(4)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font.Size = vg.Points(8.5)
		ax.Tick.Label.Font.Size = vg.Points(8)
	}
	f.Legend.TextStyle.Font.Size = vg.Points(8)
	f.Legend.ThumbnailWidth = vg.Points(16)
	f.Legend.Padding = vg.Points(2.5)
}

// Size is the figure's size for a width w: DefaultHeight (less for a
// legend below a narrow plot: CompactHeight), or for a figure at one scale
// on both axes the height that fits its data ranges (between 3 and 8 inches).
func (f *Figure) Size(w vg.Length) (vg.Length, vg.Length) {
	switch {
	case f.LegendBelow && f.grow:
		_, h := f.belowLegends(w)
		return w, max(CompactHeight, h+compactPlotHeight)
	case f.LegendBelow:
		return w, CompactHeight
	case f.grow:
		lg := f.rightLegend(w)
		r := lg.Rectangle(draw.Canvas{})
		return w, max(DefaultHeight, r.Max.Y-r.Min.Y+legendTop+vg.Points(12))
	case !f.EqualScale:
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

// compactPlotHeight is the least height of the plot above a legend below
// it when the figure grows with its legend: about that of a compact
// figure of one compound.
const compactPlotHeight = 2.5 * vg.Inch

// legendTop is the space above the legend column right of the plot.
const legendTop = vg.Length(34)

// legendShare is the largest share of the figure's width the legend column
// right of the plot takes.
const legendShare = 0.38

// legendWidth is the width of the legend column for the legend lg.
func legendWidth(lg plot.Legend, c draw.Canvas) vg.Length {
	r := lg.Rectangle(c)
	w := r.Max.X - r.Min.X
	return vg.Length(math.Min(float64(w+vg.Points(16)), float64(c.Max.X-c.Min.X)*legendShare))
}

// rightLegend is the legend drawn right of the plot in a figure of width
// w: f.Legend, or for a figure that grows with its legend the same
// entries wrapped to the column's room.
func (f *Figure) rightLegend(w vg.Length) plot.Legend {
	if !f.grow {
		return f.Legend
	}
	lg := newLegendLike(f.Legend)
	lg.Top, lg.Left = f.Legend.Top, f.Legend.Left
	room := vg.Length(float64(w)*legendShare) - f.Legend.ThumbnailWidth - vg.Points(22)
	for _, e := range f.entries {
		lg.Add(wrapText(e.text, f.Legend.TextStyle, room), e.thumbs...)
	}
	return lg
}

func (f *Figure) draw(c draw.Canvas) (err error) {
	defer func() {
		if r := recover(); r != nil { // gonum plot panics on degenerate input
			err = fmt.Errorf("plots: %v", r)
		}
	}()
	c.SetColor(color.White)
	c.Fill(c.Rectangle.Path())
	plotArea := f.drawLegend(c)
	if f.fitTitle {
		fitTitle(f.Plot, plotArea)
	}
	if f.EqualScale {
		equalise(f.Plot, plotArea)
	}
	f.Plot.Draw(plotArea)
	if len(f.Overlays) > 0 {
		dc := f.Plot.DataCanvas(plotArea)
		x, y := f.Plot.Transforms(&dc)
		for _, o := range f.Overlays {
			o(dc, x, y)
		}
	}
	return nil
}

// fitTitle sets a title wider than the plot area c in smaller type, down
// to minTitleSize, and breaks it into lines only if it is still too wide,
// instead of letting it run off the figure.
func fitTitle(p *plot.Plot, c draw.Canvas) {
	t := &p.Title
	room := c.Max.X - c.Min.X - vg.Points(12)
	w := t.TextStyle.Width(t.Text)
	if t.Text == "" || room <= 0 || w <= room {
		return
	}
	t.TextStyle.Font.Size = max(minTitleSize, t.TextStyle.Font.Size*room/w)
	if t.TextStyle.Width(t.Text) > room {
		t.Text = wrapText(t.Text, t.TextStyle, room)
	}
}

// minTitleSize is the smallest type fitTitle sets a title in.
const minTitleSize = vg.Length(9)

// drawLegend draws the legend in its column (or under the plot) and
// returns the area left for the plot.
func (f *Figure) drawLegend(c draw.Canvas) draw.Canvas {
	w := c.Max.X - c.Min.X
	if !f.LegendBelow {
		lg := f.rightLegend(w)
		lw := legendWidth(lg, c)
		lg.Draw(draw.Crop(c, c.Max.X-c.Min.X-lw+vg.Points(8), 0, 0, -legendTop))
		return draw.Crop(c, 0, -lw, 0, 0)
	}
	cols, h := f.belowLegends(w)
	for k := range cols {
		area := draw.Crop(c, vg.Points(6)+vg.Length(k)*w/2, -w/2*vg.Length(1-k), 0, 0)
		area.Max.Y = c.Min.Y + h
		cols[k].Draw(area)
	}
	return draw.Crop(c, 0, 0, h, 0)
}

// belowLegends are the two columns of a legend below a plot of width w,
// filled left first (legendSplit entries, or half of them, in the first),
// each entry wrapped to its column, and the height they take.
func (f *Figure) belowLegends(w vg.Length) ([2]plot.Legend, vg.Length) {
	half := (len(f.entries) + 1) / 2
	if f.legendSplit > 0 {
		half = f.legendSplit
	}
	cols := [2]plot.Legend{f.Legend, f.Legend}
	for k := range cols {
		cols[k] = newLegendLike(f.Legend)
	}
	room := w/2 - f.Legend.ThumbnailWidth - vg.Points(14)
	for i, e := range f.entries {
		cols[min(i/max(half, 1), 1)].Add(wrapText(e.text, f.Legend.TextStyle, room), e.thumbs...)
	}
	var c draw.Canvas // a legend's size does not depend on where it is drawn
	h := vg.Length(math.Max(float64(cols[0].Rectangle(c).Size().Y), float64(cols[1].Rectangle(c).Size().Y))) + vg.Points(8)
	return cols, h
}

// wrapText breaks txt into lines no wider than w in style st, at spaces.
func wrapText(txt string, st text.Style, w vg.Length) string {
	if st.Width(txt) <= w {
		return txt
	}
	var lines []string
	line := ""
	for _, word := range strings.Fields(txt) {
		if line != "" && st.Width(line+" "+word) > w {
			lines = append(lines, line)
			line = word
			continue
		}
		if line != "" {
			line += " "
		}
		line += word
	}
	return strings.Join(append(lines, line), "\n")
}

// newLegendLike is an empty legend in the style of lg.
func newLegendLike(lg plot.Legend) plot.Legend {
	out := plot.NewLegend()
	out.TextStyle, out.Padding, out.Top, out.Left = lg.TextStyle, lg.Padding, true, true
	out.ThumbnailWidth, out.YPosition = lg.ThumbnailWidth, lg.YPosition
	return out
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
