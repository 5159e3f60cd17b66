package api

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"downgradient/plots"
	"downgradient/plume"
	"downgradient/plume/maps"
)

// Media types of the pictures.
const (
	mimeSVG = "image/svg+xml"
	mimePNG = "image/png"
)

// figureOptions are the picture options of /v1/plots and /v1/reports
// (query parameters; openapi.yaml documents them).
type figureOptions struct {
	// Scale of a breakthrough plot's concentration axis: plots.ScaleAuto
	// (default), ScaleLinear or ScaleLog.
	Scale string
	// Labels: the receptor label policy of the map, section and profile.
	Labels string
	// Time of the map and the section; nil for the steady state.
	Time *maps.MapTime
	// Levels of the map's and the section's outlines; nil for the default.
	Levels []float64
	// compact lays breakthrough plots out for half a page (the report).
	compact bool
}

// figureOptionsOf reads the picture options of a request.
func figureOptionsOf(c echo.Context) (figureOptions, *Problem) {
	o := figureOptions{Scale: c.QueryParam("scale"), Labels: c.QueryParam("labels")}
	if t := c.QueryParam("time"); t != "" && t != "steady" {
		v, err := strconv.ParseFloat(t, 64)
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) || v < 0 {
			return o, newProblem(kindInvalid, "time out of range", FieldProblem{Field: "time", Message: fmt.Sprintf(`must be a finite number >= 0 or "steady", got %q`, t)})
		}
		o.Time = &maps.MapTime{Value: v}
	}
	if l := c.QueryParam("levels"); l != "" {
		for _, part := range strings.Split(l, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(part), 64)
			if err != nil || math.IsInf(v, 0) || math.IsNaN(v) || !(v > 0) {
				return o, newProblem(kindInvalid, "levels out of range", FieldProblem{Field: "levels", Message: fmt.Sprintf("each level must be a finite number > 0, got %q", part)})
			}
			o.Levels = append(o.Levels, v)
		}
	}
	return o, nil
}

// renameFigureField names the map options' fields by the query
// parameters they come from ("levels[2]" is the parameter "levels").
func renameFigureField(f string) string {
	if strings.HasPrefix(f, "levels[") {
		return "levels"
	}
	return f
}

// plotsHandler is POST /v1/plots?kind=breakthrough|profile|map|section:
// one picture of a scenario as SVG (default) or PNG.
func (s *server) plotsHandler(c echo.Context) error {
	format, p := negotiatePicture(c)
	if p != nil {
		return p
	}
	opts, p := figureOptionsOf(c)
	if p != nil {
		return p
	}
	kind := c.QueryParam("kind")
	body, _ := c.Get(ctxBody).([]byte)
	sc, p := decodeScenario(body)
	if p != nil {
		return p
	}
	res, p := s.screen(c.Request().Context(), sc, nil)
	if p != nil {
		return p
	}
	views, err := memoViews(res)
	if err != nil {
		return s.problemFromError(c.Request().Context(), err, nil)
	}
	ri, ci, p := plotTarget(c, views)
	if p != nil {
		return p
	}
	needs := figureNeeds{opts: opts, profile: kind == kindProfile, planMap: kind == kindMap, section: kind == kindSection}
	if kind == kindBreakthrough {
		needs.breakthrough = []int{ri}
	} else {
		if ci == allCompounds {
			ci = firstMappable(sc, views)
		}
		needs.mapped = []mapTarget{{view: ci, name: views[ci].Name, time: opts.Time, levels: targetLevels(sc, views, ci, opts)}}
	}
	img, p := compute(c.Request().Context(), s, renameFigureField, func(ctx context.Context) ([]byte, error) {
		fi, err := s.computeFigures(ctx, sc, res, needs)
		if err != nil {
			return nil, err
		}
		f, err := fi.figure(kind, views, plotRow{ri, ci}, sc, opts)
		if err != nil {
			return nil, err
		}
		w, h := f.Size(plots.DefaultWidth)
		return plots.Render(f, w, h, format)
	})
	if p != nil {
		return p
	}
	r := &reply{contentType: mimeSVG, body: img, header: [][2]string{{headerCSP, contentPolicy}}}
	if format == plots.PNG {
		r = &reply{contentType: mimePNG, body: img}
	}
	return s.send(c, r)
}

// plotTarget is the receptor (index of the screening) and the compound
// (index of views) the query names: receptor by id, compound by name (a
// scenario of several compounds). A receptor not named is the first of
// the results table's order (reaching the level, highest peak) among the
// named compound's rows; a compound not named of several is allCompounds.
func plotTarget(c echo.Context, views []memoView) (int, int, *Problem) {
	ri, ci := -1, -1
	if id := c.QueryParam("receptor"); id != "" {
		for i, rr := range views[0].Res.Receptors {
			if rr.ID == id {
				ri = i
				break
			}
		}
		if ri < 0 {
			return -1, -1, newProblem(kindInvalid, "no receptor has this id",
				FieldProblem{Field: "receptor", Message: fmt.Sprintf("no receptor has the id %q", id)})
		}
	}
	if name := c.QueryParam("compound"); name != "" {
		var names []string
		for i, v := range views {
			names = append(names, fmt.Sprintf("%q", v.Name))
			if v.Name != "" && strings.EqualFold(v.Name, name) {
				ci = i
			}
		}
		if ci < 0 {
			msg := "the scenario has one compound: leave compound out"
			if len(views) > 1 {
				msg = fmt.Sprintf("names no compound of the scenario: %q (one of %s)", name, strings.Join(names, ", "))
			}
			return -1, -1, newProblem(kindInvalid, "no compound has this name", FieldProblem{Field: "compound", Message: msg})
		}
	}
	if ci < 0 && len(views) == 1 {
		ci = 0
	}
	if ri < 0 {
		ri = 0
		for _, row := range rankedRows(views) {
			if ci < 0 || row.compound == ci {
				ri = row.receptor
				break
			}
		}
	}
	return ri, ci, nil
}

// firstMappable is the first compound of views that the closed forms give
// (plume.Model.Focus accepts it), which a map, section or profile shows
// when the query names none; 0 when the scenario cannot be prepared (the
// map then reports why).
func firstMappable(sc plume.Scenario, views []memoView) int {
	md, err := plume.Prepare(sc)
	if err != nil {
		return 0
	}
	for k, v := range views {
		if _, err := md.Focus(v.Name); err == nil {
			return k
		}
	}
	return 0
}

// figure builds one figure: a breakthrough plot of one receptor and
// compound (or, at allCompounds, a line per compound), or the profile,
// map or section of fi.maps[0] (of the compound at.compound).
func (fi *figureInputs) figure(kind string, views []memoView, at plotRow, sc plume.Scenario, o figureOptions) (*plots.Figure, error) {
	switch kind {
	case kindBreakthrough:
		return fi.breakthrough(views, at, o)
	case kindProfile:
		return plots.ProfileFigure(profileData(fi.maps[0].profile, views[at.compound], o))
	case kindMap:
		return plots.MapFigure(mapData(fi.maps[0].planMap, views[at.compound], sc, o))
	case kindSection:
		return plots.SectionFigure(sectionData(fi.maps[0].section, views[at.compound], sc, o))
	}
	return nil, plume.Invalid("kind", "must be breakthrough, profile, map or section")
}

// breakthrough is the breakthrough plot of at: of one compound, or of
// every compound of several (allCompounds).
func (fi *figureInputs) breakthrough(views []memoView, at plotRow, o figureOptions) (*plots.Figure, error) {
	di := fi.denseIndex[at.receptor]
	if at.compound == allCompounds {
		b, err := compoundsBreakthroughData(views, fi.dense, di, at.receptor, o)
		if err != nil {
			return nil, err
		}
		return plots.BreakthroughFigure(b)
	}
	v := views[at.compound]
	dense, err := focusOn(fi.dense, v.Name)
	if err != nil {
		return nil, err
	}
	return plots.BreakthroughFigure(breakthroughData(v, dense.Receptors[di], at.receptor, o))
}

// negotiatePicture picks svg (default) or png; format wins over Accept.
func negotiatePicture(c echo.Context) (string, *Problem) {
	if f := c.QueryParam("format"); f != "" {
		return f, nil
	}
	best, ok := acceptBest(c, plots.SVG, pictureTypes)
	if !ok {
		return "", newProblem(kindNotAccept, "pictures are available as image/svg+xml and image/png; the Accept header admits neither",
			FieldProblem{Field: "Accept", Message: "admits neither image/svg+xml nor image/png"})
	}
	return best, nil
}

// pictureTypes are the media types a picture is offered in.
var pictureTypes = map[string]string{mimeSVG: plots.SVG, "image/*": plots.SVG, "*/*": plots.SVG, mimePNG: plots.PNG}
