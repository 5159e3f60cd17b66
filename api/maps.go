package api

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"

	"github.com/labstack/echo/v4"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"

	"downgradient/plume"
	"downgradient/plume/maps"
)

// mapBody is the body of POST /v1/plume-maps: the scenario and the map options.
type mapBody struct {
	Scenario scenarioBody `json:"scenario"`
	maps.MapOptions
}

// plumeMaps is POST /v1/plume-maps: outlines as GeoJSON (default), the grid
// as JSON (?format=grid) or CSV rows x, y, value (?format=csv or Accept: text/csv).
func (s *server) plumeMaps(c echo.Context) error {
	format, p := negotiateMap(c)
	if p != nil {
		return p
	}
	body, _ := c.Get(ctxBody).([]byte)
	var mb mapBody
	if p := decodeBody(body, &mb, true); p != nil {
		return p
	}
	if p := mb.Scenario.checkFreeText(); p != nil {
		return p.under("scenario")
	}
	ctx := c.Request().Context()
	if err := plume.CheckWorkload(mb.Scenario.Scenario, s.cfg.MaxEvaluations); err != nil {
		return s.problemFromError(ctx, err, func(f string) string { return "scenario." + f })
	}
	if p := s.checkOutput(mapSize(mb.MapOptions, format), mapMedia[format], mapReduce...); p != nil {
		return p
	}
	r, p := compute(ctx, s, nil, func(ctx context.Context) (*reply, error) {
		mp, err := maps.PlumeMap(ctx, mb.Scenario.Scenario, mb.MapOptions, s.engineOptions())
		if err != nil {
			return nil, err
		}
		return s.encodeMap(ctx, format, mp)
	})
	if p != nil {
		return p
	}
	return s.send(c, r)
}

// mapReduce are the fields that make a map's answer large.
var mapReduce = []string{"cells", "levels"}

// mapMedia names the media type of each map format, for messages.
var mapMedia = map[string]string{"grid": "application/json", "csv": "text/csv", "geojson": "application/geo+json"}

// encodeMap encodes a map in format within the output budget.
func (s *server) encodeMap(ctx context.Context, format string, mp *maps.Map) (*reply, error) {
	runHook(&testHookEncode, ctx)
	switch format {
	case "grid":
		return s.encodeJSON(gridDocument(mp), echo.MIMEApplicationJSON, mapReduce...)
	case "csv":
		return s.capBytes(&reply{contentType: mimeCSV + "; charset=utf-8", body: gridCSV(mp)}, mapReduce...)
	}
	return s.encodeJSON(newOutlineCollection(mp), mimeGeoJSON, mapReduce...)
}

// negotiateMap picks geojson (default; also for application/json), grid or
// csv; the format parameter wins over Accept.
func negotiateMap(c echo.Context) (string, *Problem) {
	if f := c.QueryParam("format"); f != "" {
		return f, nil
	}
	best, ok := acceptBest(c, "geojson", mapTypes)
	if !ok {
		return "", newProblem(kindNotAccept,
			"plume maps are available as application/geo+json (or application/json with ?format=grid) and text/csv; the Accept header admits none of them",
			FieldProblem{Field: "Accept", Message: "admits none of application/geo+json, application/json, text/csv"})
	}
	return best, nil
}

// outlineProps are the properties of one outline feature.
type outlineProps struct {
	// Level, in the request's concentration unit.
	Level float64 `json:"level"`
	// Area inside the outline (holes excluded), L^2.
	Area float64 `json:"area"`
	// Extent along the flow direction, L.
	Length float64 `json:"length"`
	// Greatest extent across the flow (plan) or in depth (section), L.
	Width float64 `json:"width"`
	// Total length of every ring, L.
	Perimeter float64 `json:"perimeter"`
	// Farthest distance downgradient of the source face, L.
	Reach float64 `json:"reach"`
	// Number of separate polygons.
	Polygons int `json:"polygons"`
}

// gridInfo describes a map grid without its values.
type gridInfo struct {
	Axes    [2]string  `json:"axes"`
	Origin  [2]float64 `json:"origin"`
	Spacing [2]float64 `json:"spacing"`
	NX      int        `json:"nx"`
	NY      int        `json:"ny"`
}

func infoOf(mp *maps.Map) gridInfo {
	g := mp.Grid
	axes := [2]string{"x", "y"}
	if mp.View == maps.ViewSection {
		axes = [2]string{"plume_x", "depth"}
	}
	return gridInfo{Axes: axes, Origin: [2]float64{g.X0, g.Y0}, Spacing: [2]float64{g.DX, g.DY}, NX: g.NX, NY: g.NY}
}

// outlineCollection is the GeoJSON answer: one MultiPolygon feature per
// level, type and features first (a GIS reader looks for them at the start
// of the document), the map's context after them as foreign members. A
// plan view of a scenario with a crs is in WGS 84 longitude/latitude.
type outlineCollection struct {
	Type              string                             `json:"type"`
	Features          []*geojson.FeatureOf[outlineProps] `json:"features"`
	CoordinateFrame   string                             `json:"coordinate_frame"`
	Engine            plume.Engine                       `json:"engine"`
	Units             plume.Units                        `json:"units"`
	View              string                             `json:"view"`
	Time              maps.MapTime                       `json:"time"`
	Depth             float64                            `json:"depth"`
	DepthBottom       *float64                           `json:"depth_bottom"`
	Method            string                             `json:"method"`
	Levels            []float64                          `json:"levels"`
	Grid              gridInfo                           `json:"grid"`
	SteadyPlumeLength *maps.PlumeLength                  `json:"steady_plume_length"`
	Derived           plume.Derived                      `json:"derived"`
	Caveats           []plume.Caveat                     `json:"caveats"`
}

func newOutlineCollection(mp *maps.Map) *outlineCollection {
	fc := &outlineCollection{Type: "FeatureCollection", Features: []*geojson.FeatureOf[outlineProps]{},
		Engine: mp.Engine, Units: mp.Units, View: mp.View, Time: mp.Time, Depth: mp.Depth, DepthBottom: mp.DepthBottom,
		Method: mp.Method, Levels: mp.Levels, Grid: infoOf(mp), SteadyPlumeLength: mp.SteadyPlumeLength,
		Derived: mp.Derived, Caveats: mp.Caveats}
	project := outlineFrame(mp, &fc.CoordinateFrame)
	for i, o := range mp.Outlines {
		fc.Features = append(fc.Features, &geojson.FeatureOf[outlineProps]{
			Type:     "Feature",
			ID:       fmt.Sprintf("level-%d", i+1),
			Geometry: project(o.Geometry),
			Properties: outlineProps{Level: o.Level, Area: o.Area, Length: o.Length, Width: o.Width,
				Perimeter: o.Perimeter, Reach: o.Reach, Polygons: len(o.Geometry)},
		})
	}
	return fc
}

// outlineFrame returns the map from a map's outline coordinates to the
// GeoJSON ones: WGS 84 longitude/latitude for a plan view with a crs, else
// the map's own frame; frame says which.
func outlineFrame(mp *maps.Map, frame *string) func(orb.MultiPolygon) orb.MultiPolygon {
	same := func(g orb.MultiPolygon) orb.MultiPolygon { return g }
	if mp.View == maps.ViewSection {
		*frame = "vertical section: x is plume_x (along the flow from the source face) and y is depth below the water table, in " + mp.Units.Length
		return same
	}
	toLonLat := geoFrame(mp.CRS, mp.Units, frame)
	if mp.CRS == "" {
		return same
	}
	return func(g orb.MultiPolygon) orb.MultiPolygon {
		out := make(orb.MultiPolygon, len(g))
		for i, poly := range g {
			out[i] = make(orb.Polygon, len(poly))
			for j, ring := range poly {
				out[i][j] = make(orb.Ring, len(ring))
				for k, pt := range ring {
					if p := toLonLat(pt[0], pt[1]); p != nil {
						out[i][j][k] = orb.Point{p.Coordinates[0], p.Coordinates[1]}
					}
				}
			}
		}
		return out
	}
}

// gridDoc is the ?format=grid answer.
type gridDoc struct {
	Engine  plume.Engine `json:"engine"`
	Units   plume.Units  `json:"units"`
	View    string       `json:"view"`
	Time    maps.MapTime `json:"time"`
	Depth   float64      `json:"depth"`
	DepthB  *float64     `json:"depth_bottom"`
	Method  string       `json:"method"`
	Axes    [2]string    `json:"axes"`
	Origin  [2]float64   `json:"origin"`
	Spacing [2]float64   `json:"spacing"`
	NX      int          `json:"nx"`
	NY      int          `json:"ny"`
	// Values[j][i] at origin + (i*spacing[0], j*spacing[1]).
	Values  [][]float64    `json:"values"`
	Caveats []plume.Caveat `json:"caveats"`
}

func gridDocument(mp *maps.Map) gridDoc {
	info := infoOf(mp)
	g := mp.Grid
	rows := make([][]float64, g.NY)
	for j := range rows {
		rows[j] = g.Values[j*g.NX : (j+1)*g.NX]
	}
	return gridDoc{Engine: mp.Engine, Units: mp.Units, View: mp.View, Time: mp.Time, Depth: mp.Depth,
		DepthB: mp.DepthBottom, Method: mp.Method, Axes: info.Axes, Origin: info.Origin, Spacing: info.Spacing,
		NX: g.NX, NY: g.NY, Values: rows, Caveats: mp.Caveats}
}

// gridCSV writes one row per node: x, y, value (plume_x, depth, value for a section).
func gridCSV(mp *maps.Map) []byte {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	L, C := unitToken(mp.Units.Length), unitToken(mp.Units.Concentration)
	info := infoOf(mp)
	_ = w.Write([]string{info.Axes[0] + "_" + L, info.Axes[1] + "_" + L, "concentration_" + C})
	g := mp.Grid
	for j := range g.NY {
		y := formatNumber(g.Y(j))
		for i := range g.NX {
			_ = w.Write([]string{formatNumber(g.X(i)), y, formatNumber(g.At(i, j))})
		}
	}
	w.Flush()
	return buf.Bytes()
}

// mapTypes are the media types a plume map is offered in.
var mapTypes = map[string]string{
	mimeGeoJSON: "geojson", "application/json": "geojson", "application/*": "geojson", "*/*": "geojson",
	mimeCSV: "csv", "text/*": "csv",
}
