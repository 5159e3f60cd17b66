package plots

import (
	"fmt"
	"image/color"

	"github.com/paulmach/orb"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Outline is the region at or above one level, in the figure's frame.
type Outline struct {
	Level    float64
	Geometry orb.MultiPolygon
}

// PlanMap is the data of a plan view in site coordinates (x east, y north).
type PlanMap struct {
	// Title, e.g. "Plume at steady state, water table".
	Title string
	// FitTitle sets a title wider than the plot in smaller type (the longer
	// titles of a compound of several).
	FitTitle bool
	// Units, for the labels.
	LengthUnit, ConcUnit string
	// Outlines, lowest level first.
	Outlines []Outline
	// The sources (one, or several superposed).
	Sources []SourceShape
	// Receptors with their ids and comparison outcomes.
	Receptors []Mark
	// Labels: LabelAuto (default), LabelAll, LabelExceedances or LabelNone.
	Labels string
	// Area shown: x and y ranges.
	XMin, XMax, YMin, YMax float64
	// Flow direction, degrees clockwise from north.
	FlowAzimuthDeg float64
}

// MapFigure draws the plan view: filled outlines (darker for higher
// levels), the source, the receptors by outcome with their labels under
// the label policy, a scale bar, a north arrow and the flow direction, at
// one scale on both axes.
func MapFigure(m PlanMap) (*Figure, error) {
	f := newFigure(m.Title, fmt.Sprintf("Easting, site x (%s)", m.LengthUnit), fmt.Sprintf("Northing, site y (%s)", m.LengthUnit))
	f.EqualScale, f.fitTitle = true, m.FitTitle
	p := f.Plot
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = m.XMin, m.XMax, m.YMin, m.YMax
	p.X.Tick.Marker = roundTicks{}
	p.Y.Tick.Marker = roundTicks{}
	p.Add(gridLines())
	if err := addOutlines(f, m.Outlines, m.ConcUnit, func(x, y float64) (float64, float64) { return x, y }); err != nil {
		return nil, err
	}
	for k, src := range m.Sources {
		if err := addSource(f, src.Face, src.Zone, k == 0); err != nil {
			return nil, err
		}
	}
	ident := func(v float64) float64 { return v }
	if err := addMarks(f, m.Receptors, ident); err != nil {
		return nil, err
	}
	f.Overlays = append(f.Overlays, scaleBar(m.LengthUnit), northArrow(m.FlowAzimuthDeg),
		markLabels(m.Receptors, labelSpec{policy: policyOr(m.Labels), tr: ident, obstacles: mapObstacles(m), plume: lowestOutline(m.Outlines)}))
	return f, nil
}

// mapObstacles are what receptor labels keep clear of on a map: the scale
// bar, the north arrow and every source.
func mapObstacles(m PlanMap) func(c draw.Canvas, x, y func(float64) vg.Length) []vg.Rectangle {
	furniture := mapFurniture(m.LengthUnit)
	return func(c draw.Canvas, x, y func(float64) vg.Length) []vg.Rectangle {
		out := furniture(c, x, y)
		for _, src := range m.Sources {
			pts := append(orb.Ring{src.Face[0], src.Face[1]}, src.Zone...)
			b := pts.Bound()
			pad := vg.Points(3)
			out = append(out, vg.Rectangle{Min: vg.Point{X: x(b.Min[0]) - pad, Y: y(b.Min[1]) - pad}, Max: vg.Point{X: x(b.Max[0]) + pad, Y: y(b.Max[1]) + pad}})
		}
		return out
	}
}

// policyOr is the label policy, LabelAuto when empty.
func policyOr(p string) string {
	if p == "" {
		return LabelAuto
	}
	return p
}

// lowestOutline is the region of the lowest level (which holds the higher ones).
func lowestOutline(outlines []Outline) orb.MultiPolygon {
	for _, o := range outlines {
		if len(o.Geometry) > 0 {
			return o.Geometry
		}
	}
	return nil
}

// addOutlines fills the outlines, lowest level first, each with a legend
// entry; tr maps a geometry point to the plot's axes.
func addOutlines(f *Figure, outlines []Outline, unit string, tr func(x, y float64) (float64, float64)) error {
	for k, o := range outlines {
		fill, edge := levelFill(k, len(outlines))
		label := fmt.Sprintf("at or above %s %s", FormatNumber(o.Level), unit)
		if len(o.Geometry) == 0 {
			label += " (nowhere)"
		}
		var thumb plot.Thumbnailer
		for _, poly := range o.Geometry {
			rings := make([]plotter.XYer, len(poly))
			for i, r := range poly {
				xys := make(plotter.XYs, len(r))
				for j, pt := range r {
					xys[j].X, xys[j].Y = tr(pt[0], pt[1])
				}
				rings[i] = xys
			}
			pg, err := plotter.NewPolygon(rings...)
			if err != nil {
				return err
			}
			pg.Color = fill
			pg.LineStyle = draw.LineStyle{Color: edge, Width: vg.Points(1)}
			f.Plot.Add(pg)
			thumb = pg
		}
		if thumb == nil {
			thumb = swatch{fill, edge}
		}
		f.addLegend(label, thumb)
	}
	return nil
}

// SourceShape is a source in plan: the ends of its downgradient face
// (equal points for a point source) and the footprint of its zone (may be
// empty).
type SourceShape struct {
	Face [2]orb.Point
	Zone orb.Ring
}

// addSource draws the source zone shaded dark and its downgradient face as
// a thick bar (a square for a point source); legend: the first one only.
func addSource(f *Figure, faceEnds [2]orb.Point, zone orb.Ring, legend bool) error {
	p := f.Plot
	if len(zone) > 2 {
		xys := make(plotter.XYs, len(zone))
		for i, pt := range zone {
			xys[i] = plotter.XY{X: pt[0], Y: pt[1]}
		}
		pg, err := plotter.NewPolygon(xys)
		if err != nil {
			return err
		}
		pg.Color = color.NRGBA{0x55, 0x58, 0x5e, 0x90}
		pg.LineStyle = draw.LineStyle{Color: sourceInk, Width: vg.Points(0.8)}
		p.Add(pg)
	}
	face := plotter.XYs{{X: faceEnds[0][0], Y: faceEnds[0][1]}, {X: faceEnds[1][0], Y: faceEnds[1][1]}}
	if faceEnds[0] == faceEnds[1] {
		sc, err := plotter.NewScatter(face[:1])
		if err != nil {
			return err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: sourceInk, Radius: vg.Points(4.5), Shape: draw.BoxGlyph{}}
		p.Add(sc)
		if legend {
			f.addLegend("source", sc)
		}
		return nil
	}
	ln, err := plotter.NewLine(face)
	if err != nil {
		return err
	}
	ln.LineStyle = draw.LineStyle{Color: sourceInk, Width: vg.Points(4)}
	p.Add(ln)
	if legend {
		f.addLegend("source (downgradient face)", ln)
	}
	return nil
}

// swatch is a legend thumbnail for a level reached nowhere.
type swatch struct{ fill, edge color.Color }

func (s swatch) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	pts := []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
	c.FillPolygon(s.fill, pts)
	c.StrokeLines(draw.LineStyle{Color: s.edge, Width: vg.Points(1)}, append(pts, pts[0]))
}
