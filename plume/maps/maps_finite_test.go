package maps

import (
	"context"
	"math"
	"testing"

	"downgradient/plume"
)

// Issue 12, item 6: every map request that validates gives finite output.
// Extents so wide that their width, or their corners in the plume frame,
// overflow, spacings so small that the origin overflows, and times that
// overflow when converted to days are refused with the field named; before,
// an extent of -1e308..1e308 gave NaN coordinates (a 500 for JSON, NaN
// rows in CSV). Whatever validates must have finite grid coordinates,
// values, outlines and lengths.
func TestPlumeMapExtremeOptionsFinite(t *testing.T) {
	f := func(v float64) *float64 { return &v }
	ext := func(x0, x1, y0, y1 float64) *Extent { return &Extent{XMin: x0, XMax: x1, YMin: y0, YMax: y1} }
	cells := func(n int) *int { return &n }
	steady := &MapTime{Steady: true}
	cases := []struct {
		name  string
		units plume.Units
		mo    MapOptions
		field string // the field a refusal names; "" when the map may compute
		srcX  float64
	}{
		{"extent of the issue", plume.Units{}, MapOptions{Time: &MapTime{Value: 3650}, Extent: ext(-1e308, 1e308, -1e308, 1e308)}, "extent.x_max", 0},
		{"extent far from the source", plume.Units{}, MapOptions{Time: steady, Extent: ext(1.7e308, 1.75e308, 0, 10)}, "extent", -1.7e308},
		{"section extent of the issue", plume.Units{}, MapOptions{Time: steady, View: ViewSection, Extent: ext(-1e308, 1e308, 0, 1e308)}, "extent.x_max", 0},
		{"subnormal spacing", plume.Units{}, MapOptions{Time: steady, Spacing: f(5e-324), Extent: ext(0, 100, -50, 50)}, "spacing", 0},
		{"spacing wider than the extent", plume.Units{}, MapOptions{Time: steady, Spacing: f(1e300), Extent: ext(0, 100, -50, 50)}, "", 0},
		{"huge extent, few cells", plume.Units{}, MapOptions{Time: steady, Cells: cells(4), Extent: ext(-1e150, 1e150, -1e150, 1e150)}, "", 0},
		{"time overflowing in days", plume.Units{Time: plume.TimeYear}, MapOptions{Time: &MapTime{Value: 1e308}}, "time", 0},
		{"depth of 1e308 ft", plume.Units{Length: plume.LengthFoot}, MapOptions{Time: steady, Depth: f(1e308), Cells: cells(100)}, "", 0},
		{"level of 1e308", plume.Units{}, MapOptions{Time: steady, Levels: []float64{1e308}, Cells: cells(100)}, "", 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			sc := demoSiteScenario(t)
			sc.Units = tc.units
			if tc.srcX != 0 {
				sc.Source.X = &tc.srcX
			}
			mp, err := PlumeMap(context.Background(), sc, tc.mo, plume.Options{})
			if err != nil {
				e, ok := plume.AsError(err)
				if !ok || e.Kind == plume.KindInternal {
					t.Fatalf("error %v", err)
				}
				if tc.field == "" || !namesField(e, tc.field) {
					t.Fatalf("refused (want field %q): %v", tc.field, err)
				}
				return
			}
			if tc.field != "" {
				t.Fatalf("computed a map; want %q refused", tc.field)
			}
			checkMapFinite(t, mp)
		})
	}
}

func namesField(e *plume.Error, field string) bool {
	for _, f := range e.Fields {
		if f.Field == field {
			return true
		}
	}
	return false
}

// checkMapFinite fails on any non-finite number of a map.
func checkMapFinite(t *testing.T, mp *Map) {
	t.Helper()
	g := mp.Grid
	bad := func(what string, v float64) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("%s = %v", what, v)
		}
	}
	bad("origin x", g.X0)
	bad("origin y", g.Y0)
	bad("last x", g.X(g.NX-1))
	bad("last y", g.Y(g.NY-1))
	for i, v := range g.Values {
		bad("value", v)
		if i > 10_000 {
			break
		}
	}
	for _, o := range mp.Outlines {
		bad("area", o.Area)
		bad("length", o.Length)
		bad("reach", o.Reach)
		for _, poly := range o.Geometry {
			for _, ring := range poly {
				for _, p := range ring {
					bad("outline x", p[0])
					bad("outline y", p[1])
				}
			}
		}
	}
}
