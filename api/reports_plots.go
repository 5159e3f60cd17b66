package api

import (
	"context"
	"fmt"

	"github.com/labstack/echo/v4"

	"downgradient/plots"
	"downgradient/plume"
)

// Media types of the pictures.
const (
	mimeSVG = "image/svg+xml"
	mimePNG = "image/png"
)

// plotsHandler is POST /v1/plots?kind=breakthrough|profile|map: one
// picture of a scenario as SVG (default) or PNG.
func (s *server) plotsHandler(c echo.Context) error {
	format, p := negotiatePicture(c)
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
	ri := -1
	if id := c.QueryParam("receptor"); id != "" {
		for i, rr := range res.Receptors {
			if rr.ID == id {
				ri = i
			}
		}
		if ri < 0 {
			return newProblem(kindInvalid, "no receptor has this id",
				FieldProblem{Field: "receptor", Message: fmt.Sprintf("no receptor has the id %q", id)})
		}
	}
	img, p := compute(c.Request().Context(), s, nil, func(ctx context.Context) ([]byte, error) {
		fi, err := s.computeFigures(ctx, sc, res, map[string]bool{kind: true})
		if err != nil {
			return nil, err
		}
		f, err := fi.figure(kind, ri)
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

// figure builds one figure; receptor -1 picks the receptor of highest peak.
func (fi *figureInputs) figure(kind string, receptor int) (*plots.Figure, error) {
	switch kind {
	case kindBreakthrough:
		if receptor < 0 {
			receptor = receptorOrder(fi.res)[0]
		}
		return plots.BreakthroughFigure(breakthroughData(fi.res, fi.dense, receptor))
	case kindProfile:
		return plots.ProfileFigure(profileData(fi.profile, fi.res))
	case kindMap:
		return plots.MapFigure(mapData(fi.planMap))
	}
	return nil, plume.Invalid("kind", "must be breakthrough, profile or map")
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
