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
		SourceFace: [2]orb.Point{{60, 45}, {60, 55}}, SourceZone: orb.Ring{{60, 45}, {60, 55}, {50, 55}, {50, 45}, {60, 45}},
		Receptors: []Mark{{Label: "MW-1", X: 120, Y: 52}}, XMin: 0, XMax: 200, YMin: 0, YMax: 100, FlowAzimuthDeg: 90})
	if err != nil {
		t.Fatal(err)
	}
	return map[string]*Figure{"breakthrough": bt, "profile": pr, "map": mp}
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

// Round ticks: 1, 2 or 5 times a power of ten; decade ticks label powers of ten.
func TestTicks(t *testing.T) {
	var labels []string
	for _, tk := range (roundTicks{}).Ticks(1203.7, 1796.2) {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	if strings.Join(labels, " ") != "1300 1400 1500 1600 1700" {
		t.Errorf("round ticks %v", labels)
	}
	labels = labels[:0]
	for _, tk := range (decadeTicks{}).Ticks(math.Log10(0.0005), math.Log10(24)) {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	if strings.Join(labels, " ") != "0.001 0.01 0.1 1 10" {
		t.Errorf("decade ticks %v", labels)
	}
}
