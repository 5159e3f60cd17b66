package api

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
	"strings"

	"github.com/labstack/echo/v4"
	"github.com/paulmach/orb/geojson"

	"downgradient/plume"
)

// mapBody is the body of POST /v1/plume-maps: the scenario and the map options.
type mapBody struct {
	Scenario scenarioBody `json:"scenario"`
	plume.MapOptions
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
	if p := decodeStrict(body, &mb); p != nil {
		return p
	}
	if p := s.checkWorkload(mb.Scenario.Scenario); p != nil {
		return prefixProblem(p, "scenario.")
	}
	mp, p := runEngine(c.Request().Context(), s, func(ctx context.Context) (*plume.Map, error) {
		return plume.PlumeMap(ctx, mb.Scenario.Scenario, mb.MapOptions, plume.Options{EngineVersion: s.cfg.Version})
	})
	if p != nil {
		return p
	}
	switch format {
	case "grid":
		return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, gridDocument(mp))
	case "csv":
		return c.Blob(http.StatusOK, mimeCSV+"; charset=utf-8", gridCSV(mp))
	}
	return writeJSON(c, http.StatusOK, mimeGeoJSON, outlineCollection(mp))
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

// decodeStrict decodes a schema-checked body into v, refusing unknown fields.
func decodeStrict(body []byte, v any) *Problem {
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	err := dec.Decode(v)
	if err == nil {
		return nil
	}
	var ute *json.UnmarshalTypeError
	if errors.As(err, &ute) {
		if strings.HasPrefix(ute.Value, "number") {
			return newProblem(kindInvalid, "a number is out of the range of a 64-bit float",
				FieldProblem{Field: ute.Field, Message: "number out of range: " + ute.Value})
		}
		return newProblem(kindMalformed, "wrong JSON type",
			FieldProblem{Field: ute.Field, Message: fmt.Sprintf("wrong type: must be %s, got %s", ute.Type, ute.Value)})
	}
	return newProblem(kindMalformed, "the body does not decode: "+err.Error(), FieldProblem{Field: "", Message: err.Error()})
}

// prefixProblem prefixes the field names of p.
func prefixProblem(p *Problem, prefix string) *Problem {
	for i := range p.Errors {
		p.Errors[i].Field = prefix + p.Errors[i].Field
	}
	return p
}

// runEngine runs f under the per-request deadline in its own goroutine (so
// the answer leaves at the deadline) and maps its errors: FieldErrors 422,
// a map over the limits 413 with the fields, a deadline 503.
func runEngine[T any](ctx context.Context, s *server, f func(context.Context) (T, error)) (T, *Problem) {
	ctx, cancel := context.WithTimeout(ctx, s.cfg.RequestTimeout)
	defer cancel()
	type outcome struct {
		v   T
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				slog.Error("panic in the engine", "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
				done <- outcome{err: errEnginePanic}
			}
		}()
		v, err := f(ctx)
		done <- outcome{v, err}
	}()
	var zero T
	var o outcome
	select {
	case o = <-done:
	case <-ctx.Done():
		return zero, s.problemFromScreen(ctx, ctx.Err(), nil)
	}
	switch {
	case o.err == nil:
		return o.v, nil
	case errors.Is(o.err, errEnginePanic):
		return zero, newProblem(kindInternal, "the server could not complete the request")
	}
	if fe := plume.OverLimitFields(o.err); len(fe) > 0 {
		fps := make([]FieldProblem, len(fe))
		for i, e := range fe {
			fps[i] = FieldProblem{Field: e.Field, Message: e.Message}
		}
		return zero, newProblem(kindTooLarge, "the map is over the limits", fps...)
	}
	return zero, s.problemFromScreen(ctx, o.err, nil)
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

func infoOf(mp *plume.Map) gridInfo {
	g := mp.Grid
	axes := [2]string{"x", "y"}
	if mp.View == plume.ViewSection {
		axes = [2]string{"plume_x", "depth"}
	}
	return gridInfo{Axes: axes, Origin: [2]float64{g.X0, g.Y0}, Spacing: [2]float64{g.DX, g.DY}, NX: g.NX, NY: g.NY}
}

// outlineCollection is the GeoJSON answer: one MultiPolygon feature per
// level, with the map's context as foreign members.
func outlineCollection(mp *plume.Map) *geojson.FeatureCollectionOf[outlineProps] {
	fc := &geojson.FeatureCollectionOf[outlineProps]{Type: "FeatureCollection"}
	for i, o := range mp.Outlines {
		fc.Features = append(fc.Features, &geojson.FeatureOf[outlineProps]{
			Type:     "Feature",
			ID:       fmt.Sprintf("level-%d", i+1),
			Geometry: o.Geometry,
			Properties: outlineProps{Level: o.Level, Area: o.Area, Length: o.Length, Width: o.Width,
				Perimeter: o.Perimeter, Reach: o.Reach, Polygons: len(o.Geometry)},
		})
	}
	if fc.Features == nil {
		fc.Features = []*geojson.FeatureOf[outlineProps]{}
	}
	fc.ExtraMembers = geojson.Properties{
		"engine": mp.Engine, "units": mp.Units, "view": mp.View, "time": mp.Time,
		"depth": mp.Depth, "depth_bottom": mp.DepthBottom, "method": mp.Method, "levels": mp.Levels,
		"grid": infoOf(mp), "steady_plume_length": mp.SteadyPlumeLength,
		"derived": mp.Derived, "caveats": mp.Caveats,
	}
	return fc
}

// gridDoc is the ?format=grid answer.
type gridDoc struct {
	Engine  plume.Engine  `json:"engine"`
	Units   plume.Units   `json:"units"`
	View    string        `json:"view"`
	Time    plume.MapTime `json:"time"`
	Depth   float64       `json:"depth"`
	DepthB  *float64      `json:"depth_bottom"`
	Method  string        `json:"method"`
	Axes    [2]string     `json:"axes"`
	Origin  [2]float64    `json:"origin"`
	Spacing [2]float64    `json:"spacing"`
	NX      int           `json:"nx"`
	NY      int           `json:"ny"`
	// Values[j][i] at origin + (i*spacing[0], j*spacing[1]).
	Values  [][]float64    `json:"values"`
	Caveats []plume.Caveat `json:"caveats"`
}

func gridDocument(mp *plume.Map) gridDoc {
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
func gridCSV(mp *plume.Map) []byte {
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
