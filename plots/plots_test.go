package plots

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"io"
	"math"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"gonum.org/v1/plot"
)

// sampleFigures builds one figure of each kind from small invented data.
func sampleFigures(t *testing.T) map[string]*Figure {
	t.Helper()
	lvl := 0.005
	ts := []float64{0, 500, 1000, 1500, 2000}
	bt, err := BreakthroughFigure(Breakthrough{Receptor: "W-4 <supply> & well", TimeUnit: "d", ConcUnit: "mg/L", ScreeningLevel: &lvl,
		Curves: []Curve{
			{Label: "exact", Method: "exact", X: ts, Y: []float64{0, 0.001, 0.05, 0.1, 0.12}},
			{Label: "Domenico", Method: "domenico", X: ts, Y: []float64{0, 0.0005, 0.04, 0.09, 0.11}},
			{Label: "numeric", Method: "numeric", X: ts[1:3], Y: []float64{0.001, 0.049}, Markers: true},
		}})
	if err != nil {
		t.Fatal(err)
	}
	xs := []float64{0, 100, 200, 400}
	pr, err := ProfileFigure(Profile{LengthUnit: "m", ConcUnit: "mg/L", ScreeningLevel: &lvl,
		Curves:    []Curve{{Label: "365 d", X: xs, Y: []float64{12, 0.1, 0, 0}}, {Label: "steady state", X: xs, Y: []float64{12, 1, 0.1, 0.001}}},
		Receptors: []Mark{{Label: "W-4", X: 210}}})
	if err != nil {
		t.Fatal(err)
	}
	circle := func(r float64, ccw bool) orb.Ring {
		var ring orb.Ring
		for k := 0; k <= 40; k++ {
			a := 2 * math.Pi * float64(k) / 40
			if !ccw {
				a = -a
			}
			ring = append(ring, orb.Point{100 + r*math.Cos(a), 50 + r*math.Sin(a)})
		}
		return ring
	}
	mp, err := MapFigure(PlanMap{Title: "test map", LengthUnit: "m", ConcUnit: "mg/L",
		Outlines: []Outline{
			{Level: 0.005, Geometry: orb.MultiPolygon{{circle(40, true), circle(10, false)}}},
			{Level: 0.05, Geometry: orb.MultiPolygon{{circle(20, true)}}},
			{Level: 0.5},
		},
		Sources:   []SourceShape{{Face: [2]orb.Point{{60, 45}, {60, 55}}, Zone: orb.Ring{{60, 45}, {60, 55}, {50, 55}, {50, 45}, {60, 45}}}},
		Receptors: []Mark{{Label: "MW-1", X: 120, Y: 52}}, XMin: 0, XMax: 200, YMin: 0, YMax: 100, FlowAzimuthDeg: 90})
	if err != nil {
		t.Fatal(err)
	}
	sec, err := SectionFigure(Section{Title: "test section", LengthUnit: "m", ConcUnit: "mg/L",
		Outlines: []Outline{{Level: 0.005, Geometry: orb.MultiPolygon{{orb.Ring{{0, 0}, {300, 0}, {200, 8}, {0, 5}, {0, 0}}}}}},
		XMin:     -10, XMax: 400, DepthMax: 12, SourceDepth: 3,
		Receptors: []Mark{{Label: "W-4", X: 210, Y: 2, Bottom: 8, Status: MarkExceeds}, {Label: "MW-1", X: 40, Y: 1}}})
	if err != nil {
		t.Fatal(err)
	}
	return map[string]*Figure{"breakthrough": bt, "profile": pr, "map": mp, "section": sec}
}

// xmlWellFormed reads every token of doc with encoding/xml.
func xmlWellFormed(doc string) error {
	dec := xml.NewDecoder(strings.NewReader(doc))
	for {
		_, err := dec.Token()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
	}
}

// Every figure renders as SVG that parses as XML (also once inlined) and as
// a PNG that decodes.
func TestFiguresRender(t *testing.T) {
	for name, f := range sampleFigures(t) {
		w, h := f.Size(DefaultWidth)
		svg, err := Render(f, w, h, SVG)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if err := xmlWellFormed(string(svg)); err != nil {
			t.Errorf("%s: SVG is not well-formed XML: %v", name, err)
		}
		in := InlineSVG(svg)
		if !strings.HasPrefix(in, "<svg") || strings.Contains(in[:strings.Index(in, ">")], "pt\"") {
			t.Errorf("%s: inline SVG head %.200s", name, in)
		}
		if err := xmlWellFormed(in); err != nil {
			t.Errorf("%s: inline SVG is not well-formed: %v", name, err)
		}
		if !strings.Contains(string(svg), "<text") {
			t.Errorf("%s: no text in the SVG", name)
		}
		pngb, err := Render(f, w, h, PNG)
		if err != nil {
			t.Fatalf("%s png: %v", name, err)
		}
		img, err := png.Decode(bytes.NewReader(pngb))
		if err != nil || img.Bounds().Dx() < 800 {
			t.Errorf("%s: PNG %v, %v", name, err, img)
		}
	}
	if _, err := Render(sampleFigures(t)["map"], DefaultWidth, DefaultHeight, "gif"); err == nil {
		t.Error("unknown format accepted")
	}
}

// Round ticks: 1, 2 or 5 times a power of ten; decade ticks label powers
// of ten with the one number formatter.
func TestTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		want   string
		ticks  interface {
			Ticks(lo, hi float64) []plot.Tick
		}
	}{
		{1203.7, 1796.2, "1300 1400 1500 1600 1700", roundTicks{}},
		// A step of 0.2 whose multiples are not exact in binary: no 0.6000000000000001.
		{0, 1.3, "0 0.2 0.4 0.6 0.8 1 1.2", roundTicks{}},
		// Around zero: no "-0".
		{-0.35, 0.35, "-0.3 -0.2 -0.1 0 0.1 0.2 0.3", roundTicks{}},
		{-1e-17, 0.0031, "0 0.0005 0.001 0.0015 0.002 0.0025 0.003", roundTicks{}},
		{math.Log10(0.0005), math.Log10(24), "0.001 0.01 0.1 1 10", decadeTicks{}},
		{-9.2, -1.5, "1e-09 1e-08 1e-07 1e-06 1e-05 0.0001 0.001 0.01", decadeTicks{}},
		// Depths: minus the axis value, nothing above the water table.
		{-12, 1, "12 10 8 6 4 2 0", depthTicks{}},
	} {
		var labels []string
		for _, tk := range c.ticks.Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				labels = append(labels, tk.Label)
			}
		}
		if got := strings.Join(labels, " "); got != c.want {
			t.Errorf("%T [%g, %g]: %q, want %q", c.ticks, c.lo, c.hi, got, c.want)
		}
	}
}

// FormatNumber: four significant digits, no float noise, no "-0",
// exponent form outside 1e-4..1e6.
func TestFormatNumber(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{0, "0"}, {math.Copysign(0, -1), "0"}, {0.1 + 0.2, "0.3"}, {3 * 0.2, "0.6"}, {0.005, "0.005"},
		{12, "12"}, {1115.951976297463, "1116"}, {0.12880404430872613, "0.1288"}, {56.2749, "56.27"},
		{123456.7, "123500"}, {2.5e-7, "2.5e-07"}, {1.23456e7, "1.235e+07"}, {-4.2e-5, "-4.2e-05"},
		{-0.00001, "-1e-05"}, {math.Inf(1), "–"}, {math.NaN(), "–"},
	} {
		if got := FormatNumber(c.v); got != c.want {
			t.Errorf("FormatNumber(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}
