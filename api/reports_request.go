package api

import (
	"bytes"
	"encoding/json"
	"io"
	"net/http"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/getkin/kin-openapi/openapi3filter"
	"github.com/getkin/kin-openapi/routers"
	"github.com/labstack/echo/v4"

	"downgradient/plume/uncertainty"
)

// memoHeader is the header of a report: free text the engine never sees.
type memoHeader struct {
	// Project name or number.
	Project string `json:"project,omitempty"`
	// Site name or address.
	Site string `json:"site,omitempty"`
	// Who prepared the screening.
	PreparedBy string `json:"prepared_by,omitempty"`
	// Who checked it.
	CheckedBy string `json:"checked_by,omitempty"`
	// The memo's date as its author writes it; the run's own date and time
	// are printed beside it.
	Date string `json:"date,omitempty"`
}

// reportRequest is a decoded POST /v1/reports body: a scenario, or the
// /v1/uncertainty envelope (a scenario with distribution objects and the
// run's realizations, seed and methods).
type reportRequest struct {
	// The scenario with its free text; for an envelope, the scenario at the
	// medians of its distributions.
	body scenarioBody
	// The uncertainty run of an envelope; nil for a plain scenario.
	unc *uncertainty.UncertaintyRequest
	// rename maps the domain's field paths to the body's (nil: unchanged).
	rename func(string) string
}

// decodeReportRequest checks the body of c against the schema its shape
// names (a body with a "scenario" member against UncertaintyRequest, any
// other against Scenario), all bad fields at once as the validator does
// for every other route, and decodes it.
func (s *server) decodeReportRequest(c echo.Context) (*reportRequest, *Problem) {
	body, _ := c.Get(ctxBody).([]byte)
	var members map[string]json.RawMessage
	if err := json.Unmarshal(body, &members); err != nil {
		return nil, newProblem(kindMalformed, "the body must be a JSON object", FieldProblem{Field: "", Message: "not a JSON object"})
	}
	if _, envelope := members["scenario"]; envelope {
		if p := s.checkReportShape(c, body, "UncertaintyRequest", "/v1/uncertainty"); p != nil {
			return nil, p
		}
		req, sb, p := s.uncertaintyRun(c)
		if p != nil {
			return nil, p
		}
		return &reportRequest{body: sb, unc: &req, rename: renameOutside("realizations", "seed", "methods", "compound")}, nil
	}
	if p := s.checkReportShape(c, body, "Scenario", "/v1/reports"); p != nil {
		return nil, p
	}
	sb, p := decodeScenarioBody(body)
	if p != nil {
		return nil, p
	}
	return &reportRequest{body: sb}, nil
}

// checkReportShape validates the body of c as the body of the report
// route with the component schema named schema, merging in what the
// domain's own rules find (as route would) when the schema check fails
// with 422.
func (s *server) checkReportShape(c echo.Context, body []byte, schema, route string) *Problem {
	rt := s.routes[http.MethodPost+" /v1/reports"]
	ref := s.spec.Requests.Components.Schemas[schema]
	if rt == nil || ref == nil {
		return newProblem(kindInternal, "the report's schemas are missing from the OpenAPI document")
	}
	op := *rt.Operation
	op.RequestBody = &openapi3.RequestBodyRef{Value: openapi3.NewRequestBody().WithRequired(true).WithJSONSchemaRef(ref)}
	shaped := routers.Route{Spec: rt.Spec, Path: rt.Path, PathItem: rt.PathItem, Method: rt.Method, Operation: &op}
	req := c.Request().Clone(c.Request().Context())
	req.Body = io.NopCloser(bytes.NewReader(body))
	req.Header.Set(echo.HeaderContentType, echo.MIMEApplicationJSON)
	err := openapi3filter.ValidateRequest(req.Context(), &openapi3filter.RequestValidationInput{
		Request: req, Route: &shaped,
		Options: &openapi3filter.Options{MultiError: true, SkipSettingDefaults: true, AuthenticationFunc: openapi3filter.NoopAuthenticationFunc},
	})
	if err == nil {
		return nil
	}
	p := problemFromValidation(err)
	if p.Status == http.StatusUnprocessableEntity {
		p = mergeDomainIssues(p, domainIssues(route, body))
	}
	return p
}
