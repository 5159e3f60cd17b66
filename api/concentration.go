package api

import (
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"net/url"
	"sort"
	"strconv"
	"strings"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// Query parameters of GET /v1/concentration that are not scenario paths.
const (
	paramTime   = "time"
	paramMethod = "method"
	paramFormat = "format"
	// paramCompound names the compound of several (contaminants) whose
	// value is returned; paramContaminants carries them as a JSON array.
	paramCompound     = "compound"
	paramContaminants = "contaminants"
	steadyTime        = "steady"
)

// kindNotModelled is the problem of a receptor the model does not cover.
var kindNotModelled = problemKind{"receptor-not-modelled", "Receptor not modelled", http.StatusUnprocessableEntity}

// concentration is GET /v1/concentration: one receptor, one time (or the
// steady state), one method, from query parameters named by the scenario's
// dotted JSON paths; the answer is the bare number as text/plain (or, with
// format=json, the value with its caveats), with the receptor's status,
// the comparison with the screening level and the caveat codes in headers.
// A receptor the model does not cover is a 422, never a number.
func (s *server) concentration(c echo.Context) error {
	q := c.QueryParams()
	params := s.routes[http.MethodGet+" /v1/concentration"].Operation.Parameters
	sc, steady, method, p := scenarioFromQuery(q, params)
	if p != nil {
		return p
	}
	full, p := s.screen(c.Request().Context(), sc, queryFieldName)
	if p != nil {
		return p
	}
	res, err := full.Focus(q.Get(paramCompound))
	if err != nil {
		return s.problemFromError(c.Request().Context(), err, nil)
	}
	if len(res.Receptors) != 1 {
		return newProblem(kindInternal, "the engine returned no receptor")
	}
	rr := res.Receptors[0]
	if rr.Status == plume.StatusUpgradient {
		return newProblem(kindNotModelled, fmt.Sprintf(
			"the receptor lies upgradient of the source (%g %s along the flow from the source's downgradient face): the model covers only the downgradient side, so there is no value to return",
			rr.PlumeX, res.Units.Length),
			FieldProblem{Field: "receptor.x", Message: "upgradient of the source: not modelled (move the receptor downgradient, or check source.x, source.y and source.flow_azimuth_deg)"})
	}
	var v *float64
	if steady {
		v = plume.MethodValue(method, rr.SteadyState.Exact, rr.SteadyState.Domenico, rr.SteadyState.Numeric)
	} else if len(rr.Series) == 1 {
		sp := rr.Series[0]
		v = plume.MethodValue(method, sp.Exact, sp.Domenico, sp.Numeric)
	}
	if v == nil {
		return newProblem(kindInvalid, "the method gave no value at this time",
			FieldProblem{Field: paramMethod, Message: fmt.Sprintf("%q gives no value for time %q", method, q.Get(paramTime))})
	}
	if math.IsNaN(*v) || math.IsInf(*v, 0) {
		return newProblem(kindInternal, "the result could not be encoded")
	}
	setValueHeaders(c.Response().Header(), res, rr, *v)
	if q.Get(paramFormat) == "json" {
		cv := concentrationValue{Value: *v, Method: method, Status: rr.Status, ScreeningLevel: res.Derived.ScreeningLevel,
			Units: res.Units, Engine: res.Engine, Caveats: receptorCaveats(res, rr.ID)}
		cv.Time = steadyTime
		if !steady {
			cv.Time = rr.Series[0].Time
		}
		if l := res.Derived.ScreeningLevel; l != nil {
			cv.Exceeds = new(*v >= *l && *v > 0)
		}
		return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, cv)
	}
	return c.String(http.StatusOK, formatNumber(*v))
}

// concentrationValue is the format=json answer of GET /v1/concentration.
type concentrationValue struct {
	Value          float64        `json:"value"`
	Time           any            `json:"time"`
	Method         string         `json:"method"`
	Status         plume.Status   `json:"status"`
	Exceeds        *bool          `json:"exceeds_screening_level"`
	ScreeningLevel *float64       `json:"screening_level"`
	Units          plume.Units    `json:"units"`
	Engine         plume.Engine   `json:"engine"`
	Caveats        []plume.Caveat `json:"caveats"`
}

// receptorCaveats are the caveats of res that apply to one receptor.
func receptorCaveats(res *plume.Result, id string) []plume.Caveat {
	out := []plume.Caveat{}
	for _, cv := range res.Caveats {
		if cv.ReceptorID == "" || cv.ReceptorID == id {
			out = append(out, cv)
		}
	}
	return out
}

// setValueHeaders puts what must travel with a single value into headers:
// the receptor's status, the comparison with the screening level, the
// caveat codes, the general caution and the engine version and input hash.
func setValueHeaders(h http.Header, res *plume.Result, rr plume.ReceptorResult, v float64) {
	h.Set("X-Receptor-Status", string(rr.Status))
	exceeds := "none"
	if l := res.Derived.ScreeningLevel; l != nil {
		exceeds = comparison(rr.Status, l, v)
		h.Set("X-Screening-Level", formatNumber(*l))
	}
	h.Set("X-Exceeds-Screening-Level", exceeds)
	h.Set("X-Caveat-Codes", strings.Join(res.CaveatCodes(rr.ID), ";"))
	h.Set("X-Screening-Caution", plume.ScreeningCaution)
	h.Set("X-Engine-Version", headerSafe(res.Engine.Version))
	h.Set("X-Input-SHA256", res.Engine.InputSHA256)
}

// headerSafe keeps only printable ASCII in a header value.
func headerSafe(s string) string {
	return strings.Map(func(r rune) rune {
		if r < 0x20 || r > 0x7e {
			return -1
		}
		return r
	}, s)
}

// queryFieldName maps plume's JSON paths back to the query parameter names:
// receptors[0].x -> receptor.x, times[0] -> time, methods[0] -> method.
func queryFieldName(f string) string {
	switch {
	case strings.HasPrefix(f, "receptors[0]."):
		return "receptor." + strings.TrimPrefix(f, "receptors[0].")
	case f == "receptors" || f == "receptors[0]":
		return "receptor"
	case strings.HasPrefix(f, "times"):
		return paramTime
	case strings.HasPrefix(f, "methods"):
		return paramMethod
	}
	return f
}

// scenarioFromQuery builds the one-receptor scenario. Values were checked
// against the parameter schemas by the validator; here unknown and repeated
// parameters are refused (422), and time is parsed (a number >= 0 or
// "steady").
func scenarioFromQuery(q url.Values, params openapi3.Parameters) (sc plume.Scenario, steady bool, method string, p *Problem) {
	schemas := map[string]*openapi3.Schema{}
	for _, pr := range params {
		if pr.Value != nil && pr.Value.Schema != nil {
			schemas[pr.Value.Name] = pr.Value.Schema.Value
		}
	}
	var bad []FieldProblem
	names := make([]string, 0, len(q))
	for k := range q {
		names = append(names, k)
	}
	sort.Strings(names)
	tree := map[string]any{}
	var receptor = map[string]any{}
	method = plume.MethodExact
	for _, name := range names {
		vals := q[name]
		schema, known := schemas[name]
		if !known {
			bad = append(bad, FieldProblem{Field: name, Message: "unknown parameter; the names are the dotted JSON paths of the scenario (see GET /openapi.yaml)"})
			continue
		}
		if len(vals) != 1 {
			bad = append(bad, FieldProblem{Field: name, Message: "given more than once"})
			continue
		}
		raw := vals[0]
		switch name {
		case paramTime:
			if raw == steadyTime {
				steady = true
				continue
			}
			t, fp := parseQueryTime(raw)
			if fp != nil {
				return sc, false, "", newProblem(fp.kind, "bad time", FieldProblem{Field: paramTime, Message: fp.message})
			}
			sc.Times = []float64{t}
			continue
		case paramMethod:
			method = raw
			continue
		case paramFormat, paramCompound:
			continue
		case paramContaminants:
			var list []any
			if err := json.Unmarshal([]byte(raw), &list); err != nil {
				return sc, false, "", newProblem(kindMalformed, "contaminants is not a JSON array",
					FieldProblem{Field: paramContaminants, Message: "must be the JSON array of the compounds (URL-encoded): " + err.Error()})
			}
			tree[paramContaminants] = list
			continue
		}
		v, p := queryValue(name, raw, schema)
		if p != nil {
			return sc, false, "", p
		}
		path := strings.Split(name, ".")
		if path[0] == "receptor" {
			receptor[strings.Join(path[1:], ".")] = v
			continue
		}
		setPath(tree, path, v)
	}
	if len(bad) > 0 {
		return sc, false, "", newProblem(kindInvalid, "unknown or repeated query parameters", bad...)
	}
	if steady {
		sc.Times = []float64{}
	}
	tree["receptors"] = []any{receptor}
	tree["methods"] = []any{method}
	if p := decodeQueryTree(tree, &sc); p != nil {
		return sc, false, "", p
	}
	return sc, steady, method, nil
}

// queryValue converts one query value to the JSON type of its schema.
func queryValue(name, raw string, schema *openapi3.Schema) (any, *Problem) {
	if schema == nil || schema.Type == nil || len(*schema.Type) == 0 {
		return raw, nil
	}
	switch (*schema.Type)[0] {
	case openapi3.TypeNumber:
		f, err := strconv.ParseFloat(raw, 64)
		if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
			return nil, newProblem(kindMalformed, "wrong type",
				FieldProblem{Field: name, Message: fmt.Sprintf("value %q is not a finite decimal number", raw)})
		}
		return f, nil
	case openapi3.TypeBoolean:
		b, err := strconv.ParseBool(raw)
		if err != nil {
			return nil, newProblem(kindMalformed, "wrong type",
				FieldProblem{Field: name, Message: fmt.Sprintf("value %q is not true or false", raw)})
		}
		return b, nil
	}
	return raw, nil
}

// decodeQueryTree decodes the tree built from the query into sc, keeping
// sc's times.
func decodeQueryTree(tree map[string]any, sc *plume.Scenario) *Problem {
	js, err := json.Marshal(tree)
	if err == nil {
		times := sc.Times
		err = json.Unmarshal(js, sc)
		sc.Times = times
	}
	if err != nil {
		return newProblem(kindMalformed, "the query does not form a scenario: "+err.Error())
	}
	return nil
}

// setPath stores v at the dotted path in a tree of maps.
func setPath(tree map[string]any, path []string, v any) {
	for _, seg := range path[:len(path)-1] {
		next, ok := tree[seg].(map[string]any)
		if !ok {
			next = map[string]any{}
			tree[seg] = next
		}
		tree = next
	}
	tree[path[len(path)-1]] = v
}

// parseQueryTime parses a time: a finite decimal number >= 0 (hexadecimal,
// digit separators, infinities and NaN are refused).
func parseQueryTime(raw string) (float64, *issue) {
	if raw == "" || strings.ContainsFunc(raw, func(r rune) bool { return !strings.ContainsRune("+-.0123456789eE", r) }) {
		return 0, &issue{paramTime, fmt.Sprintf("value %q is neither a decimal number nor %q", raw, steadyTime), kindMalformed}
	}
	t, err := strconv.ParseFloat(raw, 64)
	if err != nil && !strings.Contains(err.Error(), "range") {
		return 0, &issue{paramTime, fmt.Sprintf("value %q is neither a decimal number nor %q", raw, steadyTime), kindMalformed}
	}
	if math.IsInf(t, 0) || math.IsNaN(t) || err != nil {
		return 0, &issue{paramTime, "out of range: must be a finite number >= 0", kindInvalid}
	}
	if t < 0 {
		return 0, &issue{paramTime, "out of range: must be >= 0 (time since the source started)", kindInvalid}
	}
	return t, nil
}
