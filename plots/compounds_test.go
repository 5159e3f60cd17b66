package plots

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"downgradient/internal/svgtext"
)

// svgPath is one stroked path of an SVG written by the plots: its colour,
// width and dash pattern, and its points (move and line commands only).
type svgPath struct {
	stroke, dashes string
	width          float64
	points         [][2]float64
}

var (
	pathRE  = regexp.MustCompile(`<path d="([^"]*)" style="([^"]*)"`)
	pointRE = regexp.MustCompile(`[ML](-?[0-9.e+-]+),(-?[0-9.e+-]+)`)
)

// strokedPaths lists the stroked paths of svg made of straight segments.
func strokedPaths(svg []byte) []svgPath {
	var out []svgPath
	for _, m := range pathRE.FindAllStringSubmatch(string(svg), -1) {
		if strings.ContainsAny(m[1], "AZ") {
			continue // a glyph or a filled shape
		}
		p := svgPath{}
		for _, kv := range strings.Split(m[2], ";") {
			k, v, _ := strings.Cut(kv, ":")
			switch k {
			case "stroke":
				p.stroke = v
			case "stroke-width":
				p.width, _ = strconv.ParseFloat(v, 64)
			case "stroke-dasharray":
				p.dashes = v
			}
		}
		for _, pt := range pointRE.FindAllStringSubmatch(m[1], -1) {
			x, _ := strconv.ParseFloat(pt[1], 64)
			y, _ := strconv.ParseFloat(pt[2], 64)
			p.points = append(p.points, [2]float64{x, y})
		}
		if p.stroke != "" {
			out = append(out, p)
		}
	}
	return out
}

// svgTexts are the texts of svg joined by spaces (a wrapped legend entry
// reads as one).
func svgTexts(t *testing.T, svg []byte) string {
	t.Helper()
	boxes, err := svgtext.Boxes(svg)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, b := range boxes {
		out = append(out, b.Text)
	}
	return strings.Join(out, " ")
}

// inkHex is a compound's colour as the SVG writes it.
func inkHex(k int) string {
	c := compoundInks[k%len(compoundInks)]
	return fmt.Sprintf("#%02X%02X%02X", c.R, c.G, c.B)
}

// chainFigure is a breakthrough plot of an invented four-compound chain:
// three closed-form curves and one compound given by the finite volumes
// at four times, with levels two of which coincide.
func chainFigure(compact bool) Breakthrough {
	ts := []float64{0, 5, 10, 20, 40, 60}
	b := Breakthrough{Receptor: "Orchard Lane well", TimeUnit: "yr", ConcUnit: "ug/L", Compact: compact, Floor: 1e-8,
		Curves: []Curve{
			{Label: "exact", Compound: "PCE", Method: "exact", X: ts, Y: []float64{0, 1e-4, 0.02, 0.03, 0.033, 0.033}},
			{Label: "exact", Compound: "TCE", Method: "exact", X: ts, Y: []float64{0, 1e-4, 0.05, 0.07, 0.078, 0.078}},
			{Label: "exact", Compound: "cis-1,2-DCE", Method: "exact", X: ts, Y: []float64{0, 1e-3, 0.6, 11, 11.5, 11.6}},
			{Label: "finite volume", Compound: "vinyl chloride", Method: "numeric", Points: true,
				X: []float64{5, 10, 20, 40}, Y: []float64{7e-5, 3.5, 48.8, 50.5}},
		},
		Levels: []CompoundLevel{{Compound: "PCE", Level: 5}, {Compound: "TCE", Level: 5},
			{Compound: "cis-1,2-DCE", Level: 50}, {Compound: "vinyl chloride", Level: 0.3, FirstExceedance: ptr(10)}},
	}
	return b
}

// A breakthrough figure of several compounds: a line per compound in its
// own colour (the finite-volume compound with its points), a level line
// per compound in its colour across the plot (coincident levels
// alternating dashes), the ring of a first exceedance, a legend naming
// compound and method; every text clear of every other, at full width and
// compact, the compact figure taller than one of one compound.
func TestBreakthroughOfSeveralCompounds(t *testing.T) {
	for _, compact := range []bool{false, true} {
		b := chainFigure(compact)
		f, err := BreakthroughFigure(b)
		if err != nil {
			t.Fatal(err)
		}
		svg := renderSVG(t, f, map[bool]float64{false: 0, true: 1}[compact])
		paths := strokedPaths(svg)
		for k, c := range b.Curves {
			var curves, levels int
			var offsets []string
			for _, p := range paths {
				switch {
				case p.stroke != inkHex(k):
				case p.width == 2 && len(p.points) >= 3:
					curves++
				case p.width == 1.4 && len(p.points) == 2 && p.points[1][0]-p.points[0][0] > 100:
					levels++
					offsets = append(offsets, p.dashes)
				}
			}
			if curves != 1 || levels != 1 {
				t.Errorf("compact %v, %s: %d curves and %d level lines in its colour %s, want 1 and 1", compact, c.Compound, curves, levels, inkHex(k))
			}
			for _, want := range []string{c.Compound + ", " + c.Label, fmt.Sprintf("%s level %s ug/L", c.Compound, FormatNumber(b.Levels[k].Level))} {
				if !strings.Contains(svgTexts(t, svg), want) {
					t.Errorf("compact %v: no legend entry %q", compact, want)
				}
			}
		}
		// PCE and TCE share the level 5: each draws every second dash, offset.
		if !strings.Contains(string(svg), "stroke-dashoffset:6") {
			t.Errorf("compact %v: coincident levels not interleaved", compact)
		}
		if !strings.Contains(string(svg), "first reaching its level") {
			t.Errorf("compact %v: no ring entry", compact)
		}
		if !strings.Contains(string(svg), ">Breakthrough at Orchard Lane well<") {
			t.Errorf("compact %v: title", compact)
		}
		bad, err := svgtext.Overlapping(svg, 0.3)
		if err != nil {
			t.Fatal(err)
		}
		for _, o := range bad {
			t.Errorf("compact %v: overlapping texts %s", compact, o)
		}
		if _, h := f.Size(CompactWidth); compact && !(h > CompactHeight) {
			t.Errorf("compact figure of four compounds %v tall, want taller than one of one compound (%v)", h, CompactHeight)
		}
	}
}

// The axis of several compounds keeps every level in view: the automatic
// scale is logarithmic when the peak and the levels span more than two
// decades, and every level lies inside the axis, linear or log.
func TestBreakthroughScaleSeveralLevels(t *testing.T) {
	curves := func(peak float64) []Curve {
		return []Curve{{Label: "exact", Compound: "A", Method: "exact", X: []float64{0, 10, 20}, Y: []float64{0, peak / 2, peak}},
			{Label: "exact", Compound: "B", Method: "exact", X: []float64{0, 10, 20}, Y: []float64{0, peak / 20, peak / 10}}}
	}
	for _, c := range []struct {
		name   string
		peak   float64
		levels []float64
		scale  string
		log    bool
	}{
		// 10 against 5 and 0.3: 33 times, linear.
		{"levels within two decades of the peak", 10, []float64{5, 0.3}, "", false},
		// 10 against 0.002: a level far below the peak.
		{"one level far below", 10, []float64{5, 0.002}, "", true},
		// 0.01 against 0.005 and 50: a level far above the peak.
		{"one level far above", 0.01, []float64{0.005, 50}, "", true},
		{"forced linear", 10, []float64{5, 0.002}, ScaleLinear, false},
		// Nothing modelled yet (peak 0): linear, every level in view.
		{"no values", 0, []float64{5, 0.002}, "", false},
		{"forced log without values", 0, []float64{5, 0.002}, ScaleLog, true},
	} {
		b := Breakthrough{Receptor: "R", TimeUnit: "yr", ConcUnit: "ug/L", Curves: curves(c.peak), Scale: c.scale, Floor: 1e-10,
			Levels: []CompoundLevel{{Compound: "A", Level: c.levels[0]}, {Compound: "B", Level: c.levels[1]}}}
		if b.UsesLog() != c.log {
			t.Errorf("%s: log %v, want %v", c.name, b.UsesLog(), c.log)
		}
		f, err := BreakthroughFigure(b)
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range c.levels {
			y := l
			if c.log {
				y = math.Log10(l)
			}
			if !(y > f.Plot.Y.Min && y < f.Plot.Y.Max) {
				t.Errorf("%s: level %g outside the axis [%g, %g]", c.name, l, f.Plot.Y.Min, f.Plot.Y.Max)
			}
		}
	}
}

// A compound without values (no closed form gives it and the finite
// volumes did not run) is named in the legend, with no line drawn.
func TestBreakthroughCompoundWithoutValues(t *testing.T) {
	b := chainFigure(true)
	b.Curves[1] = Curve{Label: "no values", Compound: "TCE", Method: "exact"}
	f, err := BreakthroughFigure(b)
	if err != nil {
		t.Fatal(err)
	}
	svg := renderSVG(t, f, 1)
	if !strings.Contains(svgTexts(t, svg), "TCE, no values") {
		t.Error("no legend entry for the compound without values")
	}
	for _, p := range strokedPaths(svg) {
		if p.stroke == inkHex(1) && p.width == 2 && len(p.points) > 2 {
			t.Errorf("a line drawn for the compound without values: %v", p.points)
		}
	}
}

// A map or section title wider than the plot (a compound's name before
// it) is set in smaller type under FitTitle and stays inside the figure;
// without it the title is as given.
func TestFitTitle(t *testing.T) {
	long := "tetrachloroethene: section along the plume axis 365 yr after the release began (exact solution)"
	for _, fit := range []bool{false, true} {
		f, err := SectionFigure(Section{Title: long, FitTitle: fit, LengthUnit: "m", ConcUnit: "mg/L", XMin: 0, XMax: 400, DepthMax: 12})
		if err != nil {
			t.Fatal(err)
		}
		svg := renderSVG(t, f, 0)
		boxes, err := svgtext.Boxes(svg)
		if err != nil {
			t.Fatal(err)
		}
		inside := true
		for _, b := range boxes {
			if strings.HasPrefix(b.Text, "tetrachloroethene") && (b.MinX < 0 || b.MaxX > float64(DefaultWidth)) {
				inside = false
			}
		}
		if inside != fit {
			t.Errorf("FitTitle %v: title inside the figure %v", fit, inside)
		}
	}
}
