package plots

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"

	"downgradient/internal/svgtext"
)

// ellipse is a ring around (cx, cy) with half-axes a, b, counter-clockwise.
func ellipse(cx, cy, a, b float64) orb.Ring {
	var r orb.Ring
	for k := 0; k <= 64; k++ {
		s, c := math.Sincos(2 * math.Pi * float64(k) / 64)
		r = append(r, orb.Point{cx + a*c, cy + b*s})
	}
	return r
}

// crowd is n receptors on a jittered grid over [x0, x1] x [y0, y1], with
// their outcomes: inside the ellipse of inside() reaching the level, left
// of x = 0 not compared, the rest below.
func crowd(n int, x0, x1, y0, y1 float64, inside func(x, y float64) bool) []Mark {
	cols := int(math.Ceil(math.Sqrt(float64(n) * (x1 - x0) / (y1 - y0))))
	rows := (n + cols - 1) / cols
	out := make([]Mark, 0, n)
	for k := range n {
		i, j := k%cols, k/cols
		x := x0 + (x1-x0)*(float64(i)+0.5+0.3*math.Sin(float64(7*k)))/float64(cols)
		y := y0 + (y1-y0)*(float64(j)+0.5+0.3*math.Cos(float64(11*k)))/float64(rows)
		m := Mark{Label: fmt.Sprintf("R-%03d", k+1), X: x, Y: y, Status: MarkBelow, Weight: 1 / (1 + math.Abs(y))}
		switch {
		case x < 0:
			m.Status = MarkNotCompared
		case inside(x, y):
			m.Status, m.Weight = MarkExceeds, 10/(1+x)
		}
		out = append(out, m)
	}
	return out
}

// crowdFigures are the map, section and profile of a 500-receptor layer
// under a label policy.
func crowdFigures(t *testing.T, policy string) map[string]*Figure {
	t.Helper()
	inPlan := func(x, y float64) bool { return math.Pow((x-250)/260, 2)+math.Pow(y/40, 2) < 1 }
	plan := crowd(500, -100, 1100, -240, 240, inPlan)
	mp, err := MapFigure(PlanMap{Title: "crowd", LengthUnit: "m", ConcUnit: "mg/L", Labels: policy,
		Outlines: []Outline{{Level: 0.005, Geometry: orb.MultiPolygon{{ellipse(250, 0, 260, 40)}}}},
		Sources:  []SourceShape{{Face: [2]orb.Point{{0, -7.5}, {0, 7.5}}}}, Receptors: plan,
		XMin: -120, XMax: 1120, YMin: -260, YMax: 260, FlowAzimuthDeg: 90})
	if err != nil {
		t.Fatal(err)
	}
	inSec := func(x, d float64) bool { return math.Pow((x-200)/220, 2)+math.Pow(d/9, 2) < 1 }
	sec := crowd(500, -20, 700, 0, 15, inSec)
	se, err := SectionFigure(Section{Title: "crowd section", LengthUnit: "m", ConcUnit: "mg/L", Labels: policy,
		Outlines: []Outline{{Level: 0.005, Geometry: orb.MultiPolygon{{ellipse(200, 0, 220, 9)}}}},
		XMin:     -30, XMax: 720, DepthMax: 16, SourceDepth: 3, Receptors: sec})
	if err != nil {
		t.Fatal(err)
	}
	xs := make([]float64, 101)
	ys := make([]float64, 101)
	for i := range xs {
		xs[i] = 8 * float64(i)
		ys[i] = 12 * math.Exp(-xs[i]/60)
	}
	lvl := 0.005
	pr, err := ProfileFigure(Profile{LengthUnit: "m", ConcUnit: "mg/L", ScreeningLevel: &lvl, Labels: policy,
		Curves: []Curve{{Label: "steady state", X: xs, Y: ys}}, Receptors: crowd(500, 0, 800, 0, 1, func(x, _ float64) bool { return x < 400 })})
	if err != nil {
		t.Fatal(err)
	}
	return map[string]*Figure{"map": mp, "section": se, "profile": pr}
}

// renderSVG renders a figure at its default size.
func renderSVG(t *testing.T, f *Figure, w float64) []byte {
	t.Helper()
	width, h := f.Size(DefaultWidth)
	if w > 0 {
		width, h = f.Size(CompactWidth)
	}
	b, err := Render(f, width, h, SVG)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// Under the automatic policy no two texts of a figure overlap (bounding
// boxes from the SVG and the fonts' metrics, package svgtext): the sample
// figures, a compact breakthrough, and the map, section and profile of a
// 500-receptor layer; and the layer still gets labels, those reaching the
// level first.
func TestAutoLabelsDoNotOverlap(t *testing.T) {
	figs := crowdFigures(t, LabelAuto)
	for name, f := range sampleFigures(t) {
		figs["sample "+name] = f
	}
	lvl := 0.005
	compactBT, err := BreakthroughFigure(Breakthrough{Receptor: "P-7 parcel corner", TimeUnit: "d", ConcUnit: "mg/L", ScreeningLevel: &lvl,
		FirstExceedance: ptr(2650.0), Compact: true, Curves: []Curve{
			{Label: "exact", Method: "exact", X: []float64{0, 5000, 15000}, Y: []float64{0, 0.02, 0.021}},
			{Label: "Domenico (1987)", Method: "domenico", X: []float64{0, 5000, 15000}, Y: []float64{0, 0.018, 0.019}}}})
	if err != nil {
		t.Fatal(err)
	}
	figs["compact breakthrough"] = compactBT
	for name, f := range figs {
		w := 0.0
		if f.LegendBelow {
			w = 1
		}
		svg := renderSVG(t, f, w)
		bad, err := svgtext.Overlapping(svg, 0.3)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for _, b := range bad {
			t.Errorf("%s: overlapping texts %s", name, b)
		}
		if strings.HasPrefix(name, "sample") || name == "compact breakthrough" {
			continue
		}
		labels := receptorLabels(t, svg)
		if len(labels) < 10 {
			t.Errorf("%s: only %d receptors labelled", name, len(labels))
		}
	}
}

// receptorLabels lists the receptor labels (R-nnn) of an SVG.
func receptorLabels(t *testing.T, svg []byte) []string {
	t.Helper()
	boxes, err := svgtext.Boxes(svg)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, b := range boxes {
		if strings.HasPrefix(b.Text, "R-") {
			out = append(out, b.Text)
		}
	}
	return out
}

func ptr(v float64) *float64 { return &v }

// The policies: none labels nothing, all labels every receptor in view,
// exceedances exactly those reaching the level.
func TestLabelPolicies(t *testing.T) {
	for _, policy := range []string{LabelNone, LabelAll, LabelExceedances} {
		figs := crowdFigures(t, policy)
		mp := figs["map"]
		labels := receptorLabels(t, renderSVG(t, mp, 0))
		var exceeding int
		for _, m := range crowd(500, -100, 1100, -240, 240, func(x, y float64) bool { return math.Pow((x-250)/260, 2)+math.Pow(y/40, 2) < 1 }) {
			if m.Status == MarkExceeds {
				exceeding++
			}
		}
		want := map[string]int{LabelNone: 0, LabelAll: 500, LabelExceedances: exceeding}[policy]
		if len(labels) != want {
			t.Errorf("%s: %d labels, want %d", policy, len(labels), want)
		}
	}
}

// The concentration axis: logarithmic by default when the peak and the
// level are more than two decades apart, the level always inside the axis,
// a log axis never below the floor.
func TestBreakthroughScale(t *testing.T) {
	curve := func(peak float64) []Curve {
		return []Curve{{Label: "exact", Method: "exact", X: []float64{0, 100, 200}, Y: []float64{0, peak / 2, peak}}}
	}
	for _, c := range []struct {
		name        string
		peak, level float64
		scale       string
		log         bool
	}{
		{"monitoring well near the source", 4.25, 0.005, "", true},
		{"supply well", 0.1288, 0.005, ScaleAuto, false},
		{"domestic well far below the level", 0.0045e-3, 5e-3, "", true},
		{"forced linear", 4.25, 0.005, ScaleLinear, false},
		{"forced log", 0.1288, 0.005, ScaleLog, true},
	} {
		lvl := c.level
		b := Breakthrough{Receptor: "R", TimeUnit: "d", ConcUnit: "mg/L", Curves: curve(c.peak), ScreeningLevel: &lvl, Scale: c.scale, Floor: 1e-11}
		if b.UsesLog() != c.log {
			t.Errorf("%s: log %v, want %v", c.name, b.UsesLog(), c.log)
		}
		f, err := BreakthroughFigure(b)
		if err != nil {
			t.Fatal(err)
		}
		y := lvl
		if c.log {
			y = math.Log10(lvl)
			if f.Plot.Y.Min < math.Log10(1e-11)-1e-9 {
				t.Errorf("%s: axis reaches %g below the floor", c.name, f.Plot.Y.Min)
			}
		}
		if !(y > f.Plot.Y.Min && y < f.Plot.Y.Max) {
			t.Errorf("%s: level %g outside the axis [%g, %g]", c.name, y, f.Plot.Y.Min, f.Plot.Y.Max)
		}
	}
}

// A profile curve stops where it falls below the axis instead of running
// along it: the drawn runs hold only points at or above the axis floor,
// and a curve that is 0 beyond some distance ends before it; the axis
// never reaches below the reporting floor.
func TestProfileStopsAtFloor(t *testing.T) {
	xs := []float64{0, 100, 200, 300, 400}
	lvl := 0.005
	pr := Profile{LengthUnit: "m", ConcUnit: "mg/L", ScreeningLevel: &lvl, Floor: 1.2e-11,
		Curves: []Curve{{Label: "365 d", X: xs, Y: []float64{12, 0.1, 0, 0, 0}}, {Label: "steady", X: xs, Y: []float64{12, 1, 0.1, 1e-9, 5e-4}}}}
	f, err := ProfileFigure(pr)
	if err != nil {
		t.Fatal(err)
	}
	floor := math.Pow(10, f.Plot.Y.Min)
	if floor < pr.Floor {
		t.Errorf("axis floor %g below the reporting floor", floor)
	}
	for k, want := range [][]int{{2}, {3, 1}} {
		segs := segments(pr.Curves[k], floor, math.Log10)
		var got []int
		for _, s := range segs {
			got = append(got, len(s))
			for _, p := range s {
				if p.Y < f.Plot.Y.Min {
					t.Errorf("curve %d: a point at %g below the axis", k, p.Y)
				}
			}
		}
		if fmt.Sprint(got) != fmt.Sprint(want) {
			t.Errorf("curve %d: runs of %v points, want %v", k, got, want)
		}
	}
}
