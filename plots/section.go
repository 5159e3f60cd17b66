package plots

import (
	"fmt"
	"math"

	"github.com/paulmach/orb"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Section is the data of a vertical section along the plume axis:
// distance along the flow from the source face against depth below the
// water table (positive down).
type Section struct {
	// Title, e.g. "Section along the plume axis at steady state".
	Title string
	// FitTitle sets a title wider than the plot in smaller type (the longer
	// titles of a compound of several).
	FitTitle bool
	// Units, for the labels.
	LengthUnit, ConcUnit string
	// Outlines, lowest level first, in (distance along flow, depth).
	Outlines []Outline
	// Area shown: distance along flow from XMin to XMax, depth 0 to DepthMax.
	XMin, XMax, DepthMax float64
	// Depth of the source's downgradient face below the water table; 0
	// draws no face (a spill or a column).
	SourceDepth float64
	// Receptors at (distance along flow, depth), a screen from Y to Bottom.
	Receptors []Mark
	// Labels: LabelAuto (default), LabelAll, LabelExceedances or LabelNone.
	Labels string
}

// SectionFigure draws the section: filled outlines, the water table, the
// source face, receptors (screens as bars) with labels under the policy,
// and the vertical exaggeration of the drawing.
func SectionFigure(s Section) (*Figure, error) {
	f := newFigure(s.Title, fmt.Sprintf("Distance downgradient of the source face (%s)", s.LengthUnit),
		fmt.Sprintf("Depth below the water table (%s)", s.LengthUnit))
	f.fitTitle = s.FitTitle
	p := f.Plot
	dmax := math.Max(s.DepthMax, 1e-3)
	p.X.Min, p.X.Max = s.XMin, s.XMax
	if !(p.X.Max > p.X.Min) {
		p.X.Max = p.X.Min + 1
	}
	p.Y.Min, p.Y.Max = -dmax, 0.12*dmax
	p.X.Tick.Marker = roundTicks{}
	p.Y.Tick.Marker = depthTicks{}
	p.Add(gridLines())
	down := func(x, d float64) (float64, float64) { return x, -d }
	if err := addOutlines(f, s.Outlines, s.ConcUnit, down); err != nil {
		return nil, err
	}
	wt := plotter.NewFunction(func(float64) float64 { return 0 })
	wt.LineStyle = draw.LineStyle{Color: wellBlue, Width: vg.Points(1.2)}
	wt.Samples = 2
	p.Add(wt)
	f.addLegend("water table", wt)
	if s.SourceDepth > 0 {
		ln, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 0, Y: -s.SourceDepth}})
		if err != nil {
			return nil, err
		}
		ln.LineStyle = draw.LineStyle{Color: sourceInk, Width: vg.Points(4)}
		p.Add(ln)
		f.addLegend("source (downgradient face)", ln)
	}
	marks, err := addScreens(f, s.Receptors)
	if err != nil {
		return nil, err
	}
	neg := func(v float64) float64 { return -v }
	if err := addMarks(f, marks, neg); err != nil {
		return nil, err
	}
	f.Overlays = append(f.Overlays, exaggeration(), markLabels(marks, labelSpec{policy: policyOr(s.Labels), tr: neg,
		obstacles: exaggerationObstacle, plume: flipped(lowestOutline(s.Outlines))}))
	return f, nil
}

// addScreens draws each well screen as a bar and returns the marks with
// their symbols at the screens' mid-depths.
func addScreens(f *Figure, receptors []Mark) ([]Mark, error) {
	out := make([]Mark, len(receptors))
	for i, m := range receptors {
		out[i] = m
		if !(m.Bottom > m.Y) {
			continue
		}
		gs, _ := markStyle(statusOf(m), vg.Points(1))
		ln, err := plotter.NewLine(plotter.XYs{{X: m.X, Y: -m.Y}, {X: m.X, Y: -m.Bottom}})
		if err != nil {
			return nil, err
		}
		ln.LineStyle = draw.LineStyle{Color: gs.Color, Width: vg.Points(2.2)}
		f.Plot.Add(ln)
		out[i].Y = (m.Y + m.Bottom) / 2
	}
	return out, nil
}

// exaggerationLayout is the text giving the vertical exaggeration of the
// drawing (canvas length per depth unit over that per distance unit), its
// text origin and its padded box, in the lower right of the data area.
func exaggerationLayout(c draw.Canvas, x, y func(float64) vg.Length) (string, vg.Point, vg.Rectangle) {
	sx := float64(x(1) - x(0))
	sy := float64(y(1) - y(0))
	txt := "vertical scale = horizontal scale"
	if sx > 0 && sy > 0 {
		if e := sy / sx; math.Abs(e-1) > 0.05 {
			txt = "vertical exaggeration × " + FormatNumber(roundSig(e, 2))
		}
	}
	st := labelStyleOf(MarkNotCompared)
	at := vg.Point{X: c.Max.X - st.Width(txt) - vg.Points(6), Y: c.Min.Y + vg.Points(6)}
	return txt, at, textBox(st, txt, at)
}

// roundSig rounds v to n significant digits.
func roundSig(v float64, n int) float64 {
	if v == 0 {
		return 0
	}
	p := math.Pow(10, float64(n)-math.Ceil(math.Log10(math.Abs(v))))
	return math.Round(v*p) / p
}

// exaggeration writes the vertical exaggeration on a pale backing.
func exaggeration() overlay {
	return func(c draw.Canvas, x, y func(float64) vg.Length) {
		txt, at, box := exaggerationLayout(c, x, y)
		fillRect(c, backing, box)
		c.FillText(labelStyleOf(MarkNotCompared), at, txt)
	}
}

// exaggerationObstacle is the box receptor labels keep clear of.
func exaggerationObstacle(c draw.Canvas, x, y func(float64) vg.Length) []vg.Rectangle {
	_, _, box := exaggerationLayout(c, x, y)
	return []vg.Rectangle{box}
}

// flipped is a geometry in (x, depth) on the plot's axes (x, -depth).
func flipped(mp orb.MultiPolygon) orb.MultiPolygon {
	out := make(orb.MultiPolygon, len(mp))
	for i, poly := range mp {
		out[i] = make(orb.Polygon, len(poly))
		for j, ring := range poly {
			r := make(orb.Ring, len(ring))
			for k, pt := range ring {
				r[k] = orb.Point{pt[0], -pt[1]}
			}
			out[i][j] = r
		}
	}
	return out
}
