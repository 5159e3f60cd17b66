package plots

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// overlay draws over the data area with the plot's data transforms.
type overlay = func(c draw.Canvas, x, y func(float64) vg.Length)

func labelStyle(size float64) text.Style {
	return text.Style{Color: inkGrey, Font: font.From(plot.DefaultFont, vg.Points(size)), Handler: plot.DefaultTextHandler,
		XAlign: draw.XCenter, YAlign: draw.YBottom}
}

// backing is the translucent white behind the map furniture.
var backing = color.NRGBA{0xff, 0xff, 0xff, 0xe0}

func fillRect(c draw.Canvas, clr color.Color, r vg.Rectangle) {
	c.FillPolygon(clr, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
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

// invert finds the data value at canvas position v of a linear transform.
func invert(t func(float64) vg.Length, v vg.Length) float64 {
	ta, tb := float64(t(0)), float64(t(1))
	if tb == ta {
		return 0
	}
	return (float64(v) - ta) / (tb - ta)
}

// scaleBarLayout is the scale bar's round length L (data units), its
// length on the canvas and the box it and its labels occupy (lower left of
// the data area); ok false when the transform is degenerate.
func scaleBarLayout(c draw.Canvas, x func(float64) vg.Length, unit string) (L float64, px vg.Length, box vg.Rectangle, ok bool) {
	w := c.Max.X - c.Min.X
	d0, d1 := invert(x, c.Min.X), invert(x, c.Max.X)
	if !(d1 > d0) || w <= 0 {
		return 0, 0, box, false
	}
	L = niceLength((d1 - d0) / 5)
	px = vg.Length(L / (d1 - d0) * float64(w))
	x0, y0 := c.Min.X+vg.Points(14), c.Min.Y+vg.Points(14)
	right := x0 + px + vg.Points(8) + labelStyle(8).Width(FormatNumber(L)+" "+unit)/2
	box = vg.Rectangle{Min: vg.Point{X: x0 - vg.Points(8), Y: y0 - vg.Points(6)}, Max: vg.Point{X: right, Y: y0 + vg.Points(21)}}
	return L, px, box, true
}

// scaleBar draws a two-part bar of a round length, about a fifth of the
// width, in the lower left of the data area.
func scaleBar(unit string) overlay {
	return func(c draw.Canvas, x, y func(float64) vg.Length) {
		L, px, box, ok := scaleBarLayout(c, x, unit)
		if !ok {
			return
		}
		x0, y0 := c.Min.X+vg.Points(14), c.Min.Y+vg.Points(14)
		h := vg.Points(5)
		fillRect(c, backing, box)
		half := px / 2
		c.FillPolygon(sourceInk, []vg.Point{{X: x0, Y: y0}, {X: x0 + half, Y: y0}, {X: x0 + half, Y: y0 + h}, {X: x0, Y: y0 + h}})
		c.FillPolygon(color.White, []vg.Point{{X: x0 + half, Y: y0}, {X: x0 + px, Y: y0}, {X: x0 + px, Y: y0 + h}, {X: x0 + half, Y: y0 + h}})
		c.StrokeLines(draw.LineStyle{Color: sourceInk, Width: vg.Points(0.7)},
			[]vg.Point{{X: x0, Y: y0}, {X: x0 + px, Y: y0}, {X: x0 + px, Y: y0 + h}, {X: x0, Y: y0 + h}, {X: x0, Y: y0}})
		st := labelStyle(8)
		c.FillText(st, vg.Point{X: x0, Y: y0 + h + vg.Points(2)}, "0")
		c.FillText(st, vg.Point{X: x0 + px, Y: y0 + h + vg.Points(2)}, fmt.Sprintf("%s %s", FormatNumber(L), unit))
	}
}

// northArrowBox is the box of the north arrow and flow arrow (upper right
// of the data area), with their centre and size.
func northArrowBox(c draw.Canvas) (box vg.Rectangle, cx, cy, r vg.Length) {
	cx, cy = c.Max.X-vg.Points(22), c.Max.Y-vg.Points(40)
	r = vg.Points(12)
	box = vg.Rectangle{Min: vg.Point{X: cx - 3.6*r, Y: cy - 1.6*r}, Max: vg.Point{X: cx + 1.4*r, Y: cy + 2.9*r}}
	return box, cx, cy, r
}

// northArrow draws an arrow pointing up marked N, and beside it an arrow
// along the flow direction marked "flow", in the upper right.
func northArrow(azimuth float64) overlay {
	return func(c draw.Canvas, x, y func(float64) vg.Length) {
		box, cx, cy, r := northArrowBox(c)
		fillRect(c, backing, box)
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

// mapFurniture are the boxes of the scale bar and the north arrow, which
// receptor labels keep clear of.
func mapFurniture(unit string) func(c draw.Canvas, x, y func(float64) vg.Length) []vg.Rectangle {
	return func(c draw.Canvas, x, y func(float64) vg.Length) []vg.Rectangle {
		nb, _, _, _ := northArrowBox(c)
		out := []vg.Rectangle{nb}
		if _, _, sb, ok := scaleBarLayout(c, x, unit); ok {
			out = append(out, sb)
		}
		return out
	}
}
