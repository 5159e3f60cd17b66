package api

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strings"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// screenings is POST /v1/screenings: decode the scenario (already checked
// against the OpenAPI schema by the validator), screen it within the
// per-request deadline, and encode the result as JSON, CSV or GeoJSON.
func (s *server) screenings(c echo.Context) error {
	format, p := negotiate(c)
	if p != nil {
		return p
	}
	body, _ := c.Get(ctxBody).([]byte)
	sc, p := decodeScenario(body)
	if p != nil {
		return p
	}
	res, p := s.screen(c.Request().Context(), sc, nil)
	if p != nil {
		return p
	}
	switch format {
	case formatCSV:
		return writeCSV(c, sc, res)
	case formatGeoJSON:
		return writeGeoJSON(c, sc, res)
	}
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, res)
}

// scenarioBody is the request body: a scenario plus the free text the
// engine ignores (the description, the memo header and the sources of the
// values, which a report prints). None of it is part of the scenario the
// engine sees, so none of it changes engine.input_sha256.
type scenarioBody struct {
	plume.Scenario
	// Free text for the caller's records; not passed to the engine.
	Description *string `json:"description"`
	// The header of a report; not passed to the engine.
	Memo *memoHeader `json:"memo,omitempty"`
	// Where each input value came from (a survey, a pumping test, a
	// handbook), by the input's JSON path; printed beside it in a report.
	SourcesOfValues map[string]string `json:"sources_of_values,omitempty"`
}

// decodeScenario decodes a body that has passed schema validation.
func decodeScenario(body []byte) (plume.Scenario, *Problem) {
	var sb scenarioBody
	p := decodeBody(body, &sb, true)
	return sb.Scenario, p
}

// decodeBody is the one body decoder: it decodes a body that has passed
// schema validation into v (strict: unknown members refused). The errors
// left here are numbers too large for float64 (1e999) and, should the
// schema and the Go types drift apart, type mismatches.
func decodeBody(body []byte, v any, strict bool) *Problem {
	dec := json.NewDecoder(bytes.NewReader(body))
	if strict {
		dec.DisallowUnknownFields()
	}
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

// screen checks the workload and runs plume.Screen through compute; rename
// maps plume's field paths to the caller's names (nil: unchanged).
func (s *server) screen(ctx context.Context, sc plume.Scenario, rename func(string) string) (*plume.Result, *Problem) {
	if err := plume.CheckWorkload(sc, s.cfg.MaxEvaluations); err != nil {
		return nil, s.problemFromError(ctx, err, nil)
	}
	res, p := compute(ctx, s, rename, func(ctx context.Context) (*plume.Result, error) {
		return plume.Screen(ctx, sc, s.engineOptions())
	})
	if p != nil {
		return nil, p
	}
	s.metrics.observeResult(res)
	return res, nil
}

// engineOptions are the plume options every engine call uses.
func (s *server) engineOptions() plume.Options {
	return plume.Options{EngineVersion: s.cfg.Version, CellBudget: s.cfg.CellBudget}
}

// writeJSON encodes v; an encoding failure (a non-finite number, which the
// engine never produces) is an internal error rather than a broken body.
func writeJSON(c echo.Context, status int, contentType string, v any) error {
	b, err := marshalJSON(v)
	if err != nil {
		return newProblem(kindInternal, "the result could not be encoded")
	}
	return c.Blob(status, contentType, b)
}

// marshalJSON is json.Marshal without HTML escaping (no \u003e for ">"),
// with a final newline.
func marshalJSON(v any) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
