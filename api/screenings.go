package api

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"

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

// scenarioBody is the request body: a scenario plus the free-text
// description the engine ignores.
type scenarioBody struct {
	plume.Scenario
	// Free text for the caller's records; not passed to the engine.
	Description *string `json:"description"`
}

// decodeScenario decodes a body that has passed schema validation. The
// errors left here are numbers too large for float64 (1e999) and, should the
// schema and the Go types drift apart, type mismatches.
func decodeScenario(body []byte) (plume.Scenario, *Problem) {
	var sb scenarioBody
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	err := dec.Decode(&sb)
	sc := sb.Scenario
	if err != nil {
		var ute *json.UnmarshalTypeError
		if errors.As(err, &ute) {
			if ute.Value == "number" || len(ute.Value) > 6 && ute.Value[:6] == "number" {
				return sc, newProblem(kindInvalid, "a number is out of the range of a 64-bit float",
					FieldProblem{Field: ute.Field, Message: "number out of range: " + ute.Value})
			}
			return sc, newProblem(kindMalformed, "wrong JSON type",
				FieldProblem{Field: ute.Field, Message: fmt.Sprintf("wrong type: must be %s, got %s", ute.Type, ute.Value)})
		}
		return sc, newProblem(kindMalformed, "the body does not decode as a scenario: "+err.Error(),
			FieldProblem{Field: "", Message: err.Error()})
	}
	return sc, nil
}

// screen checks the workload, runs plume.Screen under the deadline and maps
// its errors; rename maps plume's field paths to the caller's names (nil:
// unchanged).
func (s *server) screen(ctx context.Context, sc plume.Scenario, rename func(string) string) (*plume.Result, *Problem) {
	if p := s.checkWorkload(sc); p != nil {
		return nil, p
	}
	ctx, cancel := context.WithTimeout(ctx, s.cfg.RequestTimeout)
	defer cancel()
	// The engine runs in its own goroutine so that the answer leaves at the
	// deadline even if the engine notices the cancelled context late; the
	// engine stops at its next check of ctx.
	type outcome struct {
		res *plume.Result
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				slog.Error("panic in plume.Screen", "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
				done <- outcome{err: errEnginePanic}
			}
		}()
		res, err := plume.Screen(ctx, sc, plume.Options{EngineVersion: s.cfg.Version, CellBudget: s.cfg.CellBudget})
		done <- outcome{res, err}
	}()
	var o outcome
	select {
	case o = <-done:
	case <-ctx.Done():
		return nil, s.problemFromScreen(ctx, ctx.Err(), rename)
	}
	if errors.Is(o.err, errEnginePanic) {
		return nil, newProblem(kindInternal, "the server could not complete the request")
	}
	if o.err != nil {
		return nil, s.problemFromScreen(ctx, o.err, rename)
	}
	if o.res == nil {
		return nil, newProblem(kindInternal, "the engine returned no result")
	}
	s.metrics.observeResult(o.res)
	return o.res, nil
}

// errEnginePanic marks a panic recovered from the engine (a bug).
var errEnginePanic = errors.New("api: engine panicked")

// checkWorkload refuses requests whose closed-form work is over the limit
// (413): receptors x (times + steady state) x closed-form methods.
func (s *server) checkWorkload(sc plume.Scenario) *Problem {
	var fps []FieldProblem
	if n := len(sc.Receptors); n > MaxReceptors {
		fps = append(fps, FieldProblem{Field: "receptors", Message: fmt.Sprintf("%d receptors; at most %d allowed", n, MaxReceptors)})
	}
	if n := len(sc.Times); n > MaxTimes {
		fps = append(fps, FieldProblem{Field: "times", Message: fmt.Sprintf("%d times; at most %d allowed", n, MaxTimes)})
	}
	closed := 0
	methods := sc.Methods
	if len(methods) == 0 {
		methods = plume.AllMethods
	}
	for _, m := range methods {
		if m == plume.MethodExact || m == plume.MethodDomenico {
			closed++
		}
	}
	if evals := len(sc.Receptors) * (len(sc.Times) + 1) * closed; evals > s.cfg.MaxEvaluations {
		fps = append(fps, FieldProblem{Field: "receptors", Message: fmt.Sprintf(
			"receptors x (times + 1) x closed-form methods = %d evaluations; at most %d allowed per request: split the request",
			evals, s.cfg.MaxEvaluations)})
	}
	if len(fps) == 0 {
		return nil
	}
	return newProblem(kindTooLarge, "workload over the limits", fps...)
}

// problemFromScreen maps plume.Screen's errors: FieldErrors -> 422, a
// passed deadline -> 503, a workload over the engine's budget -> 413,
// anything else -> 422 with the engine's message (no input may cause a 500).
func (s *server) problemFromScreen(ctx context.Context, err error, rename func(string) string) *Problem {
	if rename == nil {
		rename = func(f string) string { return f }
	}
	var fe plume.FieldErrors
	if errors.As(err, &fe) {
		fps := make([]FieldProblem, len(fe))
		for i, e := range fe {
			fps[i] = FieldProblem{Field: rename(e.Field), Message: e.Message}
		}
		return newProblem(kindInvalid, fmt.Sprintf("%d field(s) out of range or inconsistent", len(fps)), fps...)
	}
	if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) || ctx.Err() != nil {
		return newProblem(kindTimeout, fmt.Sprintf(
			"the computation did not finish within the per-request deadline of %s; ask for fewer receptors, times or methods (numeric is the slowest)",
			s.cfg.RequestTimeout))
	}
	if isWorkloadError(err) {
		return newProblem(kindTooLarge, "workload over the engine's limits: "+err.Error())
	}
	return newProblem(kindInvalid, "the scenario could not be screened: "+err.Error())
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
