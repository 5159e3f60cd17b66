package api

import (
	"net/http"
	"sort"
	"strings"
	"testing"

	"downgradient/openapi"
)

// Every echo route is in the OpenAPI document and every operation of the
// document is an echo route.
func TestRoutesMatchDocument(t *testing.T) {
	ts := newTestServer(t, Config{})
	spec, err := openapi.Load()
	if err != nil {
		t.Fatal(err)
	}
	inEcho := map[string]bool{}
	for _, r := range ts.e.Routes() {
		if r.Method == echoAny || r.Path == "" || r.Path == "/*" {
			continue
		}
		inEcho[r.Method+" "+r.Path] = true
	}
	inDoc := map[string]bool{}
	for path, item := range spec.Doc.Paths.Map() {
		for method := range item.Operations() {
			inDoc[method+" "+path] = true
		}
	}
	var missing, extra []string
	for k := range inEcho {
		if !inDoc[k] {
			missing = append(missing, k)
		}
	}
	for k := range inDoc {
		if !inEcho[k] {
			extra = append(extra, k)
		}
	}
	sort.Strings(missing)
	sort.Strings(extra)
	if len(missing) > 0 {
		t.Errorf("routes served but not in openapi.yaml: %v", missing)
	}
	if len(extra) > 0 {
		t.Errorf("operations in openapi.yaml but not served: %v", extra)
	}
	for _, want := range []string{
		"POST /v1/screenings", "GET /v1/concentration", "GET /v1/contaminants",
		"GET /openapi.yaml", "GET /openapi.json", "GET /healthz",
	} {
		if !inEcho[want] {
			t.Errorf("route %s missing", want)
		}
	}
}

const echoAny = "echo_route_any"

// The meta routes answer and match the document.
func TestMetaRoutes(t *testing.T) {
	ts := newTestServer(t, Config{Version: "9.9.9"})
	cases := []struct {
		path, ctype string
		want        string
	}{
		{"/healthz", "application/json", `"version":"9.9.9"`},
		{"/openapi.yaml", "application/yaml", "openapi: 3.0"},
		{"/openapi.json", "application/json", `"openapi":"3.0`},
		{"/v1/contaminants", "application/json", `"vinyl chloride"`},
	}
	for _, tc := range cases {
		rec := ts.call(t, http.MethodGet, tc.path, nil, nil)
		if rec.Code != 200 || rec.Header().Get("Content-Type") != tc.ctype {
			t.Errorf("%s: %d %q", tc.path, rec.Code, rec.Header().Get("Content-Type"))
		}
		if !strings.Contains(rec.Body.String(), tc.want) {
			t.Errorf("%s: body lacks %q", tc.path, tc.want)
		}
	}
}
