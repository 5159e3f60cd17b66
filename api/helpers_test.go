package api

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"strings"
	"testing"

	"github.com/getkin/kin-openapi/openapi3filter"
	"github.com/labstack/echo/v4"

	"downgradient/openapi"
)

func init() {
	// Response validation needs a decoder for the GeoJSON media type.
	openapi3filter.RegisterBodyDecoder(mimeGeoJSON, openapi3filter.JSONBodyDecoder)
}

// testServer is the handler under test with its route table for response validation.
type testServer struct {
	e      *echo.Echo
	routes routeTable
}

func newTestServer(t testing.TB, cfg Config) *testServer {
	t.Helper()
	if cfg.Version == "" {
		cfg.Version = "test"
	}
	e, err := newEcho(cfg)
	if err != nil {
		t.Fatal(err)
	}
	spec, err := openapi.Load()
	if err != nil {
		t.Fatal(err)
	}
	return &testServer{e: e, routes: newRouteTable(spec.Doc)}
}

// call sends one request through the whole handler and checks the response
// against the OpenAPI document whenever the route is documented.
func (ts *testServer) call(t testing.TB, method, target string, body []byte, header map[string]string) *httptest.ResponseRecorder {
	t.Helper()
	var r io.Reader
	if body != nil {
		r = bytes.NewReader(body)
	}
	req := httptest.NewRequest(method, target, r)
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	for k, v := range header {
		if v == "" {
			req.Header.Del(k)
		} else {
			req.Header.Set(k, v)
		}
	}
	rec := httptest.NewRecorder()
	ts.e.ServeHTTP(rec, req)
	ts.validateResponse(t, method, req, rec)
	return rec
}

// validateResponse checks status, media type and body against the document
// (openapi3filter.ValidateResponse), for documented routes.
func (ts *testServer) validateResponse(t testing.TB, method string, req *http.Request, rec *httptest.ResponseRecorder) {
	t.Helper()
	path := req.URL.Path
	route := ts.routes[method+" "+path]
	if route == nil {
		return
	}
	input := &openapi3filter.ResponseValidationInput{
		RequestValidationInput: &openapi3filter.RequestValidationInput{Request: req, Route: route},
		Status:                 rec.Code,
		Header:                 rec.Header(),
		Body:                   io.NopCloser(bytes.NewReader(rec.Body.Bytes())),
		Options:                &openapi3filter.Options{IncludeResponseStatus: true, MultiError: true},
	}
	if err := openapi3filter.ValidateResponse(context.Background(), input); err != nil {
		t.Errorf("%s %s -> %d: response does not match the OpenAPI document: %v\nbody: %.600s", method, req.URL, rec.Code, err, rec.Body.String())
	}
}

// demoBody is the invented demo scenario of testdata/demo.
func demoBody(t testing.TB) []byte {
	t.Helper()
	b, err := os.ReadFile("../testdata/demo/scenario.json")
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// readDemo reads a demo scenario of testdata/demo as a JSON tree.
func readDemo(t testing.TB, name string) map[string]any {
	t.Helper()
	b, err := os.ReadFile("../testdata/demo/" + name)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

// demoFileMap is the invented demo file testdata/demo/name as a generic
// JSON tree, with the closed forms only (methods exact and domenico).
func demoFileMap(t testing.TB, name string) map[string]any {
	t.Helper()
	m := readDemo(t, name)
	m["methods"] = []any{"exact", "domenico"}
	return m
}

// demoMap is the demo scenario as a generic JSON tree, for editing.
func demoMap(t testing.TB) map[string]any {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal(demoBody(t), &m); err != nil {
		t.Fatal(err)
	}
	return m
}

func mustJSON(t testing.TB, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// problemOf decodes and checks an RFC 9457 problem response.
func problemOf(t testing.TB, rec *httptest.ResponseRecorder, status int) Problem {
	t.Helper()
	if rec.Code != status {
		t.Errorf("status %d, want %d; body %.800s", rec.Code, status, rec.Body.String())
	}
	if ct := rec.Header().Get("Content-Type"); !strings.HasPrefix(ct, "application/problem+json") {
		t.Errorf("Content-Type %q, want application/problem+json", ct)
	}
	var p Problem
	if err := json.Unmarshal(rec.Body.Bytes(), &p); err != nil {
		t.Fatalf("problem body: %v: %s", err, rec.Body.String())
	}
	if p.Status != rec.Code || p.Type == "" || p.Title == "" || p.Detail == "" {
		t.Errorf("incomplete problem %+v", p)
	}
	return p
}

// hasField reports whether the problem names field.
func hasField(p Problem, field string) bool {
	for _, e := range p.Errors {
		if e.Field == field && e.Message != "" {
			return true
		}
	}
	return false
}

// set assigns v at a dotted path of a JSON tree ("receptors.0.x" indexes arrays).
func set(m map[string]any, path string, v any) {
	segs := strings.Split(path, ".")
	var cur any = m
	for i, s := range segs {
		last := i == len(segs)-1
		switch c := cur.(type) {
		case map[string]any:
			if last {
				if v == deleteMarker {
					delete(c, s)
				} else {
					c[s] = v
				}
				return
			}
			if _, ok := c[s]; !ok {
				c[s] = map[string]any{}
			}
			cur = c[s]
		case []any:
			idx := 0
			for _, ch := range s {
				idx = idx*10 + int(ch-'0')
			}
			if last {
				c[idx] = v
				return
			}
			cur = c[idx]
		}
	}
}

// deleteMarker passed to set removes the key.
var deleteMarker = &struct{ x int }{}
