package plots

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// addCompounds draws a breakthrough figure of several compounds: each
// curve in its compound's colour and dash (compoundStyle), a curve without
// values as a legend entry only; then each compound's screening level
// across the plot in its colour, labelled in the legend with the compound,
// and a ring where the compound first reaches it (before xmax). Below the
// plot the legend holds the curves in its first column and the levels in
// its second, and the figure grows with it.
func addCompounds(f *Figure, b Breakthrough, xmax, floor float64, tr func(float64) float64) error {
	idx := b.compoundIndex()
	f.grow = true
	for _, c := range b.Curves {
		ls := compoundStyle(idx[c.Compound])
		if len(c.X) == 0 {
			f.addLegend(c.legendLabel(), &plotter.Line{LineStyle: ls})
			continue
		}
		if err := drawCurve(f, c, ls, floor, tr); err != nil {
			return err
		}
	}
	f.legendSplit = len(f.entries)
	var rings []plotter.Scatter
	for i, l := range b.Levels {
		j, n := coincident(b.Levels, i)
		y := tr(l.Level)
		fn := plotter.NewFunction(func(float64) float64 { return y })
		fn.LineStyle = compoundLevelStyle(idx[l.Compound], j, n)
		fn.Samples = 2
		f.Plot.Add(fn)
		f.addLegend(fmt.Sprintf("%s level %s %s", l.Compound, FormatNumber(l.Level), b.ConcUnit), fn)
		if t := l.FirstExceedance; t != nil && *t >= 0 && *t <= xmax {
			sc, err := plotter.NewScatter(plotter.XYs{{X: *t, Y: y}})
			if err != nil {
				return err
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: fn.LineStyle.Color, Radius: vg.Points(4.5), Shape: draw.RingGlyph{}}
			rings = append(rings, *sc)
		}
	}
	for i := range rings {
		f.Plot.Add(&rings[i])
	}
	if len(rings) > 0 {
		f.addLegend("first reaching its level", glyphThumb{draw.GlyphStyle{Color: inkGrey, Radius: vg.Points(4.5), Shape: draw.RingGlyph{}}})
	}
	return nil
}

// coincident is the place j of level i among the n levels of ls equal to
// it (to a part in a million), in order.
func coincident(ls []CompoundLevel, i int) (j, n int) {
	for k, l := range ls {
		if math.Abs(l.Level-ls[i].Level) <= 1e-6*math.Max(l.Level, ls[i].Level) {
			if k < i {
				j++
			}
			n++
		}
	}
	return j, n
}
