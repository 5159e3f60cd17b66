// Package svgtext finds where the text of an SVG document written by
// gonum.org/v1/plot's SVG backend lies on the page: the bounding box of
// each <text> element in viewport coordinates (points, y down), from the
// element's position, the transforms of its groups and its own, and the
// metrics of its font (the Liberation faces gonum plot ships). Tests use
// it to check that no two labels of a figure overlap.
package svgtext

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/font/liberation"
	"gonum.org/v1/plot/vg"
)

// Box is a text element's bounding box in viewport coordinates.
type Box struct {
	Text                   string
	MinX, MinY, MaxX, MaxY float64
}

// Overlaps reports whether a and b share more than tol points in both
// directions (touching boxes and rounding do not count).
func (a Box) Overlaps(b Box, tol float64) bool {
	return math.Min(a.MaxX, b.MaxX)-math.Max(a.MinX, b.MinX) > tol &&
		math.Min(a.MaxY, b.MaxY)-math.Max(a.MinY, b.MinY) > tol
}

// affine is the matrix [a c e; b d f; 0 0 1] of an SVG transform.
type affine struct{ a, b, c, d, e, f float64 }

var identity = affine{a: 1, d: 1}

// then is m followed by n applied inside it: a point p maps to m(n(p)).
func (m affine) then(n affine) affine {
	return affine{
		a: m.a*n.a + m.c*n.b, b: m.b*n.a + m.d*n.b,
		c: m.a*n.c + m.c*n.d, d: m.b*n.c + m.d*n.d,
		e: m.a*n.e + m.c*n.f + m.e, f: m.b*n.e + m.d*n.f + m.f,
	}
}

func (m affine) apply(x, y float64) (float64, float64) {
	return m.a*x + m.c*y + m.e, m.b*x + m.d*y + m.f
}

var transformOp = regexp.MustCompile(`(scale|translate|rotate)\(([^)]*)\)`)

// parseTransform reads the scale, translate and rotate operations of an
// SVG transform attribute, left to right.
func parseTransform(s string) (affine, error) {
	m := identity
	for _, op := range transformOp.FindAllStringSubmatch(s, -1) {
		var args []float64
		for _, f := range strings.FieldsFunc(op[2], func(r rune) bool { return r == ',' || r == ' ' }) {
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				return m, fmt.Errorf("svgtext: transform %q: %v", s, err)
			}
			args = append(args, v)
		}
		for len(args) < 2 {
			args = append(args, map[string]float64{"scale": args[0], "translate": 0, "rotate": 0}[op[1]])
		}
		switch op[1] {
		case "scale":
			m = m.then(affine{a: args[0], d: args[1]})
		case "translate":
			m = m.then(affine{a: 1, d: 1, e: args[0], f: args[1]})
		case "rotate":
			s, c := math.Sincos(args[0] * math.Pi / 180)
			m = m.then(affine{a: c, b: s, c: -s, d: c})
		}
	}
	return m, nil
}

var fontSize = regexp.MustCompile(`font-size:([0-9.]+)px`)
var fontFamily = regexp.MustCompile(`font-family:([^;]+)`)

// fonts are the faces gonum plot writes, by SVG family name.
var fonts = font.NewCache(liberation.Collection())

// face is the font of a text element's style.
func face(style string) (font.Face, error) {
	sz := fontSize.FindStringSubmatch(style)
	if sz == nil {
		return font.Face{}, fmt.Errorf("svgtext: no font size in %q", style)
	}
	size, err := strconv.ParseFloat(sz[1], 64)
	if err != nil {
		return font.Face{}, err
	}
	f := font.Font{Typeface: "Liberation", Variant: "Sans", Size: vg.Points(size)}
	if fam := fontFamily.FindStringSubmatch(style); fam != nil {
		switch {
		case strings.Contains(fam[1], "Mono"):
			f.Variant = "Mono"
		case strings.Contains(fam[1], "Serif"):
			f.Variant = "Serif"
		}
	}
	return fonts.Lookup(f, f.Size), nil
}

// Boxes lists the bounding box of every non-empty text element of svg.
func Boxes(svg []byte) ([]Box, error) {
	dec := xml.NewDecoder(bytes.NewReader(svg))
	stack := []affine{identity}
	var out []Box
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return nil, err
		}
		switch t := tok.(type) {
		case xml.StartElement:
			m, err := parseTransform(attr(t, "transform"))
			if err != nil {
				return nil, err
			}
			if t.Name.Local != "text" {
				stack = append(stack, stack[len(stack)-1].then(m))
				continue
			}
			b, err := textBox(dec, t, stack[len(stack)-1].then(m))
			if err != nil {
				return nil, err
			}
			if b.Text != "" {
				out = append(out, b)
			}
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		}
	}
}

// textBox reads a text element's content (consuming its end tag) and
// maps its box through m.
func textBox(dec *xml.Decoder, t xml.StartElement, m affine) (Box, error) {
	var content strings.Builder
	for {
		tok, err := dec.Token()
		if err != nil {
			return Box{}, err
		}
		if cd, ok := tok.(xml.CharData); ok {
			content.Write(cd)
		}
		if _, ok := tok.(xml.EndElement); ok {
			break
		}
	}
	txt := strings.TrimSpace(content.String())
	if txt == "" {
		return Box{}, nil
	}
	x, errX := strconv.ParseFloat(attr(t, "x"), 64)
	y, errY := strconv.ParseFloat(attr(t, "y"), 64)
	if errX != nil || errY != nil {
		return Box{}, fmt.Errorf("svgtext: text %q without a position", txt)
	}
	fc, err := face(attr(t, "style"))
	if err != nil {
		return Box{}, err
	}
	w, e := float64(fc.Width(txt)), fc.Extents()
	b := Box{Text: txt, MinX: math.Inf(1), MinY: math.Inf(1), MaxX: math.Inf(-1), MaxY: math.Inf(-1)}
	// In the element's own system y grows down: the glyphs rise above the baseline.
	for _, c := range [][2]float64{{x, y - float64(e.Ascent)}, {x + w, y - float64(e.Ascent)}, {x, y + float64(e.Descent)}, {x + w, y + float64(e.Descent)}} {
		px, py := m.apply(c[0], c[1])
		b.MinX, b.MaxX = math.Min(b.MinX, px), math.Max(b.MaxX, px)
		b.MinY, b.MaxY = math.Min(b.MinY, py), math.Max(b.MaxY, py)
	}
	return b, nil
}

func attr(t xml.StartElement, name string) string {
	for _, a := range t.Attr {
		if a.Name.Local == name {
			return a.Value
		}
	}
	return ""
}

// Overlapping lists the pairs of text boxes of svg that overlap by more
// than tol points, as "a" / "b" descriptions.
func Overlapping(svg []byte, tol float64) ([]string, error) {
	boxes, err := Boxes(svg)
	if err != nil {
		return nil, err
	}
	var out []string
	for i := range boxes {
		for j := i + 1; j < len(boxes); j++ {
			if boxes[i].Overlaps(boxes[j], tol) {
				out = append(out, fmt.Sprintf("%q %+v / %q %+v", boxes[i].Text, boxes[i], boxes[j].Text, boxes[j]))
			}
		}
	}
	return out, nil
}
