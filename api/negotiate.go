package api

import (
	"mime"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"
)

// outputFormat is the representation of a screening result.
type outputFormat int

const (
	formatJSON outputFormat = iota
	formatCSV
	formatGeoJSON
)

// Media types of the representations.
const (
	mimeCSV     = "text/csv"
	mimeGeoJSON = "application/geo+json"
)

// negotiate picks the representation: the `format` query parameter wins
// (its values are checked by the OpenAPI enum), then the Accept header
// (highest q wins; JSON on ties and for */*), JSON when neither is given.
// An Accept header that admits none of the three is answered with 406.
func negotiate(c echo.Context) (outputFormat, *Problem) {
	switch c.QueryParam("format") {
	case "json":
		return formatJSON, nil
	case "csv":
		return formatCSV, nil
	case "geojson":
		return formatGeoJSON, nil
	}
	accept := strings.TrimSpace(c.Request().Header.Get(echo.HeaderAccept))
	if accept == "" {
		return formatJSON, nil
	}
	best, bestQ := formatJSON, -1.0
	for _, part := range strings.Split(accept, ",") {
		mt, params, err := mime.ParseMediaType(strings.TrimSpace(part))
		if err != nil {
			continue
		}
		q := 1.0
		if qs, ok := params["q"]; ok {
			if v, err := strconv.ParseFloat(qs, 64); err == nil && v >= 0 && v <= 1 {
				q = v
			}
		}
		if q == 0 {
			continue
		}
		var f outputFormat
		switch mt {
		case "application/json", "application/*", "*/*":
			f = formatJSON
		case mimeCSV, "text/*":
			f = formatCSV
		case mimeGeoJSON:
			f = formatGeoJSON
		default:
			continue
		}
		if q > bestQ {
			best, bestQ = f, q
		}
	}
	if bestQ < 0 {
		return formatJSON, newProblem(kindNotAccept,
			"this resource is available as application/json, text/csv or application/geo+json; the Accept header admits none of them",
			FieldProblem{Field: "Accept", Message: "admits none of application/json, text/csv, application/geo+json"})
	}
	return best, nil
}
