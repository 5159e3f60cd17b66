package api

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"reflect"
	"sort"
	"strings"
	"unicode"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// screenings is POST /v1/screenings: decode the scenario (already checked
// against the OpenAPI schema by the validator), check its workload and the
// size of its answer, then screen it and encode the result as JSON, CSV or
// GeoJSON within the request's deadline.
func (s *server) screenings(c echo.Context) error {
	if isStream(c) {
		return s.streamScreenings(c)
	}
	format, p := negotiate(c)
	if p != nil {
		return p
	}
	body, _ := c.Get(ctxBody).([]byte)
	sc, p := decodeScenario(body)
	if p != nil {
		return p
	}
	ctx := c.Request().Context()
	if err := plume.CheckWorkload(sc, s.cfg.MaxEvaluations); err != nil {
		return s.problemFromError(ctx, err, nil)
	}
	if p := s.checkOutput(screeningSize(sc, format), formatName[format], "receptors", "times", "methods"); p != nil {
		return p
	}
	r, p := compute(ctx, s, nil, func(ctx context.Context) (*reply, error) {
		res, err := s.screenWork(ctx, sc)
		if err != nil {
			return nil, err
		}
		return s.encodeScreening(ctx, format, sc, res)
	})
	if p != nil {
		return p
	}
	return s.send(c, r)
}

// encodeScreening encodes a screening result in format within the output
// budget.
func (s *server) encodeScreening(ctx context.Context, format outputFormat, sc plume.Scenario, res *plume.Result) (*reply, error) {
	runHook(&testHookEncode, ctx)
	switch format {
	case formatCSV:
		b, ok := encodeCSV(sc, res)
		if !ok {
			return nil, &plume.Error{Kind: plume.KindInternal, Detail: "the result could not be encoded"}
		}
		return s.capBytes(&reply{contentType: mimeCSV + "; charset=utf-8; header=present", body: b,
			header: [][2]string{{"Content-Disposition", `inline; filename="screening.csv"`}}}, "receptors", "times", "methods")
	case formatGeoJSON:
		return s.encodeJSON(buildGeoJSON(sc, res), mimeGeoJSON, "receptors", "times", "methods")
	}
	return s.encodeJSON(res.JSON(), echo.MIMEApplicationJSON, "receptors", "times", "methods")
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
	sb, p := decodeScenarioBody(body)
	return sb.Scenario, p
}

// decodeScenarioBody decodes a scenario body with its description.
func decodeScenarioBody(body []byte) (scenarioBody, *Problem) {
	var sb scenarioBody
	if p := decodeBody(body, &sb, true); p != nil {
		return sb, p
	}
	return sb, sb.checkFreeText()
}

// checkFreeText refuses control characters in the free text a report
// prints: the description and the sources of values (tabs and line breaks
// allowed), the memo header (one line each).
func (sb scenarioBody) checkFreeText() *Problem {
	var fe plume.FieldErrors
	if sb.Description != nil {
		fe.CheckText("description", *sb.Description, true)
	}
	if m := sb.Memo; m != nil {
		for _, f := range []struct{ name, v string }{{"project", m.Project}, {"site", m.Site},
			{"prepared_by", m.PreparedBy}, {"checked_by", m.CheckedBy}, {"date", m.Date}} {
			fe.CheckText("memo."+f.name, f.v, false)
		}
	}
	keys := make([]string, 0, len(sb.SourcesOfValues))
	for k := range sb.SourcesOfValues {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		fe.CheckText("sources_of_values."+k, sb.SourcesOfValues[k], true)
	}
	if len(fe) == 0 {
		return nil
	}
	fps := make([]FieldProblem, len(fe))
	for i, e := range fe {
		fps[i] = FieldProblem{Field: e.Field, Message: e.Message}
	}
	return newProblem(kindInvalid, "free text holds control characters", fps...)
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
		field := jsonFieldPath(ute.Field)
		if strings.HasPrefix(ute.Value, "number") {
			msg := "out of range: not a finite 64-bit floating-point number"
			if k := ute.Type.Kind(); k >= reflect.Int && k <= reflect.Int64 {
				msg = "out of range: not an integer the service can hold (see the field's maximum in GET /openapi.yaml)"
			}
			return newProblem(kindInvalid, "a number is out of range", FieldProblem{Field: field, Message: msg})
		}
		return newProblem(kindMalformed, "wrong JSON type",
			FieldProblem{Field: field, Message: fmt.Sprintf("wrong type: must be %s, got %s", ute.Type, ute.Value)})
	}
	return newProblem(kindMalformed, "the body does not decode: "+err.Error(), FieldProblem{Field: "", Message: err.Error()})
}

// jsonFieldPath turns encoding/json's path of a field into the request's
// JSON path: the names of embedded Go structs (capitalised, like
// "MapOptions" or "Scenario"; the API's names are snake_case) are dropped.
func jsonFieldPath(goPath string) string {
	var out []string
	for _, seg := range strings.Split(goPath, ".") {
		if seg != "" && !unicode.IsUpper(rune(seg[0])) {
			out = append(out, seg)
		}
	}
	return strings.Join(out, ".")
}

// screen checks the workload and runs plume.Screen through compute; rename
// maps plume's field paths to the caller's names (nil: unchanged).
func (s *server) screen(ctx context.Context, sc plume.Scenario, rename func(string) string) (*plume.Result, *Problem) {
	if err := plume.CheckWorkload(sc, s.cfg.MaxEvaluations); err != nil {
		return nil, s.problemFromError(ctx, err, nil)
	}
	return compute(ctx, s, rename, func(ctx context.Context) (*plume.Result, error) {
		return s.screenWork(ctx, sc)
	})
}

// screenWork screens sc (inside compute) and counts its numeric cells and
// caveats.
func (s *server) screenWork(ctx context.Context, sc plume.Scenario) (*plume.Result, error) {
	res, err := plume.Screen(ctx, sc, s.engineOptions())
	if err != nil {
		return nil, err
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
