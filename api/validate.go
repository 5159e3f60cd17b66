package api

import (
	"bytes"
	"downgradient/plume"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"maps"
	"mime"
	"net/http"
	"net/url"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/getkin/kin-openapi/openapi3filter"
	"github.com/getkin/kin-openapi/routers"
	"github.com/labstack/echo/v4"
)

// ctxBody is the echo context key of the request body read by the validator.
const ctxBody = "downgradient.body"

// routeTable maps "METHOD path" of the echo routes to their operations in the
// OpenAPI document.
type routeTable map[string]*routers.Route

func newRouteTable(doc *openapi3.T) routeTable {
	rt := routeTable{}
	for path, item := range doc.Paths.Map() {
		for method, op := range item.Operations() {
			rt[method+" "+path] = &routers.Route{Spec: doc, Path: path, PathItem: item, Method: method, Operation: op}
		}
	}
	return rt
}

// validator checks every request against the OpenAPI document before the
// handler runs: body size (413), JSON syntax (400), then the schema of the
// body and the query parameters (400 for wrong types, 413 for arrays over
// their maxItems, 422 for everything else), all problems at once.
func (s *server) validator(next echo.HandlerFunc) echo.HandlerFunc {
	opts := &openapi3filter.Options{
		MultiError:          true,
		SkipSettingDefaults: true,
		AuthenticationFunc:  openapi3filter.NoopAuthenticationFunc,
	}
	// A streamed body is read and checked by its handler, as it arrives.
	queryOnly := *opts
	queryOnly.ExcludeRequestBody = true
	return func(c echo.Context) error {
		req := c.Request()
		method := req.Method
		if method == http.MethodHead {
			method = http.MethodGet
		}
		route := s.routes[method+" "+c.Path()]
		if route == nil { // not-found and method-not-allowed handlers
			return next(c)
		}
		o := opts
		switch {
		case route.Operation.RequestBody != nil && isStream(c):
			o = &queryOnly
		case route.Operation.RequestBody != nil:
			body, p := s.readRequestBody(c)
			if p != nil {
				return p
			}
			c.Set(ctxBody, body)
			req.Body = io.NopCloser(bytes.NewReader(body))
			if req.Header.Get(echo.HeaderContentType) != echo.MIMEApplicationJSON {
				req.Header.Set(echo.HeaderContentType, echo.MIMEApplicationJSON)
			}
		}
		err := openapi3filter.ValidateRequest(req.Context(), &openapi3filter.RequestValidationInput{
			Request: req, Route: route, Options: o,
		})
		if body, ok := c.Get(ctxBody).([]byte); ok {
			req.Body = io.NopCloser(bytes.NewReader(body))
		}
		extra := queryIssues(c.QueryParams(), route.Operation.Parameters)
		if err != nil || len(extra) > 0 {
			p := problemFromValidation(err, extra...)
			if p.Status == http.StatusUnprocessableEntity {
				// Every bad field at once: add what the domain's own rules
				// find in the same body (duplicates of a field dropped).
				body, _ := c.Get(ctxBody).([]byte)
				p = mergeDomainIssues(p, domainIssues(c.Path(), body))
			}
			return p
		}
		return next(c)
	}
}

// ctxLayerNames is the echo context key of the names of a request's
// receptor layer (*layerNames): the error handler names a bad receptor
// by the layer's own path.
const ctxLayerNames = "downgradient.layer"

// layerRoutes are the routes whose body holds a Scenario, whose receptors
// may be a GeoJSON layer: the member holding it ("" for the body itself).
var layerRoutes = map[string]string{"/v1/screenings": "", "/v1/plots": "", "/v1/reports": "", "/v1/plume-maps": "scenario"}

// readRequestBody reads a body that is not streamed: JSON, or for POST
// /v1/screenings multipart/form-data (a scenario part and a receptors part,
// turned into the JSON scenario it stands for). A receptor layer is read
// into the array form (normalizeLayer).
func (s *server) readRequestBody(c echo.Context) ([]byte, *Problem) {
	req := c.Request()
	mt, params, err := mime.ParseMediaType(req.Header.Get(echo.HeaderContentType))
	var body []byte
	var names *layerNames
	if err == nil && mt == "multipart/form-data" {
		if c.Path() != "/v1/screenings" {
			return nil, newProblem(kindMediaType, "multipart/form-data is accepted by POST /v1/screenings only; send application/json")
		}
		if p := checkContentEncoding(req); p != nil {
			return nil, p
		}
		raw, p := s.readBody(c)
		if p != nil {
			return nil, p
		}
		if body, names, p = multipartBody(raw, params["boundary"], s.cfg.MaxBodyBytes); p != nil {
			return nil, p
		}
	} else {
		var p *Problem
		if body, p = s.readJSONBody(c); p != nil {
			return nil, p
		}
	}
	if at, ok := layerRoutes[c.Path()]; ok {
		b, n, p := normalizeLayer(body, at)
		if p != nil {
			return nil, p
		}
		body = b
		if n != nil {
			names = n
		}
	}
	if names != nil {
		c.Set(ctxLayerNames, names)
	}
	return body, nil
}

// headSchema is the schema of a streamed scenario's members other than its
// receptors: Scenario without receptors (a shallow copy; the document is
// not changed).
func headSchema(doc *openapi3.T) *openapi3.Schema {
	sc := *doc.Components.Schemas["Scenario"].Value
	sc.Properties = maps.Clone(sc.Properties)
	delete(sc.Properties, "receptors")
	sc.Required = slices.DeleteFunc(slices.Clone(sc.Required), func(r string) bool { return r == "receptors" })
	return &sc
}

// readJSONBody reads at most MaxBodyBytes and checks that the body is one
// well-formed JSON value. A missing Content-Type, or curl's default
// application/x-www-form-urlencoded, is taken as JSON; any other non-JSON
// media type is refused with 415.
func (s *server) readJSONBody(c echo.Context) ([]byte, *Problem) {
	req := c.Request()
	if ct := req.Header.Get(echo.HeaderContentType); ct != "" {
		mt, _, err := mime.ParseMediaType(ct)
		if err != nil || !(mt == "application/json" || strings.HasSuffix(mt, "+json") || mt == "application/x-www-form-urlencoded") {
			return nil, newProblem(kindMediaType, fmt.Sprintf("the body must be application/json, got %q", ct))
		}
	}
	if p := checkContentEncoding(req); p != nil {
		return nil, p
	}
	body, p := s.readBody(c)
	if p != nil {
		return nil, p
	}
	if p := checkJSONSyntax(body); p != nil {
		return nil, p
	}
	return body, nil
}

// checkJSONSyntax reports a body that is not exactly one JSON value, with the
// line and column of the first error.
func checkJSONSyntax(body []byte) *Problem {
	if len(bytes.TrimSpace(body)) == 0 {
		return newProblem(kindMalformed, "the body is empty; send a JSON object", FieldProblem{Field: "", Message: "empty body"})
	}
	if json.Valid(body) {
		return nil
	}
	// Invalid: decode to locate the first error.
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.UseNumber()
	var v any
	err := dec.Decode(&v)
	if err == nil {
		if _, err2 := dec.Token(); err2 != io.EOF {
			off := dec.InputOffset()
			return newProblem(kindMalformed, "malformed JSON: data after the top-level value",
				FieldProblem{Field: "", Message: "unexpected data at " + lineCol(body, off)})
		}
		return nil
	}
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return newProblem(kindMalformed, "malformed JSON: "+se.Error(),
			FieldProblem{Field: "", Message: "syntax error at " + lineCol(body, se.Offset) + ": " + se.Error()})
	}
	if errors.Is(err, io.ErrUnexpectedEOF) {
		return newProblem(kindMalformed, "malformed JSON: the body ends early",
			FieldProblem{Field: "", Message: "unexpected end of JSON input"})
	}
	return newProblem(kindMalformed, "malformed JSON: "+err.Error(), FieldProblem{Field: "", Message: err.Error()})
}

func lineCol(b []byte, off int64) string {
	if off > int64(len(b)) {
		off = int64(len(b))
	}
	line, col := 1, 1
	for _, ch := range b[:off] {
		if ch == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return fmt.Sprintf("line %d, column %d (byte %d)", line, col, off)
}

// queryIssues refuses query parameters the operation does not declare (a
// misspelt name must not be silently ignored) and declared ones given more
// than once, for operations that declare query parameters.
func queryIssues(q url.Values, params openapi3.Parameters) []issue {
	known := map[string]bool{}
	for _, p := range params {
		if p.Value != nil && p.Value.In == openapi3.ParameterInQuery {
			known[p.Value.Name] = true
		}
	}
	if len(known) == 0 {
		return nil
	}
	names := make([]string, 0, len(q))
	for k := range q {
		names = append(names, k)
	}
	sort.Strings(names)
	var out []issue
	for _, k := range names {
		switch {
		case !known[k]:
			out = append(out, issue{k, "unknown parameter; the names are listed in GET /openapi.yaml", kindInvalid})
		case len(q[k]) > 1:
			out = append(out, issue{k, fmt.Sprintf("given %d times; give it once", len(q[k])), kindInvalid})
		}
	}
	return out
}

// issue is one validation failure with the class that decides the status.
type issue struct {
	field   string
	message string
	kind    problemKind
}

// problemFromValidation turns kin-openapi's errors into one problem: 400 when
// any value has the wrong type or cannot be parsed, else 413 when an array is
// over its limit, else 422.
func problemFromValidation(err error, extra ...issue) *Problem {
	var issues []issue
	if err != nil {
		collectIssues(err, "", &issues)
		if len(issues) == 0 {
			issues = append(issues, issue{"", err.Error(), kindInvalid})
		}
	}
	issues = append(issues, extra...)
	kind := issuesKind(issues)
	fps := make([]FieldProblem, 0, len(issues))
	seen := map[FieldProblem]bool{}
	for _, is := range issues {
		fp := FieldProblem{Field: is.field, Message: is.message}
		if !seen[fp] {
			seen[fp] = true
			fps = append(fps, fp)
		}
	}
	detail := fmt.Sprintf("%d field(s) failed validation against the OpenAPI document", len(fps))
	switch kind {
	case kindMalformed:
		detail = "wrong type or unparseable value: " + detail
	case kindTooLarge:
		detail = "workload over the limits: " + detail
	}
	return newProblem(kind, detail, fps...)
}

func collectIssues(err error, name string, out *[]issue) {
	switch e := err.(type) {
	case openapi3.MultiError:
		for _, x := range e {
			collectIssues(x, name, out)
		}
	case *openapi3filter.RequestError:
		if e.Parameter != nil {
			name = e.Parameter.Name
		}
		switch {
		case e.Err == nil:
			*out = append(*out, issue{name, e.Reason, kindInvalid})
		case errors.Is(e.Err, openapi3filter.ErrInvalidRequired):
			*out = append(*out, issue{name, "required", kindInvalid})
		case errors.Is(e.Err, openapi3filter.ErrInvalidEmptyValue):
			*out = append(*out, issue{name, "must not be empty", kindInvalid})
		default:
			collectIssues(e.Err, name, out)
		}
	case *openapi3.SchemaError:
		*out = append(*out, schemaIssue(e, name))
	case *openapi3filter.ParseError:
		msg := "cannot be parsed"
		if name != "" {
			msg = fmt.Sprintf("value %q is not a finite decimal number", fmt.Sprint(e.Value))
		}
		*out = append(*out, issue{name, msg, kindMalformed})
	default:
		if u := errors.Unwrap(err); u != nil {
			collectIssues(u, name, out)
			return
		}
		*out = append(*out, issue{name, err.Error(), kindInvalid})
	}
}

// domainIssues decodes a body as best it can (a field of the wrong type is
// left out) and returns what the domain's validation finds in it, named by
// the body's JSON paths; nil for a route without a scenario body.
func domainIssues(route string, body []byte) plume.FieldErrors {
	var sc plume.Scenario
	prefix := ""
	switch route {
	case "/v1/screenings", "/v1/reports", "/v1/plots":
		_ = json.Unmarshal(body, &sc)
	case "/v1/plume-maps", "/v1/uncertainty", "/v1/attenuation", "/v1/calibrations":
		var env struct {
			Scenario map[string]any `json:"scenario"`
		}
		if json.Unmarshal(body, &env) != nil || env.Scenario == nil {
			return nil
		}
		extractUncertain(env.Scenario) // distribution objects stand at their medians
		b, err := json.Marshal(env.Scenario)
		if err != nil {
			return nil
		}
		_ = json.Unmarshal(b, &sc)
		prefix = "scenario."
	default:
		return nil
	}
	return plume.FieldsOf(plume.Validate(sc)).Prefixed(prefix)
}

// mergeDomainIssues adds the domain's findings to a 422 problem of the
// schema check, one entry per field, and retitles it when every entry is a
// missing field.
func mergeDomainIssues(p *Problem, fe plume.FieldErrors) *Problem {
	named := map[string]bool{}
	for _, e := range p.Errors {
		named[e.Field] = true
	}
	errs := append([]FieldProblem(nil), p.Errors...)
	for _, e := range fe {
		if !named[e.Field] {
			named[e.Field] = true
			errs = append(errs, FieldProblem{Field: e.Field, Message: e.Message})
		}
	}
	out := newProblem(invalidKind(errs), fmt.Sprintf("%d field(s) failed validation", len(errs)), errs...)
	out.Instance = p.Instance
	return out
}

// invalidKind is kindMissing when every bad field is a missing one (their
// messages start with "required", by convention of the schema check and
// the domain), else kindInvalid.
func invalidKind(errs []FieldProblem) problemKind {
	for _, e := range errs {
		if !strings.HasPrefix(e.Message, "required") {
			return kindInvalid
		}
	}
	if len(errs) == 0 {
		return kindInvalid
	}
	return kindMissing
}

var quotedProperty = regexp.MustCompile(`property "([^"]+)"`)

// schemaIssue describes one schema failure by the JSON path of the field.
func schemaIssue(se *openapi3.SchemaError, paramName string) issue {
	ptr := se.JSONPointer()
	field := jsonPath(paramName, ptr)
	msg := se.Reason
	kind := kindInvalid
	switch se.SchemaField {
	case "type", "nullable":
		kind = kindMalformed
		msg = "wrong type: " + typeWanted(se.Schema) + ", got " + jsonTypeName(se.Value)
		if jsonTypeName(se.Value) == "a number" && schemaType(se.Schema) == "number" { // 1e999: a number, but not a finite float64
			kind = kindInvalid
			msg = "out of range: not a finite 64-bit floating-point number"
		}
	case "maxItems":
		kind = kindTooLarge
		if se.Schema != nil && se.Schema.MaxItems != nil {
			msg = fmt.Sprintf("at most %d items allowed", *se.Schema.MaxItems)
		}
	case "properties": // additionalProperties: false
		if m := quotedProperty.FindStringSubmatch(se.Reason); m != nil {
			field = joinFieldPath(field, segment(m[1]))
			msg = "unknown field; check the spelling against the OpenAPI document"
		}
	case "required":
		msg = "required field is missing"
	case "minimum", "maximum", "exclusiveMinimum", "exclusiveMaximum":
		msg = rangeMessage(se)
	case "enum":
		if se.Schema != nil {
			msg = fmt.Sprintf("must be one of %s", enumList(se.Schema.Enum))
			if want := schemaType(se.Schema); want != "" && jsonTypeName(se.Value) != "a "+want {
				kind = kindMalformed
				msg = "wrong type: " + typeWanted(se.Schema) + ", got " + jsonTypeName(se.Value) + "; " + msg
			}
		}
	}
	return issue{field, msg, kind}
}

// jsonPath is the JSON path of a JSON pointer's segments under paramName.
func jsonPath(paramName string, ptr []string) string {
	p := paramName
	for _, seg := range ptr {
		p = joinFieldPath(p, segment(seg))
	}
	return p
}

// segment turns one JSON pointer segment into a path step: an index "[3]"
// for a number, else the member name.
func segment(seg string) string {
	if _, err := strconv.Atoi(seg); err == nil {
		return "[" + seg + "]"
	}
	return seg
}

// schemaType is the schema's (first) type, "" when unset.
func schemaType(s *openapi3.Schema) string {
	if s == nil || s.Type == nil || len(*s.Type) == 0 {
		return ""
	}
	return (*s.Type)[0]
}

func typeWanted(s *openapi3.Schema) string {
	if s == nil || s.Type == nil || len(*s.Type) == 0 {
		return "must be of a different type"
	}
	t := (*s.Type)[0]
	w := "a " + t
	if t == "integer" || t == "object" || t == "array" {
		w = "an " + t
	}
	if s.Nullable {
		w += " or null"
	}
	return "must be " + w
}

func jsonTypeName(v any) string {
	switch v.(type) {
	case nil:
		return "null"
	case bool:
		return "a boolean"
	case string:
		return "a string"
	case float64, json.Number, int, int64:
		return "a number"
	case []any:
		return "an array"
	case map[string]any:
		return "an object"
	}
	return fmt.Sprintf("%T", v)
}

func rangeMessage(se *openapi3.SchemaError) string {
	s := se.Schema
	if s == nil {
		return se.Reason
	}
	var parts []string
	if s.Min != nil {
		if s.ExclusiveMin.IsTrue() {
			parts = append(parts, "> "+fmtNum(*s.Min))
		} else {
			parts = append(parts, ">= "+fmtNum(*s.Min))
		}
	}
	if s.Max != nil {
		if s.ExclusiveMax.IsTrue() {
			parts = append(parts, "< "+fmtNum(*s.Max))
		} else {
			parts = append(parts, "<= "+fmtNum(*s.Max))
		}
	}
	if len(parts) == 0 {
		return se.Reason
	}
	return "out of range: must be " + strings.Join(parts, " and ")
}

func enumList(vals []any) string {
	s := make([]string, len(vals))
	for i, v := range vals {
		s[i] = fmt.Sprintf("%q", fmt.Sprint(v))
	}
	return strings.Join(s, ", ")
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// issuesKind is the problem kind of a list of issues: malformed (400) when
// any is a wrong type or unparseable, else too large (413) when any is
// over a limit, else invalid (422).
func issuesKind(issues []issue) problemKind {
	kind := kindInvalid
	for _, is := range issues {
		switch {
		case is.kind == kindMalformed:
			return kindMalformed
		case is.kind == kindTooLarge:
			kind = kindTooLarge
		}
	}
	return kind
}
