package plots

import (
	"image/color"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The project's own palette: muted inks that stay distinct in greyscale
// print (the methods differ in dash pattern too).
var (
	inkGrey   = color.RGBA{0x4a, 0x4f, 0x55, 0xff}
	gridGrey  = color.RGBA{0xe3, 0xe6, 0xe8, 0xff}
	limitRed  = color.RGBA{0xb0, 0x1e, 0x2f, 0xff} // the screening level
	sourceInk = color.RGBA{0x2b, 0x2d, 0x31, 0xff}
	wellBlue  = color.RGBA{0x1d, 0x3f, 0x73, 0xff}
)

// methodStyle is the line colour and dash pattern of a method.
func methodStyle(method string) (color.Color, []vg.Length) {
	switch method {
	case "exact":
		return color.RGBA{0x0f, 0x6e, 0x74, 0xff}, nil // deep teal, solid
	case "domenico":
		return color.RGBA{0xc9, 0x7b, 0x12, 0xff}, []vg.Length{vg.Points(6), vg.Points(3)} // ochre, dashed
	case "numeric":
		return color.RGBA{0x6b, 0x3f, 0x8f, 0xff}, []vg.Length{vg.Points(1.5), vg.Points(2.5)} // plum, dotted
	}
	return inkGrey, nil
}

// methodGlyph is the marker of a method's values at the requested times.
func methodGlyph(method string) draw.GlyphDrawer {
	switch method {
	case "exact":
		return draw.CircleGlyph{}
	case "domenico":
		return draw.SquareGlyph{}
	}
	return draw.TriangleGlyph{}
}

// timeRamp returns the colour of curve k of n, from a light sea green to a
// dark slate (later times darker).
func timeRamp(k, n int) color.Color {
	a := [3]float64{0x8c, 0xc9, 0xb8}
	b := [3]float64{0x1f, 0x3b, 0x4d}
	f := 0.0
	if n > 1 {
		f = float64(k) / float64(n-1)
	}
	c := func(i int) uint8 { return uint8(a[i] + f*(b[i]-a[i]) + 0.5) }
	return color.RGBA{c(0), c(1), c(2), 0xff}
}

// levelFill is the fill of outline band k of n (lowest level first): sand,
// apricot, terracotta, deepening with the level.
func levelFill(k, n int) (fill, edge color.Color) {
	fills := []color.RGBA{
		{0xf5, 0xe6, 0xb8, 0xff},
		{0xef, 0xb0, 0x7a, 0xff},
		{0xc8, 0x5a, 0x4a, 0xff},
		{0x8e, 0x2c, 0x3a, 0xff},
		{0x5a, 0x17, 0x2a, 0xff},
	}
	edges := []color.RGBA{
		{0xb8, 0x94, 0x2e, 0xff},
		{0xb8, 0x6a, 0x2a, 0xff},
		{0x8a, 0x2e, 0x24, 0xff},
		{0x5a, 0x14, 0x20, 0xff},
		{0x30, 0x08, 0x14, 0xff},
	}
	if k >= len(fills) {
		k = len(fills) - 1
	}
	_ = n
	return fills[k], edges[k]
}

// compoundInks are the line colours of the compounds of a breakthrough
// figure of several, in the order the figure names them (repeating after
// eight, with another dash pattern).
var compoundInks = []color.RGBA{
	{0x0f, 0x6e, 0x74, 0xff}, // deep teal
	{0xc9, 0x7b, 0x12, 0xff}, // ochre
	{0x6b, 0x3f, 0x8f, 0xff}, // plum
	{0xa8, 0x43, 0x2b, 0xff}, // rust
	{0x2f, 0x5d, 0x9e, 0xff}, // slate blue
	{0x6b, 0x7a, 0x1e, 0xff}, // olive
	{0xb0, 0x50, 0x7e, 0xff}, // rose
	{0x3d, 0x42, 0x47, 0xff}, // graphite
}

// compoundDashes are the dash patterns of the compounds' curves: solid,
// dashed, dotted, long-dashed, short-dashed (never the dash-dot of a level).
var compoundDashes = [][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(12), vg.Points(3)},
	{vg.Points(3), vg.Points(1.5)},
}

// compoundStyle is the line of compound k of a figure of several: its
// colour, and a dash pattern that differs from its neighbours' so that
// the curves stay apart in greyscale print.
func compoundStyle(k int) draw.LineStyle {
	return draw.LineStyle{Color: compoundInks[k%len(compoundInks)], Width: vg.Points(2),
		Dashes: compoundDashes[(k+k/len(compoundInks))%len(compoundDashes)]}
}

// compoundLevelStyle is the screening-level line of compound k: the
// level's dash-dot in the compound's colour. Where n levels coincide
// (j-th of them), each draws every n-th dash, so that the line
// alternates between their colours instead of the last hiding the others.
func compoundLevelStyle(k, j, n int) draw.LineStyle {
	ls := draw.LineStyle{Color: compoundInks[k%len(compoundInks)], Width: vg.Points(1.4), Dashes: levelStyle().Dashes}
	if n > 1 {
		d := vg.Points(6)
		ls.Dashes = []vg.Length{d, vg.Length(n-1) * d}
		ls.DashOffs = vg.Length(j) * d
	}
	return ls
}
