package svgtext

import (
	"math"
	"testing"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// A page as gonum's SVG backend writes it (y flipped for the whole page,
// each text flipped back), with one level and one rotated text.
const page = `<?xml version="1.0"?>
<svg width="100pt" height="50pt" viewBox="0 0 100 50" xmlns="http://www.w3.org/2000/svg">
<g transform="scale(1, -1) translate(0, -50)">
<path d="M0,0L100,0" style="fill:none" />
<text x="10" y="-20" transform="scale(1, -1)"
	style="font-family:Liberation Sans;font-variant:normal;font-weight:normal;font-style:normal;font-size:10px">Hi</text>
<g transform="rotate(90)">
<text x="5" y="-3" transform="scale(1, -1)"
	style="font-family:Liberation Sans;font-size:10px">Up</text>
</g>
<text x="12" y="-21" transform="scale(1, -1)" style="font-family:Liberation Sans;font-size:10px">Hi</text>
<text x="80" y="-20" transform="scale(1, -1)" style="font-family:Liberation Sans;font-size:10px"> </text>
</g>
</svg>`

func near(a, b float64) bool { return math.Abs(a-b) < 1e-9 }

// The boxes follow from the positions, the transforms and the metrics of
// Liberation Sans at 10 pt, worked by hand: a level text at canvas (10, 20)
// has its baseline at viewport y = 50 - 20 = 30; a text in a group rotated
// by 90 degrees reads upward from viewport (-3, 45).
func TestBoxes(t *testing.T) {
	boxes, err := Boxes([]byte(page))
	if err != nil {
		t.Fatal(err)
	}
	if len(boxes) != 3 {
		t.Fatalf("%d boxes, want 3 (an empty text has none): %+v", len(boxes), boxes)
	}
	fc := fonts.Lookup(font.Font{Typeface: "Liberation", Variant: "Sans"}, vg.Points(10))
	e := fc.Extents()
	asc, desc := float64(e.Ascent), float64(e.Descent)
	hi, up := boxes[0], boxes[1]
	w := float64(fc.Width("Hi"))
	if !near(hi.MinX, 10) || !near(hi.MaxX, 10+w) || !near(hi.MinY, 30-asc) || !near(hi.MaxY, 30+desc) {
		t.Errorf("level text %+v; want x 10..%g, y %g..%g", hi, 10+w, 30-asc, 30+desc)
	}
	wu := float64(fc.Width("Up"))
	if !near(up.MinX, -3-asc) || !near(up.MaxX, -3+desc) || !near(up.MaxY, 45) || !near(up.MinY, 45-wu) {
		t.Errorf("rotated text %+v; want x %g..%g, y %g..45", up, -3-asc, -3+desc, 45-wu)
	}
	if !boxes[0].Overlaps(boxes[2], 0.3) || boxes[0].Overlaps(boxes[1], 0.3) {
		t.Error("overlap test")
	}
	pairs, err := Overlapping([]byte(page), 0.3)
	if err != nil || len(pairs) != 1 {
		t.Errorf("overlapping pairs %v, %v; want the two \"Hi\"", pairs, err)
	}
}
