package plots

import (
	"fmt"
	"image/color"
	"math"

	"github.com/paulmach/orb"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Outline is the region at or above one level, in site coordinates.
type Outline struct {
	Level    float64
	Geometry orb.MultiPolygon
}

// PlanMap is the data of a plan view in site coordinates (x east, y north).
type PlanMap struct {
	// Title, e.g. "Plume at steady state, water table".
	Title string
	// Units, for the labels.
	LengthUnit, ConcUnit string
	// Outlines, lowest level first.
	Outlines []Outline
	// Ends of the source's downgradient face; equal points for a point source.
	SourceFace [2]orb.Point
	// Footprint of the source zone (may be empty).
	SourceZone orb.Ring
	// Receptors with their ids.
	Receptors []Mark
	// Area shown: x and y ranges.
	XMin, XMax, YMin, YMax float64
	// Flow direction, degrees clockwise from north.
	FlowAzimuthDeg float64
}

// MapFigure draws the plan view: filled outlines (darker for higher
// levels), the source, labelled receptors, a scale bar, a north arrow and
// the flow direction, at one scale on both axes.
func MapFigure(m PlanMap) (*Figure, error) {
	f := newFigure(m.Title, fmt.Sprintf("Easting, site x (%s)", m.LengthUnit), fmt.Sprintf("Northing, site y (%s)", m.LengthUnit))
	f.EqualScale = true
	p := f.Plot
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = m.XMin, m.XMax, m.YMin, m.YMax
	p.X.Tick.Marker = roundTicks{}
	p.Y.Tick.Marker = roundTicks{}
	p.Add(gridLines())
	for k, o := range m.Outlines {
		fill, edge := levelFill(k, len(m.Outlines))
		label := fmt.Sprintf("at or above %g %s", o.Level, m.ConcUnit)
		if len(o.Geometry) == 0 {
			label += " (nowhere)"
		}
		var thumb plot.Thumbnailer
		for _, poly := range o.Geometry {
			rings := make([]plotter.XYer, len(poly))
			for i, r := range poly {
				xys := make(plotter.XYs, len(r))
				for j, pt := range r {
					xys[j] = plotter.XY{X: pt[0], Y: pt[1]}
				}
				rings[i] = xys
			}
			pg, err := plotter.NewPolygon(rings...)
			if err != nil {
				return nil, err
			}
			pg.Color = fill
			pg.LineStyle = draw.LineStyle{Color: edge, Width: vg.Points(1)}
			p.Add(pg)
			thumb = pg
		}
		if thumb == nil {
			thumb = swatch{fill, edge}
		}
		f.Legend.Add(label, thumb)
	}
	// The source: its zone hatched dark, its downgradient face a thick bar.
	if len(m.SourceZone) > 2 {
		xys := make(plotter.XYs, len(m.SourceZone))
		for i, pt := range m.SourceZone {
			xys[i] = plotter.XY{X: pt[0], Y: pt[1]}
		}
		pg, err := plotter.NewPolygon(xys)
		if err != nil {
			return nil, err
		}
		pg.Color = color.NRGBA{0x55, 0x58, 0x5e, 0x90}
		pg.LineStyle = draw.LineStyle{Color: sourceInk, Width: vg.Points(0.8)}
		p.Add(pg)
	}
	face := plotter.XYs{{X: m.SourceFace[0][0], Y: m.SourceFace[0][1]}, {X: m.SourceFace[1][0], Y: m.SourceFace[1][1]}}
	if m.SourceFace[0] == m.SourceFace[1] {
		sc, err := plotter.NewScatter(face[:1])
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: sourceInk, Radius: vg.Points(4.5), Shape: draw.BoxGlyph{}}
		p.Add(sc)
		f.Legend.Add("source", sc)
	} else {
		ln, err := plotter.NewLine(face)
		if err != nil {
			return nil, err
		}
		ln.LineStyle = draw.LineStyle{Color: sourceInk, Width: vg.Points(4)}
		p.Add(ln)
		f.Legend.Add("source (downgradient face)", ln)
	}
	// Receptors.
	if len(m.Receptors) > 0 {
		xys := make(plotter.XYs, len(m.Receptors))
		labels := make([]string, len(m.Receptors))
		for i, r := range m.Receptors {
			xys[i] = plotter.XY{X: r.X, Y: r.Y}
			labels[i] = r.Label
		}
		sc, err := plotter.NewScatter(xys)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: wellBlue, Radius: vg.Points(3.8), Shape: draw.PyramidGlyph{}}
		p.Add(sc)
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xys, Labels: labels})
		if err != nil {
			return nil, err
		}
		for i := range lb.TextStyle {
			lb.TextStyle[i].Font.Size = vg.Points(8.5)
			lb.TextStyle[i].Color = wellBlue
		}
		lb.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(3)}
		p.Add(lb)
		f.Legend.Add("receptor", sc)
	}
	f.Overlays = append(f.Overlays, scaleBar(m.LengthUnit), northArrow(m.FlowAzimuthDeg))
	return f, nil
}

// swatch is a legend thumbnail for a level reached nowhere.
type swatch struct{ fill, edge color.Color }

func (s swatch) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	pts := []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
	c.FillPolygon(s.fill, pts)
	c.StrokeLines(draw.LineStyle{Color: s.edge, Width: vg.Points(1)}, append(pts, pts[0]))
}

func labelStyle(size float64) text.Style {
	return text.Style{Color: inkGrey, Font: font.From(plot.DefaultFont, vg.Points(size)), Handler: plot.DefaultTextHandler,
		XAlign: draw.XCenter, YAlign: draw.YBottom}
}

// niceLength is 1, 2 or 5 times a power of ten, at most v.
func niceLength(v float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, k := range []float64{5, 2, 1} {
		if k*p <= v {
			return k * p
		}
	}
	return p
}

// scaleBar draws a two-part bar of a round length, about a fifth of the
// width, in the lower left of the data area.
func scaleBar(unit string) func(c draw.Canvas, x, y func(float64) vg.Length) {
	return func(c draw.Canvas, x, y func(float64) vg.Length) {
		// Data units per point, from the transform.
		w := c.Max.X - c.Min.X
		d0, d1 := invert(x, c.Min.X), invert(x, c.Max.X)
		if !(d1 > d0) || w <= 0 {
			return
		}
		L := niceLength((d1 - d0) / 5)
		px := vg.Length(L / (d1 - d0) * float64(w))
		x0, y0 := c.Min.X+vg.Points(14), c.Min.Y+vg.Points(14)
		h := vg.Points(5)
		// White backing for legibility over the plume.
		back := []vg.Point{{X: x0 - vg.Points(8), Y: y0 - vg.Points(6)}, {X: x0 + px + vg.Points(8), Y: y0 - vg.Points(6)},
			{X: x0 + px + vg.Points(8), Y: y0 + h + vg.Points(16)}, {X: x0 - vg.Points(8), Y: y0 + h + vg.Points(16)}}
		c.FillPolygon(color.NRGBA{0xff, 0xff, 0xff, 0xe0}, back)
		half := px / 2
		c.FillPolygon(sourceInk, []vg.Point{{X: x0, Y: y0}, {X: x0 + half, Y: y0}, {X: x0 + half, Y: y0 + h}, {X: x0, Y: y0 + h}})
		c.FillPolygon(color.White, []vg.Point{{X: x0 + half, Y: y0}, {X: x0 + px, Y: y0}, {X: x0 + px, Y: y0 + h}, {X: x0 + half, Y: y0 + h}})
		c.StrokeLines(draw.LineStyle{Color: sourceInk, Width: vg.Points(0.7)},
			[]vg.Point{{X: x0, Y: y0}, {X: x0 + px, Y: y0}, {X: x0 + px, Y: y0 + h}, {X: x0, Y: y0 + h}, {X: x0, Y: y0}})
		st := labelStyle(8)
		c.FillText(st, vg.Point{X: x0, Y: y0 + h + vg.Points(2)}, "0")
		c.FillText(st, vg.Point{X: x0 + px, Y: y0 + h + vg.Points(2)}, fmt.Sprintf("%g %s", L, unit))
	}
}

// invert finds the data value at canvas position v of a linear transform.
func invert(t func(float64) vg.Length, v vg.Length) float64 {
	ta, tb := float64(t(0)), float64(t(1))
	if tb == ta {
		return 0
	}
	return (float64(v) - ta) / (tb - ta)
}

// northArrow draws an arrow pointing up marked N, and beside it an arrow
// along the flow direction marked "flow", in the upper right.
func northArrow(azimuth float64) func(c draw.Canvas, x, y func(float64) vg.Length) {
	return func(c draw.Canvas, x, y func(float64) vg.Length) {
		cx, cy := c.Max.X-vg.Points(22), c.Max.Y-vg.Points(40)
		r := vg.Points(12)
		back := []vg.Point{{X: cx - 3.6*r, Y: cy - 1.6*r}, {X: cx + 1.4*r, Y: cy - 1.6*r}, {X: cx + 1.4*r, Y: cy + 2.9*r}, {X: cx - 3.6*r, Y: cy + 2.9*r}}
		c.FillPolygon(color.NRGBA{0xff, 0xff, 0xff, 0xe0}, back)
		// North: a split arrowhead, dark left half, light right half.
		tip := vg.Point{X: cx, Y: cy + r}
		c.FillPolygon(sourceInk, []vg.Point{tip, {X: cx - r*0.45, Y: cy - r}, {X: cx, Y: cy - r*0.55}})
		c.FillPolygon(color.White, []vg.Point{tip, {X: cx, Y: cy - r*0.55}, {X: cx + r*0.45, Y: cy - r}})
		c.StrokeLines(draw.LineStyle{Color: sourceInk, Width: vg.Points(0.7)},
			[]vg.Point{tip, {X: cx - r*0.45, Y: cy - r}, {X: cx, Y: cy - r*0.55}, {X: cx + r*0.45, Y: cy - r}, tip})
		c.FillText(labelStyle(10), vg.Point{X: cx, Y: cy + r + vg.Points(2)}, "N")
		// Flow direction.
		fx, fy := cx-2.2*r, cy
		s, co := math.Sincos(azimuth * math.Pi / 180)
		dx, dy := vg.Length(s)*r, vg.Length(co)*r
		ls := draw.LineStyle{Color: wellBlue, Width: vg.Points(1.6)}
		c.StrokeLine2(ls, fx-dx, fy-dy, fx+dx, fy+dy)
		// Arrowhead.
		hx, hy := fx+dx, fy+dy
		bx, by := vg.Length(-s)*r*0.45, vg.Length(-co)*r*0.45
		px, py := vg.Length(co)*r*0.25, vg.Length(-s)*r*0.25
		c.FillPolygon(wellBlue, []vg.Point{{X: hx, Y: hy}, {X: hx + bx + px, Y: hy + by + py}, {X: hx + bx - px, Y: hy + by - py}})
		c.FillText(labelStyle(8), vg.Point{X: fx, Y: cy + r + vg.Points(2)}, "flow")
	}
}
