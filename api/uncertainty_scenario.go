package api

import (
	"bytes"
	"encoding/json"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/labstack/echo/v4"

	"downgradient/plume"
	"downgradient/plume/fit"
)

// The uncertainty, attenuation and calibration bodies carry the scenario as
// a free-form object (the uncertainty one may hold distribution objects
// where numbers stand). These helpers check it against the Scenario schema
// of the OpenAPI document and decode it, naming bad fields
// "scenario.<path>".

// decodeBodyTree decodes a body (already syntax-checked) as generic JSON,
// numbers as float64; a number beyond float64 (1e400) is named by its path.
func decodeBodyTree(body []byte) (map[string]any, *Problem) {
	var m map[string]any
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.UseNumber()
	if err := dec.Decode(&m); err != nil || m == nil {
		return nil, newProblem(kindMalformed, "the body must be a JSON object", FieldProblem{Field: "", Message: "not a JSON object"})
	}
	var bad []FieldProblem
	for k, v := range m {
		m[k] = floatTree(v, k, &bad)
	}
	if len(bad) > 0 {
		sort.Slice(bad, func(i, j int) bool { return bad[i].Field < bad[j].Field })
		return nil, newProblem(kindInvalid, "a number is out of range", bad...)
	}
	return m, nil
}

// floatTree replaces the json.Numbers of a decoded tree by float64s,
// reporting each one out of float64's range against its path.
func floatTree(v any, path string, bad *[]FieldProblem) any {
	switch x := v.(type) {
	case json.Number:
		f, err := strconv.ParseFloat(x.String(), 64)
		if err != nil {
			*bad = append(*bad, FieldProblem{Field: path, Message: "out of range: not a finite 64-bit floating-point number"})
		}
		return f
	case map[string]any:
		for k, e := range x {
			x[k] = floatTree(e, joinFieldPath(path, k), bad)
		}
	case []any:
		for i, e := range x {
			x[i] = floatTree(e, fmt.Sprintf("%s[%d]", path, i), bad)
		}
	}
	return v
}

// scenarioTree returns the body's "scenario" member as an object.
func scenarioTree(body map[string]any) (map[string]any, *Problem) {
	raw, ok := body["scenario"]
	if !ok || raw == nil {
		return nil, newProblem(kindInvalid, "the body needs a scenario", FieldProblem{Field: "scenario", Message: "required field is missing"})
	}
	m, ok := raw.(map[string]any)
	if !ok {
		return nil, newProblem(kindMalformed, "wrong JSON type", FieldProblem{Field: "scenario", Message: "wrong type: must be an object, got " + jsonTypeName(raw)})
	}
	return m, nil
}

// decodeScenarioTree checks a scenario tree against the Scenario schema
// (400 for wrong types, 413 for arrays over their limits, 422 otherwise)
// and decodes it.
func (s *server) decodeScenarioTree(tree map[string]any) (plume.Scenario, *Problem) {
	sb, p := s.decodeScenarioBodyTree(tree)
	return sb.Scenario, p
}

// decodeScenarioBodyTree is decodeScenarioTree keeping the free text of
// the body (description, memo, sources of values).
func (s *server) decodeScenarioBodyTree(tree map[string]any) (scenarioBody, *Problem) {
	schema := s.spec.Requests.Components.Schemas["Scenario"]
	if schema == nil || schema.Value == nil {
		return scenarioBody{}, newProblem(kindInternal, "the Scenario schema is missing from the OpenAPI document")
	}
	if err := schema.Value.VisitJSON(tree, openapi3.MultiErrors()); err != nil {
		return scenarioBody{}, problemFromValidation(err).under("scenario")
	}
	delete(tree, "receptor_id_property") // names a layer's id property: nothing here
	b, err := json.Marshal(tree)
	if err != nil {
		return scenarioBody{}, newProblem(kindMalformed, "the scenario could not be read: "+err.Error())
	}
	sb, p := decodeScenarioBody(b)
	if p != nil {
		return sb, p.under("scenario")
	}
	return sb, nil
}

// under prefixes every field of p with prefix (a JSON path).
func (p *Problem) under(prefix string) *Problem {
	for i, e := range p.Errors {
		p.Errors[i].Field = joinFieldPath(prefix, e.Field)
	}
	return p
}

// scenarioField names a field of the scenario member of a body.
func scenarioField(f string) string { return joinFieldPath("scenario", f) }

// renameOutside prefixes "scenario." to the fields of plume's errors except
// those that name members of the request body itself (top).
func renameOutside(top ...string) func(string) string {
	return func(f string) string {
		head := f
		if i := strings.IndexAny(f, ".["); i >= 0 {
			head = f[:i]
		}
		for _, t := range top {
			if head == t {
				return f
			}
		}
		return joinFieldPath("scenario", f)
	}
}

// fillReceptors gives a scenario tree without receptors one per observed
// well (fit.WellReceptors), so that attenuation and calibration need not
// repeat the wells.
func fillReceptors(tree map[string]any, obs []fit.Observation) {
	if r, ok := tree["receptors"].([]any); ok && len(r) > 0 {
		return
	}
	if _, present := tree["receptors"]; present && tree["receptors"] != nil {
		if _, isArr := tree["receptors"].([]any); !isArr {
			return // wrong type: the schema check reports it
		}
	}
	var rs []any
	for _, r := range fit.WellReceptors(obs, plume.MaxReceptors) {
		m := map[string]any{"id": r.ID, "x": *r.X, "y": *r.Y}
		if r.Z != nil {
			m["z"] = *r.Z
		}
		rs = append(rs, m)
	}
	if len(rs) > 0 {
		tree["receptors"] = rs
	}
}

// decodeEnvelope reads the validated body of a request that wraps a
// scenario ({"scenario": {...}, ...}): the other members into v, and the
// scenario as a generic JSON tree for the caller to finish decoding.
func decodeEnvelope(c echo.Context, v any) (map[string]any, *Problem) {
	body, _ := c.Get(ctxBody).([]byte)
	if p := decodeBody(body, v, false); p != nil {
		return nil, p
	}
	root, p := decodeBodyTree(body)
	if p != nil {
		return nil, p
	}
	return scenarioTree(root)
}
