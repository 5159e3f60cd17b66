package plots

import (
	"image/color"
	"math"
	"sort"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Label policies: which receptors a map, section or profile labels.
const (
	// LabelAuto labels as many receptors as fit, most important first
	// (exceeding the level, then by Weight): no label overlaps another
	// label, the scale bar, the north arrow or the legend, and none leaves
	// the data area. The default.
	LabelAuto = "auto"
	// LabelAll labels every receptor, overlapping where it must.
	LabelAll = "all"
	// LabelExceedances labels only the receptors that reach the level.
	LabelExceedances = "exceedances"
	// LabelNone labels no receptor.
	LabelNone = "none"
)

// Comparison outcomes of a receptor (Mark.Status), which pick its symbol.
const (
	// MarkBelow: modelled, compared with the level and below it at all times.
	MarkBelow = "below"
	// MarkExceeds: reaches the level at some time.
	MarkExceeds = "exceeds"
	// MarkNotCompared: not modelled, or no screening level known.
	MarkNotCompared = "not_compared"
)

// Mark is a labelled receptor position.
type Mark struct {
	Label string
	X, Y  float64
	// Bottom of a well screen in a section, drawn from Y down to Bottom
	// (depths, positive down); 0 for a point.
	Bottom float64
	// Status: MarkBelow, MarkExceeds or MarkNotCompared (empty: MarkBelow).
	Status string
	// Weight orders the labels when not all fit: higher first (the
	// receptor's peak concentration).
	Weight float64
}

// markStyle is the symbol and the legend text of a receptor status.
func markStyle(status string, r vg.Length) (draw.GlyphStyle, string) {
	switch status {
	case MarkExceeds:
		return draw.GlyphStyle{Color: limitRed, Radius: r, Shape: draw.PyramidGlyph{}}, "receptor reaching the level"
	case MarkNotCompared:
		return draw.GlyphStyle{Color: inkGrey, Radius: r, Shape: draw.TriangleGlyph{}}, "receptor not compared"
	}
	return draw.GlyphStyle{Color: wellBlue, Radius: r, Shape: draw.PyramidGlyph{}}, "receptor below the level"
}

// markRadius shrinks the symbols of crowded figures.
func markRadius(n int) vg.Length {
	switch {
	case n > 200:
		return vg.Points(2.2)
	case n > 50:
		return vg.Points(2.8)
	}
	return vg.Points(3.8)
}

// addMarks draws the marks as symbols at (X, tr(Y)), one scatter and one
// legend entry per status present, in the order exceeds, below, not compared.
func addMarks(f *Figure, marks []Mark, tr func(float64) float64) error {
	r := markRadius(len(marks))
	for _, st := range []string{MarkExceeds, MarkBelow, MarkNotCompared} {
		var xys plotter.XYs
		for _, m := range marks {
			if statusOf(m) == st {
				xys = append(xys, plotter.XY{X: m.X, Y: tr(m.Y)})
			}
		}
		if len(xys) == 0 {
			continue
		}
		halo, err := plotter.NewScatter(xys)
		if err != nil {
			return err
		}
		gs, name := markStyle(st, r)
		halo.GlyphStyle = draw.GlyphStyle{Color: color.White, Radius: r + vg.Points(1.2), Shape: draw.PyramidGlyph{}}
		sc, err := plotter.NewScatter(xys)
		if err != nil {
			return err
		}
		sc.GlyphStyle = gs
		f.Plot.Add(halo, sc)
		f.addLegend(name, sc)
	}
	return nil
}

func statusOf(m Mark) string {
	if m.Status == "" {
		return MarkBelow
	}
	return m.Status
}

// labelOrder lists the marks to label under policy, most important first.
func labelOrder(marks []Mark, policy string) []int {
	var idx []int
	for i, m := range marks {
		switch {
		case m.Label == "", policy == LabelNone:
		case policy == LabelExceedances && statusOf(m) != MarkExceeds:
		default:
			idx = append(idx, i)
		}
	}
	rank := func(m Mark) int {
		switch statusOf(m) {
		case MarkExceeds:
			return 0
		case MarkBelow:
			return 1
		}
		return 2
	}
	sort.SliceStable(idx, func(a, b int) bool {
		ma, mb := marks[idx[a]], marks[idx[b]]
		if rank(ma) != rank(mb) {
			return rank(ma) < rank(mb)
		}
		return ma.Weight > mb.Weight
	})
	return idx
}

// labelStyleOf is the text style of receptor labels.
func labelStyleOf(status string) text.Style {
	st := labelStyle(8)
	st.XAlign, st.YAlign = draw.XLeft, draw.YBottom
	st.Color = wellBlue
	if status == MarkExceeds {
		st.Color = limitRed
	} else if status == MarkNotCompared {
		st.Color = inkGrey
	}
	return st
}

// labelJob is one label to place next to a symbol at a canvas point.
type labelJob struct {
	text   string
	style  text.Style
	anchor vg.Point
	// must: drawn even where it overlaps (policies all and exceedances).
	must bool
	// clear: the label may not cover the plume (a receptor below the
	// level lies outside it, and so can its label).
	clear bool
	// stack adds positions further below the symbol (a row of marks).
	stack bool
	// far adds positions away from the symbol, joined to it by a leader
	// line (a receptor reaching the level, in a crowd).
	far bool
}

// plumeCover counts the points of a label box inside the plume (nil: no plume).
type plumeCover func(vg.Rectangle) int

// placedLabel is a label with its text origin and its padded box.
type placedLabel struct {
	job labelJob
	at  vg.Point
	box vg.Rectangle
	// leader: the label stands away from its symbol.
	leader bool
}

// labelPad is the clear space kept around a label.
const labelPad = vg.Length(1.5)

// placeLabels puts each label (in order) at the first of the positions
// around its symbol that stays inside area and covers no label already
// placed, no obstacle, no other symbol (nor, for a clear label, the plume),
// preferring positions that cover little plume. A label that fits nowhere
// is left out, unless it must be drawn: then it takes the position with
// the fewest overlaps.
func placeLabels(jobs []labelJob, area vg.Rectangle, obstacles, symbols []vg.Rectangle, cover plumeCover, gap vg.Length) []placedLabel {
	var out []placedLabel
	hard := append([]vg.Rectangle(nil), obstacles...)
	for _, j := range jobs {
		best, bestScore := placedLabel{}, -1
		near := candidates(j, gap)
		for k, at := range append(near, farCandidates(j, gap)...) {
			box := textBox(j.style, j.text, at)
			score, ok := placementScore(j, box, area, hard, symbols, cover)
			if !ok {
				continue
			}
			if k >= len(near) {
				score += 100 // a leader line: only when nothing near fits
			}
			if bestScore < 0 || score < bestScore {
				best, bestScore = placedLabel{job: j, at: at, box: box, leader: k >= adjacentPositions}, score
			}
			if score == 0 {
				break
			}
		}
		if bestScore < 0 {
			continue
		}
		out = append(out, best)
		hard = append(hard, best.box)
	}
	return out
}

// placementScore is the cost of a label box (0: nothing covered); ok false
// when the box breaks a rule a label that need not be drawn must keep.
func placementScore(j labelJob, box, area vg.Rectangle, hard, symbols []vg.Rectangle, cover plumeCover) (int, bool) {
	score := 0
	if !inside(box, area) {
		if !j.must {
			return 0, false
		}
		score += 1_000_000
	}
	hits := countOverlaps(box, hard)
	if hits > 0 && !j.must {
		return 0, false
	}
	covered := countOverlaps(box, symbols)
	if covered > 0 && !j.must && !j.far {
		return 0, false // a label hides no receptor's symbol, but one reaching the level must be named
	}
	score += 1000*hits + 20*covered
	if cover != nil {
		n := cover(box)
		if n > 0 && j.clear && !j.must {
			return 0, false
		}
		score += n
	}
	return score, true
}

// adjacentPositions is the number of candidates that touch their symbol;
// a label further out (stacked or far) is joined to it by a leader line.
const adjacentPositions = 8

// candidates are the text origins (left end of the baseline) of the eight
// positions around the anchor, right of it first.
func candidates(j labelJob, gap vg.Length) []vg.Point {
	w := j.style.Width(j.text)
	e := j.style.FontExtents()
	asc, desc := e.Ascent, e.Descent
	a := j.anchor
	out := []vg.Point{
		{X: a.X + gap, Y: a.Y + gap/2},                  // upper right
		{X: a.X + gap, Y: a.Y - gap/2 - asc},            // lower right
		{X: a.X - gap - w, Y: a.Y + gap/2},              // upper left
		{X: a.X - gap - w, Y: a.Y - gap/2 - asc},        // lower left
		{X: a.X + gap, Y: a.Y - asc/2 + desc/2},         // right
		{X: a.X - gap - w, Y: a.Y - asc/2 + desc/2},     // left
		{X: a.X - w/2, Y: a.Y + gap + desc},             // above
		{X: a.X - w/2, Y: a.Y - gap - asc - labelPad*2}, // below
	}
	if j.stack {
		line := asc + desc + 2*labelPad
		for k := 1; k <= 3; k++ {
			dy := vg.Length(k) * line
			out = append(out, vg.Point{X: a.X + gap, Y: a.Y - gap/2 - asc - dy}, vg.Point{X: a.X - gap - w, Y: a.Y - gap/2 - asc - dy})
		}
	}
	return out
}

// farCandidates are text origins of a far label: at three distances in
// eight directions, the text on the side away from the symbol.
func farCandidates(j labelJob, gap vg.Length) []vg.Point {
	if !j.far {
		return nil
	}
	w := j.style.Width(j.text)
	e := j.style.FontExtents()
	var out []vg.Point
	for _, d := range []vg.Length{3 * gap, 5 * gap, 8 * gap} {
		for k := range 8 {
			sin, cos := math.Sincos(float64(k) * math.Pi / 4)
			p := vg.Point{X: j.anchor.X + d*vg.Length(cos), Y: j.anchor.Y + d*vg.Length(sin)}
			switch {
			case cos > 0.1:
			case cos < -0.1:
				p.X -= w
			default:
				p.X -= w / 2
			}
			if sin < -0.1 {
				p.Y -= e.Ascent
			}
			out = append(out, p)
		}
	}
	return out
}

// textBox is the padded box of text drawn from origin at with style st
// (left-aligned on its baseline).
func textBox(st text.Style, txt string, at vg.Point) vg.Rectangle {
	e := st.FontExtents()
	w := st.Width(txt)
	return vg.Rectangle{
		Min: vg.Point{X: at.X - labelPad, Y: at.Y - e.Descent - labelPad},
		Max: vg.Point{X: at.X + w + labelPad, Y: at.Y + e.Ascent + labelPad},
	}
}

func overlaps(a, b vg.Rectangle) bool {
	return a.Min.X < b.Max.X && b.Min.X < a.Max.X && a.Min.Y < b.Max.Y && b.Min.Y < a.Max.Y
}

func inside(a, area vg.Rectangle) bool {
	return a.Min.X >= area.Min.X && a.Max.X <= area.Max.X && a.Min.Y >= area.Min.Y && a.Max.Y <= area.Max.Y
}

func countOverlaps(a vg.Rectangle, others []vg.Rectangle) int {
	n := 0
	for _, o := range others {
		if overlaps(a, o) {
			n++
		}
	}
	return n
}

// drawLabels writes the placed labels, each on a pale backing so that it
// reads over the plume.
func drawLabels(c draw.Canvas, labels []placedLabel) {
	back := color.NRGBA{0xff, 0xff, 0xff, 0xb8}
	for _, l := range labels {
		if l.leader {
			to := vg.Point{X: max(l.box.Min.X, min(l.job.anchor.X, l.box.Max.X)), Y: max(l.box.Min.Y, min(l.job.anchor.Y, l.box.Max.Y))}
			c.StrokeLine2(draw.LineStyle{Color: l.job.style.Color, Width: vg.Points(0.6)}, l.job.anchor.X, l.job.anchor.Y, to.X, to.Y)
		}
	}
	for _, l := range labels {
		fillRect(c, back, l.box)
	}
	for _, l := range labels {
		c.FillText(l.job.style, l.at, l.job.text)
	}
}

// labelSpec says how an overlay labels a figure's marks.
type labelSpec struct {
	policy string
	// tr maps a mark's Y to the plot's axis.
	tr func(float64) float64
	// obstacles gives the boxes labels keep clear of (scale bar, north arrow).
	obstacles func(c draw.Canvas, x, y func(float64) vg.Length) []vg.Rectangle
	// plume, in the plot's axes, which the labels of receptors below the
	// level keep clear of; nil for none.
	plume orb.MultiPolygon
	// stack: the marks lie in a row (a profile): allow stacked labels.
	stack bool
}

// markLabels is an overlay that labels marks as spec says, symbols at the
// data transform of (X, tr(Y)).
func markLabels(marks []Mark, spec labelSpec) overlay {
	return func(c draw.Canvas, x, y func(float64) vg.Length) {
		r := markRadius(len(marks))
		syms := make([]vg.Rectangle, len(marks))
		for i, m := range marks {
			p := vg.Point{X: x(m.X), Y: y(spec.tr(m.Y))}
			syms[i] = vg.Rectangle{Min: vg.Point{X: p.X - r, Y: p.Y - r}, Max: vg.Point{X: p.X + r, Y: p.Y + r}}
		}
		var jobs []labelJob
		for _, i := range labelOrder(marks, spec.policy) {
			m := marks[i]
			p := vg.Point{X: x(m.X), Y: y(spec.tr(m.Y))}
			if !c.Contains(p) {
				continue
			}
			jobs = append(jobs, labelJob{text: m.Label, style: labelStyleOf(statusOf(m)), anchor: p,
				must: spec.policy != LabelAuto, clear: statusOf(m) == MarkBelow, stack: spec.stack,
				far: statusOf(m) == MarkExceeds && !spec.stack})
		}
		var obs []vg.Rectangle
		if spec.obstacles != nil {
			obs = spec.obstacles(c, x, y)
		}
		var cover plumeCover
		if len(spec.plume) > 0 {
			cover = coverOf(spec.plume, x, y)
		}
		drawLabels(c, placeLabels(jobs, c.Rectangle, obs, syms, cover, r+vg.Points(1.5)))
	}
}

// coverOf counts the points of a 5 x 3 lattice over a box (canvas) that
// lie inside the plume (plot axes).
func coverOf(plume orb.MultiPolygon, x, y func(float64) vg.Length) plumeCover {
	bound := plume.Bound()
	return func(b vg.Rectangle) int {
		n := 0
		for i := range 5 {
			for j := range 3 {
				px := b.Min.X + (b.Max.X-b.Min.X)*vg.Length(i)/4
				py := b.Min.Y + (b.Max.Y-b.Min.Y)*vg.Length(j)/2
				pt := orb.Point{invert(x, px), invert(y, py)}
				if bound.Contains(pt) && planar.MultiPolygonContains(plume, pt) {
					n++
				}
			}
		}
		return n
	}
}
