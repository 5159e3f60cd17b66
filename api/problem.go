package api

import (
	"fmt"
	"net/http"
	"strings"

	"github.com/labstack/echo/v4"
)

// Problem is an RFC 9457 problem document, extended with the list of bad
// fields. It implements error so handlers can return it; the error handler
// writes it as application/problem+json.
type Problem struct {
	// URI reference naming the problem type (relative to the service).
	Type string `json:"type"`
	// Short summary of the problem type.
	Title string `json:"title"`
	// HTTP status code.
	Status int `json:"status"`
	// Explanation of this occurrence.
	Detail string `json:"detail"`
	// The request path.
	Instance string `json:"instance,omitempty"`
	// Every bad field, by JSON path (or query parameter name).
	Errors []FieldProblem `json:"errors,omitempty"`
	// Seconds of the Retry-After header; "" for none.
	retryAfter string
}

// FieldProblem names one bad field and what is wrong with it.
type FieldProblem struct {
	// JSON path of the field, e.g. "receptors[3].x"; empty for the body as a whole.
	Field string `json:"field"`
	// What is wrong and what is allowed.
	Message string `json:"message"`
}

func (p *Problem) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d %s: %s", p.Status, p.Title, p.Detail)
	for _, e := range p.Errors {
		fmt.Fprintf(&b, "; %s: %s", e.Field, e.Message)
	}
	return b.String()
}

// Problem types: a stable slug per class, a title and a status.
type problemKind struct {
	slug   string
	title  string
	status int
}

// retryAfter is the Retry-After, seconds, of the 503 problem types: a
// full server and a shutdown clear in a moment (another instance can
// answer), a passed deadline means the request itself is too heavy.
var retryAfter = map[string]string{"deadline-exceeded": "60", "server-busy": "1", "shutting-down": "1"}

var (
	kindMalformed = problemKind{"malformed-request", "Malformed request", http.StatusBadRequest}
	kindInvalid   = problemKind{"invalid-input", "Invalid input", http.StatusUnprocessableEntity}
	kindMissing   = problemKind{"missing-input", "Required input missing", http.StatusUnprocessableEntity}
	kindTooLarge  = problemKind{"too-large", "Request over the limits", http.StatusRequestEntityTooLarge}
	kindTimeout   = problemKind{"deadline-exceeded", "Computation deadline exceeded", http.StatusServiceUnavailable}
	kindNotFound  = problemKind{"not-found", "No such resource", http.StatusNotFound}
	kindMethod    = problemKind{"method-not-allowed", "Method not allowed", http.StatusMethodNotAllowed}
	kindMediaType = problemKind{"unsupported-media-type", "Unsupported media type", http.StatusUnsupportedMediaType}
	kindNotAccept = problemKind{"not-acceptable", "No acceptable representation", http.StatusNotAcceptable}
	kindInternal  = problemKind{"internal-error", "Internal error", http.StatusInternalServerError}
	// The request's body did not arrive within the body timeout.
	kindBodyTimeout = problemKind{"body-timeout", "Request body timeout", http.StatusRequestTimeout}
	// The request line and headers are over the header limit.
	kindHeaderTooLarge = problemKind{"header-too-large", "Request header fields too large", http.StatusRequestHeaderFieldsTooLarge}
	// The server is shutting down: the computation was cancelled.
	kindShuttingDown = problemKind{"shutting-down", "Server shutting down", http.StatusServiceUnavailable}
	// The client closed the connection first (499, a common convention for
	// logs; nobody receives it).
	kindClientGone  = problemKind{"client-closed-request", "Client closed the request", statusClientClosed}
	problemTypeBase = "/problems/"
)

// statusClientClosed is the status logged and counted for a request whose
// client went away before its answer (common practice: 499).
const statusClientClosed = 499

func newProblem(k problemKind, detail string, errs ...FieldProblem) *Problem {
	return &Problem{Type: problemTypeBase + k.slug, Title: k.title, Status: k.status, Detail: detail, Errors: errs, retryAfter: retryAfter[k.slug]}
}

// writeProblem sends p as application/problem+json.
func writeProblem(c echo.Context, p *Problem) error {
	if p.Instance == "" {
		p.Instance = c.Request().URL.Path
	}
	body, err := marshalJSON(p)
	if err != nil { // cannot happen: only strings and ints
		body = []byte(`{"type":"/problems/internal-error","title":"Internal error","status":500,"detail":"could not encode the problem"}`)
	}
	switch {
	case p.retryAfter != "":
		c.Response().Header().Set("Retry-After", p.retryAfter)
	case p.Status == http.StatusServiceUnavailable:
		c.Response().Header().Set("Retry-After", retryAfter[kindTimeout.slug])
	}
	return c.Blob(p.Status, "application/problem+json", body)
}

// errorHandler is echo's HTTPErrorHandler: every error leaves as problem+json.
func errorHandler(err error, c echo.Context) {
	if c.Response().Committed {
		return
	}
	var p *Problem
	switch e := err.(type) {
	case *Problem:
		p = e
	case *echo.HTTPError:
		p = problemFromHTTPError(e)
	default:
		p = newProblem(kindInternal, "the server could not complete the request")
	}
	if names, ok := c.Get(ctxLayerNames).(*layerNames); ok {
		for i := range p.Errors {
			p.Errors[i].Field = names.rename(p.Errors[i].Field)
		}
	}
	if c.Request().Method == http.MethodHead {
		_ = c.NoContent(p.Status)
		return
	}
	_ = writeProblem(c, p)
}

func problemFromHTTPError(e *echo.HTTPError) *Problem {
	msg := fmt.Sprint(e.Message)
	switch e.Code {
	case http.StatusNotFound:
		return newProblem(kindNotFound, "no route matches this path; see GET /openapi.yaml for the routes")
	case http.StatusMethodNotAllowed:
		return newProblem(kindMethod, "this path does not accept this method; see GET /openapi.yaml")
	case http.StatusRequestEntityTooLarge:
		return newProblem(kindTooLarge, msg)
	case http.StatusUnsupportedMediaType:
		return newProblem(kindMediaType, msg)
	case http.StatusServiceUnavailable:
		return newProblem(kindTimeout, msg)
	}
	if e.Code >= 400 && e.Code < 500 {
		return &Problem{Type: problemTypeBase + "client-error", Title: http.StatusText(e.Code), Status: e.Code, Detail: msg}
	}
	return newProblem(kindInternal, "the server could not complete the request")
}
