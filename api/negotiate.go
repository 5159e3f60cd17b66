package api

import (
	"fmt"
	"mime"
	"net/http"
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
	formatNDJSON // streamed only
)

// Media types of the representations.
const (
	mimeCSV     = "text/csv"
	mimeGeoJSON = "application/geo+json"
	mimeNDJSON  = "application/x-ndjson"
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
	best, ok := acceptBest(c, "json", screeningTypes)
	if !ok {
		return formatJSON, newProblem(kindNotAccept,
			"this resource is available as application/json, text/csv or application/geo+json; the Accept header admits none of them",
			FieldProblem{Field: "Accept", Message: "admits none of application/json, text/csv, application/geo+json"})
	}
	return screeningFormats[best], nil
}

// The media types a screening result is offered in, by representation name.
var (
	screeningTypes = map[string]string{
		"application/json": "json", "application/*": "json", "*/*": "json",
		mimeCSV: "csv", "text/*": "csv",
		mimeGeoJSON: "geojson",
	}
	screeningFormats = map[string]outputFormat{"json": formatJSON, "csv": formatCSV, "geojson": formatGeoJSON}
)

// acceptBest picks, from the request's Accept header, the representation
// of the media type with the highest q (the first on ties) among those the
// table maps to a representation name. No Accept header gives def; a header
// that admits none of the table's types gives ok == false.
func acceptBest(c echo.Context, def string, table map[string]string) (best string, ok bool) {
	accept := strings.TrimSpace(c.Request().Header.Get(echo.HeaderAccept))
	if accept == "" {
		return def, true
	}
	bestQ := -1.0
	for _, part := range strings.Split(accept, ",") {
		mt, params, err := mime.ParseMediaType(strings.TrimSpace(part))
		if err != nil {
			continue
		}
		q := 1.0
		if qs, found := params["q"]; found {
			if v, err := strconv.ParseFloat(qs, 64); err == nil && v >= 0 && v <= 1 {
				q = v
			}
		}
		f, known := table[mt]
		if !known || q == 0 {
			continue
		}
		if q > bestQ {
			best, bestQ = f, q
		}
	}
	return best, bestQ >= 0
}

// streamTypes are the media types of a streamed screening: JSON (or any
// type) asked for with stream=true is NDJSON, one JSON document per line.
var streamTypes = map[string]string{
	mimeNDJSON: "ndjson", "application/json": "ndjson", "application/*": "ndjson", "*/*": "ndjson",
	mimeCSV: "csv", "text/*": "csv", mimeGeoJSON: "geojson",
}

// isStream reports whether a request takes the streaming path: POST
// /v1/screenings with stream=true, format=ndjson, or (without format) an
// Accept header whose preferred type is application/x-ndjson.
func isStream(c echo.Context) bool {
	req := c.Request()
	if req.Method != http.MethodPost || c.Path() != "/v1/screenings" {
		return false
	}
	q := c.QueryParams() // parsed once per request (echo keeps it)
	if s := q.Get("stream"); s != "" {
		if on, err := strconv.ParseBool(s); err == nil && on {
			return true
		}
	}
	switch q.Get("format") {
	case "ndjson":
		return true
	case "":
		best, ok := acceptBest(c, "json", streamAccepts)
		return ok && best == "ndjson"
	}
	return false
}

// streamAccepts maps the media types of an Accept header to the screening
// formats they ask for (isStream).
var streamAccepts = map[string]string{mimeNDJSON: "ndjson", "application/json": "json", "*/*": "json",
	"application/*": "json", mimeCSV: "csv", "text/*": "csv", mimeGeoJSON: "geojson"}

// negotiateStream picks a streamed screening's format: the format
// parameter (ndjson, csv, geojson; json is one document and is not
// streamed), else the Accept header (JSON or anything: NDJSON).
func negotiateStream(c echo.Context) (outputFormat, *Problem) {
	q := c.QueryParams()
	if on, err := strconv.ParseBool(q.Get("stream")); err == nil && !on && q.Get("format") == "ndjson" {
		return 0, newProblem(kindInvalid, "ndjson is always streamed", FieldProblem{Field: "stream", Message: "must be true (or left out) with format ndjson"})
	}
	switch f := q.Get("format"); f {
	case "ndjson":
		return formatNDJSON, nil
	case "csv":
		return formatCSV, nil
	case "geojson":
		return formatGeoJSON, nil
	case "json":
		return 0, newProblem(kindInvalid, "a JSON document is not streamed", FieldProblem{Field: "format",
			Message: fmt.Sprintf("must be ndjson (one JSON document per line), csv or geojson with stream=true, got %q", f)})
	}
	best, ok := acceptBest(c, "ndjson", streamTypes)
	if !ok {
		return 0, newProblem(kindNotAccept,
			"a streamed screening is available as application/x-ndjson, text/csv or application/geo+json; the Accept header admits none of them",
			FieldProblem{Field: "Accept", Message: "admits none of application/x-ndjson, text/csv, application/geo+json"})
	}
	return map[string]outputFormat{"ndjson": formatNDJSON, "csv": formatCSV, "geojson": formatGeoJSON}[best], nil
}
