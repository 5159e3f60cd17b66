package maps

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"

	"github.com/paulmach/orb"

	"downgradient/internal/contour"
	"downgradient/plume"
)

// Map views.
const (
	ViewPlan    = "plan"    // horizontal grid in the site frame at a depth
	ViewSection = "section" // vertical grid along the plume centreline: plume_x by depth
)

// Limits and defaults of a plume map.
const (
	// DefaultMapCells is the node budget of a map grid when none is given.
	DefaultMapCells = 20_000
	// MaxMapCells is the largest node count a map may ask for (413 beyond).
	MaxMapCells = 250_000
	// MaxMapLevels is the most outline levels one map may ask for.
	MaxMapLevels = 20
)

// MapTime is the time of a map: a number (T since the source started) or
// the string "steady" for the steady state.
type MapTime struct {
	// Steady is true for the steady state.
	Steady bool
	// Value is the time, T, when not Steady.
	Value float64
}

// MarshalJSON writes the number or "steady".
func (t MapTime) MarshalJSON() ([]byte, error) {
	if t.Steady {
		return []byte(`"steady"`), nil
	}
	return json.Marshal(t.Value)
}

// UnmarshalJSON reads a number or "steady".
func (t *MapTime) UnmarshalJSON(b []byte) error {
	b = bytes.TrimSpace(b)
	if string(b) == `"steady"` {
		*t = MapTime{Steady: true}
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return errors.New(`time must be a number >= 0 or "steady"`)
	}
	*t = MapTime{Value: v}
	return nil
}

// MapOptions are the map-specific fields of a plume-map request (DESIGN.md
// section 4b); lengths, times and concentrations in the scenario's units.
type MapOptions struct {
	// Time of the map; null or absent means the steady state.
	Time *MapTime `json:"time"`
	// View: "plan" (default) or "section".
	View string `json:"view,omitempty"`
	// Depth below the water table of a plan view, L, >= 0; default 0 (the
	// water table, where a source reaching it is strongest).
	Depth *float64 `json:"depth"`
	// When given, a plan view shows the average over depth..depth_bottom
	// (like a well screen), L, >= depth.
	DepthBottom *float64 `json:"depth_bottom"`
	// Outline levels, C, each > 0; default the screening level and 10 and
	// 100 times it.
	Levels []float64 `json:"levels"`
	// Node budget of the grid; default DefaultMapCells, at most MaxMapCells.
	Cells *int `json:"cells"`
	// Node spacing, L, > 0; replaces the budget (the node count must still
	// be at most MaxMapCells). For a section it is the spacing along flow.
	Spacing *float64 `json:"spacing"`
	// Extent of the grid; default: the plume above the lowest level, the
	// source and the receptors, with a margin. Site x and y for a plan
	// view, plume_x and depth for a section.
	Extent *Extent `json:"extent"`
	// Method: "exact" (default) or "domenico".
	Method string `json:"method,omitempty"`
	// The compound mapped, for a scenario of several (contaminants[]);
	// "" for a scenario of one (see plume.Model.Focus).
	Compound string `json:"compound,omitempty"`
}

// Extent is a rectangle of the map's frame, L.
type Extent struct {
	XMin float64 `json:"x_min"`
	XMax float64 `json:"x_max"`
	YMin float64 `json:"y_min"`
	YMax float64 `json:"y_max"`
}

// Map is a gridded concentration field with its outlines. Numbers are in
// the request's units. The grid of a plan view is in the site frame (x
// east, y north); that of a section has x = plume_x (along flow from the
// source face) and y = depth below the water table.
type Map struct {
	Engine plume.Engine `json:"engine"`
	Units  plume.Units  `json:"units"`
	View   string       `json:"view"`
	Time   MapTime      `json:"time"`
	Depth  float64      `json:"depth"`
	// Bottom of the averaged depth interval of a plan view; null for a point depth.
	DepthBottom *float64  `json:"depth_bottom"`
	Method      string    `json:"method"`
	Levels      []float64 `json:"levels"`
	// Grid of values; encoded by the api layer.
	Grid Grid `json:"-"`
	// One outline per level, in Levels order.
	Outlines []Outline `json:"-"`
	// Steady-state plume length to the screening level along the centreline.
	SteadyPlumeLength *PlumeLength `json:"steady_plume_length"`
	// The flow frame: source face centre and flow azimuth.
	Frame plume.Frame `json:"-"`
	// Source width (0 for a column or a spill), L.
	SourceWidth float64 `json:"-"`
	// Receptors in the map's frame (site x, y; for a section plume_x, depth).
	Receptors []MapPoint `json:"-"`
	// The site frame's coordinate reference system ("" without one).
	CRS     string         `json:"-"`
	Derived plume.Derived  `json:"derived"`
	Caveats []plume.Caveat `json:"caveats"`
}

// MapPoint is a labelled point of a map.
type MapPoint struct {
	ID   string
	X, Y float64
}

// PlumeLength is the distance along the centreline from the source face to
// where the steady-state exact concentration falls to Level.
type PlumeLength struct {
	// Level, C (the screening level).
	Level float64 `json:"level"`
	// Length, L; null when the concentration does not fall to the level
	// within MaxPlumeLength (for example a column without decay).
	Length *float64 `json:"length"`
	// Depth of the centreline, L (the map's depth).
	Depth float64 `json:"depth"`
	// How the length was found.
	Method string `json:"method"`
}

// MaxPlumeLength is the farthest a plume length is searched, m.
const MaxPlumeLength = 1e6

// Outline is the region at or above one level.
type Outline struct {
	// Level, C.
	Level float64
	// Geometry in the map's frame; empty when nothing reaches the level.
	Geometry orb.MultiPolygon
	// Area, L^2.
	Area float64
	// Extent along the flow direction (plume_x), L.
	Length float64
	// Greatest extent across the flow (plan) or in depth (section), L.
	Width float64
	// Perimeter of every ring, L.
	Perimeter float64
	// Farthest plume_x reached, L (downgradient reach from the source face).
	Reach float64
}

// validateMapOptions checks the map fields (scenario fields are checked by
// Validate) and returns 422-class and 413-class errors separately.
func validateMapOptions(mo MapOptions) (bad, over plume.FieldErrors) {
	if t := mo.Time; t != nil && !t.Steady {
		if !plume.Finite(t.Value) || t.Value < 0 {
			bad.Add("time", fmt.Sprintf(`must be a finite number >= 0 or "steady", got %g`, t.Value))
		}
	}
	switch mo.View {
	case "", ViewPlan, ViewSection:
	default:
		bad.Add("view", fmt.Sprintf(`must be "plan" or "section", got %q`, mo.View))
	}
	switch mo.Method {
	case "", plume.MethodExact, plume.MethodDomenico:
	default:
		bad.Add("method", fmt.Sprintf(`must be "exact" or "domenico", got %q`, mo.Method))
	}
	bad.Check("depth", mo.Depth, plume.NonNegative)
	bad.Check("depth_bottom", mo.DepthBottom, plume.NonNegative)
	if mo.DepthBottom != nil && mo.Depth != nil && *mo.DepthBottom < *mo.Depth {
		bad.Add("depth_bottom", fmt.Sprintf("must be >= depth (%g), got %g", *mo.Depth, *mo.DepthBottom))
	}
	for i, l := range mo.Levels {
		lv := l
		bad.Check(fmt.Sprintf("levels[%d]", i), &lv, plume.Positive)
	}
	if len(mo.Levels) > MaxMapLevels {
		over.Add("levels", fmt.Sprintf("%d levels; at most %d allowed", len(mo.Levels), MaxMapLevels))
	}
	if c := mo.Cells; c != nil {
		switch {
		case *c < 4:
			bad.Add("cells", fmt.Sprintf("must be >= 4, got %d", *c))
		case *c > MaxMapCells:
			over.Add("cells", fmt.Sprintf("%d cells; at most %d allowed", *c, MaxMapCells))
		}
	}
	bad.Check("spacing", mo.Spacing, plume.Positive)
	if e := mo.Extent; e != nil {
		for _, v := range []struct {
			name string
			v    float64
		}{{"extent.x_min", e.XMin}, {"extent.x_max", e.XMax}, {"extent.y_min", e.YMin}, {"extent.y_max", e.YMax}} {
			if !plume.Finite(v.v) {
				bad.Add(v.name, "must be a finite number")
			}
		}
		switch {
		case !(e.XMax > e.XMin):
			bad.Add("extent.x_max", fmt.Sprintf("must be > extent.x_min (%g), got %g", e.XMin, e.XMax))
		case !plume.Finite(e.XMax - e.XMin):
			bad.Add("extent.x_max", fmt.Sprintf("the width x_max - x_min (%g - %g) must be a finite number", e.XMax, e.XMin))
		}
		switch {
		case !(e.YMax > e.YMin):
			bad.Add("extent.y_max", fmt.Sprintf("must be > extent.y_min (%g), got %g", e.YMin, e.YMax))
		case !plume.Finite(e.YMax - e.YMin):
			bad.Add("extent.y_max", fmt.Sprintf("the height y_max - y_min (%g - %g) must be a finite number", e.YMax, e.YMin))
		}
		if mo.View == ViewSection && e.YMin < 0 {
			bad.Add("extent.y_min", fmt.Sprintf("a section's depth must be >= 0, got %g", e.YMin))
		}
	}
	return bad, over
}

// Grid is a regular grid of node values (see package contour).
type Grid = contour.Grid

// FigureLevels are the outline levels of a figure's map: nil (the default:
// the screening level and 10 and 100 times it) when a screening level is
// known, else a thousandth, a hundredth and a tenth of the source
// concentration (of 1 for a spill), so that a map can be drawn without a level.
func FigureLevels(sc plume.Scenario, screeningLevel *float64) []float64 {
	if screeningLevel != nil {
		return nil
	}
	c0 := 1.0
	if sc.Source.Concentration != nil {
		c0 = *sc.Source.Concentration
	}
	return []float64{c0 * 1e-3, c0 * 1e-2, c0 * 1e-1}
}
