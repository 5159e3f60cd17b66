package api

import (
	"fmt"
	"net/http"
	"net/url"
	"os"
	"strings"
	"testing"
)

// Bad input of every class of DESIGN.md section 6 against POST
// /v1/screenings: the status, the problem+json shape and the named field.
func TestScreeningsBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	type edit struct {
		path string
		v    any
	}
	cases := []struct {
		class  string
		raw    string // a raw body instead of edits of the demo
		edits  []edit
		status int
		field  string // "" with fieldPrefix unset: the body as a whole
		prefix bool   // field is a prefix
	}{
		// Malformed JSON.
		{class: "malformed/truncated", raw: `{"aquifer": {`, status: 400},
		{class: "malformed/bare NaN", raw: `{"aquifer": {"seepage_velocity": NaN}}`, status: 400},
		{class: "malformed/bare Infinity", raw: `{"times": [Infinity]}`, status: 400},
		{class: "malformed/trailing data", raw: `{} {}`, status: 400},
		{class: "malformed/empty", raw: ``, status: 400},
		{class: "malformed/single quotes", raw: `{'aquifer': 1}`, status: 400},
		// Wrong JSON types, naming the field.
		{class: "type/string for number", edits: []edit{{"aquifer.hydraulic_conductivity", "8.6"}}, status: 400, field: "aquifer.hydraulic_conductivity"},
		{class: "type/object for array", edits: []edit{{"receptors", map[string]any{}}}, status: 400, field: "receptors"},
		{class: "type/number for array", edits: []edit{{"times", 365}}, status: 400, field: "times"},
		{class: "type/bool in receptor", edits: []edit{{"receptors.0.x", true}}, status: 400, field: "receptors[0].x"},
		{class: "type/number for method", edits: []edit{{"methods", []any{1}}}, status: 400, field: "methods[0]"},
		{class: "type/string for object", edits: []edit{{"contaminant", "benzene"}}, status: 400, field: "contaminant"},
		{class: "type/null for required number", edits: []edit{{"receptors.2.y", nil}}, status: 400, field: "receptors[2].y"},
		{class: "type/array body", raw: `[]`, status: 400},
		// NaN and infinity as strings.
		{class: "nan/string NaN", edits: []edit{{"aquifer.effective_porosity", "NaN"}}, status: 400, field: "aquifer.effective_porosity"},
		{class: "nan/string Infinity", edits: []edit{{"source.concentration", "Infinity"}}, status: 400, field: "source.concentration"},
		{class: "nan/string -Inf in times", edits: []edit{{"times", []any{365, "-Inf"}}}, status: 400, field: "times[1]"},
		{class: "nan/overflowing number", raw: strings.Replace(string(demoBodyOrEmpty()), `"concentration": 12`, `"concentration": 1e999`, 1), status: 422, field: "source.concentration"},
		// Missing fields.
		{class: "missing/source", edits: []edit{{"source", deleteMarker}}, status: 422, field: "source"},
		{class: "missing/receptors", edits: []edit{{"receptors", deleteMarker}}, status: 422, field: "receptors"},
		{class: "missing/aquifer", edits: []edit{{"aquifer", deleteMarker}}, status: 422, field: "aquifer"},
		{class: "missing/receptor x", edits: []edit{{"receptors.1", map[string]any{"id": "no-x", "y": 3}}}, status: 422, field: "receptors[1].x"},
		{class: "missing/no receptors", edits: []edit{{"receptors", []any{}}}, status: 422, field: "receptors"},
		{class: "missing/velocity inputs", edits: []edit{{"aquifer.hydraulic_conductivity", deleteMarker}}, status: 422, field: "aquifer.", prefix: true},
		{class: "missing/source strength", edits: []edit{{"source.concentration", deleteMarker}}, status: 422, field: "source.", prefix: true},
		// Negative and zero where positive is needed; other ranges.
		{class: "range/zero porosity", edits: []edit{{"aquifer.effective_porosity", 0}}, status: 422, field: "aquifer.effective_porosity"},
		{class: "range/porosity above 1", edits: []edit{{"aquifer.effective_porosity", 1.5}}, status: 422, field: "aquifer.effective_porosity"},
		{class: "range/negative conductivity", edits: []edit{{"aquifer.hydraulic_conductivity", -8.6}}, status: 422, field: "aquifer.hydraulic_conductivity"},
		{class: "range/zero gradient", edits: []edit{{"aquifer.hydraulic_gradient", 0}}, status: 422, field: "aquifer.hydraulic_gradient"},
		{class: "range/zero dispersivity", edits: []edit{{"aquifer.dispersivity.longitudinal", 0}}, status: 422, field: "aquifer.dispersivity.longitudinal"},
		{class: "range/zero concentration", edits: []edit{{"source.concentration", 0}}, status: 422, field: "source.concentration"},
		{class: "range/negative width", edits: []edit{{"source.width", -15}}, status: 422, field: "source.width"},
		{class: "range/zero half-life", edits: []edit{{"contaminant.half_life", 0}}, status: 422, field: "contaminant.half_life"},
		{class: "range/retardation below 1", edits: []edit{{"contaminant.retardation", 0.5}}, status: 422, field: "contaminant.retardation"},
		{class: "range/negative time", edits: []edit{{"times", []any{365, -1}}}, status: 422, field: "times[1]"},
		{class: "range/negative depth", edits: []edit{{"receptors.0.z", -1}}, status: 422, field: "receptors[0].z"},
		{class: "range/screen upside down", edits: []edit{{"receptors.2.screen_top", 9}}, status: 422, field: "receptors[2].", prefix: true},
		{class: "range/unknown unit", edits: []edit{{"units.length", "yards"}}, status: 422, field: "units.length"},
		{class: "range/unknown method", edits: []edit{{"methods", []any{"magic"}}}, status: 422, field: "methods[0]"},
		{class: "range/unknown field", edits: []edit{{"aquifer.seepage_velocty", 0.3}}, status: 422, field: "aquifer.seepage_velocty"},
		// A source mass (with the concentration: a source depleting by its mass).
		{class: "mass/zero", edits: []edit{{"source.mass", 0}}, status: 422, field: "source.mass"},
		{class: "mass/negative", edits: []edit{{"source.mass", -3}}, status: 422, field: "source.mass"},
		{class: "mass/exponent above 10", edits: []edit{{"source.mass", 100}, {"source.depletion_exponent", 11}}, status: 422, field: "source.depletion_exponent"},
		{class: "mass/exponent 0", edits: []edit{{"source.mass", 100}, {"source.depletion_exponent", 0}}, status: 422, field: "source.depletion_exponent"},
		{class: "mass/exponent without a mass", edits: []edit{{"source.depletion_exponent", 2}}, status: 422, field: "source.depletion_exponent"},
		{class: "mass/with half-life", edits: []edit{{"source.mass", 100}, {"source.half_life", 1000}}, status: 422, field: "source.half_life"},
		{class: "mass/with duration", edits: []edit{{"source.mass", 100}, {"source.duration", 1000}}, status: 422, field: "source.duration"},
		{class: "mass/on a column", edits: []edit{{"source.mass", 100}, {"source.width", deleteMarker}, {"source.depth", deleteMarker}}, status: 422, field: "source.mass"},
		// Huge arrays.
		{class: "huge/receptors", edits: []edit{{"receptors", manyReceptors(10_001)}}, status: 413, field: "receptors"},
		{class: "huge/times", edits: []edit{{"times", manyTimes(1_001)}}, status: 413, field: "times"},
		{class: "huge/body", edits: []edit{{"description", strings.Repeat("x", 1<<20)}}, status: 413},
	}
	for _, tc := range cases {
		t.Run(tc.class, func(t *testing.T) {
			var body []byte
			if tc.edits == nil {
				body = []byte(tc.raw)
			} else {
				m := demoMap(t)
				for _, e := range tc.edits {
					set(m, e.path, e.v)
				}
				body = mustJSON(t, m)
			}
			rec := ts.call(t, http.MethodPost, "/v1/screenings", body, nil)
			p := problemOf(t, rec, tc.status)
			if tc.field == "" && tc.status != 413 {
				if len(p.Errors) == 0 {
					t.Errorf("no errors listed: %+v", p)
				}
				return
			}
			if tc.field == "" {
				return
			}
			ok := hasField(p, tc.field)
			if tc.prefix {
				for _, e := range p.Errors {
					ok = ok || strings.HasPrefix(e.Field, tc.field)
				}
			}
			if !ok {
				t.Errorf("field %q not named; errors %+v", tc.field, p.Errors)
			}
		})
	}
}

// The body limit is configurable and a non-JSON media type is refused.
func TestScreeningsBodyLimitAndMediaType(t *testing.T) {
	ts := newTestServer(t, Config{MaxBodyBytes: 100})
	problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), nil), http.StatusRequestEntityTooLarge)

	ts = newTestServer(t, Config{})
	problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), map[string]string{"Content-Type": "text/plain"}), http.StatusUnsupportedMediaType)
	// curl -d sends application/x-www-form-urlencoded; a JSON body is accepted.
	rec := ts.call(t, http.MethodPost, "/v1/screenings", demoBody(t), map[string]string{"Content-Type": "application/x-www-form-urlencoded"})
	if rec.Code != 200 {
		t.Errorf("form content type: %d %s", rec.Code, rec.Body.String())
	}
}

// Bad input of every class against GET /v1/concentration; the field is the
// query parameter name.
func TestConcentrationBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	base := concentrationQuery(1287.6, 816.3, 1, "365", "exact")
	cases := []struct {
		class  string
		set    map[string]string // "" value deletes
		add    url.Values        // extra values
		status int
		field  string
		prefix bool
	}{
		{class: "malformed/number", set: map[string]string{"receptor.x": "12,5"}, status: 400, field: "receptor.x"},
		{class: "malformed/hex number", set: map[string]string{"source.concentration": "0x10"}, status: 400, field: "source.concentration"},
		{class: "malformed/time", set: map[string]string{"time": "soon"}, status: 400, field: "time"},
		{class: "type/boolean", set: map[string]string{"contaminant.use_table_half_life": "maybe"}, status: 400, field: "contaminant.use_table_half_life"},
		{class: "nan/NaN", set: map[string]string{"source.concentration": "NaN"}, status: 400, field: "source.concentration"},
		{class: "nan/Inf", set: map[string]string{"aquifer.hydraulic_conductivity": "Inf"}, status: 400, field: "aquifer.hydraulic_conductivity"},
		{class: "nan/time NaN", set: map[string]string{"time": "NaN"}, status: 400, field: "time"},
		{class: "nan/time overflow", set: map[string]string{"time": "1e999"}, status: 422, field: "time"},
		{class: "nan/number overflow", set: map[string]string{"receptor.y": "1e999"}, status: 400, field: "receptor.y"},
		{class: "missing/receptor.x", set: map[string]string{"receptor.x": ""}, status: 422, field: "receptor.x"},
		{class: "missing/time", set: map[string]string{"time": ""}, status: 422, field: "time"},
		{class: "missing/source strength", set: map[string]string{"source.concentration": ""}, status: 422, field: "source.", prefix: true},
		{class: "range/zero velocity", set: map[string]string{"aquifer.seepage_velocity": "0"}, status: 422, field: "aquifer.seepage_velocity"},
		{class: "range/negative concentration", set: map[string]string{"source.concentration": "-3"}, status: 422, field: "source.concentration"},
		{class: "range/negative time", set: map[string]string{"time": "-5"}, status: 422, field: "time"},
		{class: "range/negative depth", set: map[string]string{"receptor.z": "-1"}, status: 422, field: "receptor.z"},
		{class: "range/porosity 1", set: map[string]string{"aquifer.effective_porosity": "1"}, status: 422, field: "aquifer.effective_porosity"},
		{class: "range/unknown method", set: map[string]string{"method": "magic"}, status: 422, field: "method"},
		// A source that stops has a steady state of 0 by superposition, and the
		// numeric method does not march to it: no value to give.
		{class: "range/numeric steady of a finite source", set: map[string]string{"method": "numeric", "time": "steady", "source.duration": "1000"}, status: 422, field: "method"},
		{class: "range/unknown unit", set: map[string]string{"units.length": "yards"}, status: 422, field: "units.length"},
		{class: "range/unknown parameter", set: map[string]string{"aquifer.seepage_velocty": "0.3"}, status: 422, field: "aquifer.seepage_velocty"},
		{class: "range/screen upside down", set: map[string]string{"receptor.screen_top": "9", "receptor.screen_bottom": "2"}, status: 422, field: "receptor.", prefix: true},
		{class: "huge/repeated parameter", add: url.Values{"receptor.x": manyStrings(1000)}, status: 422, field: "receptor.x"},
	}
	for _, tc := range cases {
		t.Run(tc.class, func(t *testing.T) {
			u, _ := url.Parse(base)
			q := u.Query()
			for k, v := range tc.set {
				if v == "" {
					q.Del(k)
				} else {
					q.Set(k, v)
				}
			}
			for k, vs := range tc.add {
				for _, v := range vs {
					q.Add(k, v)
				}
			}
			u.RawQuery = q.Encode()
			p := problemOf(t, ts.call(t, http.MethodGet, u.String(), nil, nil), tc.status)
			ok := hasField(p, tc.field)
			if tc.prefix {
				for _, e := range p.Errors {
					ok = ok || strings.HasPrefix(e.Field, tc.field)
				}
			}
			if !ok {
				t.Errorf("field %q not named; errors %+v", tc.field, p.Errors)
			}
		})
	}
}

// The fixed endpoints take no input; wrong methods and paths still answer
// with problem documents, never 500.
func TestOtherEndpointsBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	for _, path := range []string{"/v1/contaminants", "/healthz", "/openapi.yaml", "/openapi.json", "/v1/concentration"} {
		for _, m := range []string{http.MethodPost, http.MethodPut, http.MethodDelete} {
			rec := ts.call(t, m, path, []byte(`{"x": NaN`), nil)
			problemOf(t, rec, http.StatusMethodNotAllowed)
		}
		// Query strings with junk are ignored by the parameterless routes.
		if path != "/v1/concentration" {
			rec := ts.call(t, http.MethodGet, path+"?x=NaN&y=1e999&"+strings.Repeat("z=1&", 1000), nil, nil)
			if rec.Code != 200 {
				t.Errorf("GET %s with junk query: %d", path, rec.Code)
			}
		}
	}
	problemOf(t, ts.call(t, http.MethodGet, "/v1/screenings", nil, nil), http.StatusMethodNotAllowed)
	problemOf(t, ts.call(t, http.MethodGet, "/v2/anything", nil, nil), http.StatusNotFound)
	problemOf(t, ts.call(t, http.MethodGet, "/", nil, nil), http.StatusNotFound)
}

// demoBodyOrEmpty reads the demo outside a test (for case tables).
func demoBodyOrEmpty() []byte {
	b, _ := os.ReadFile("../testdata/demo/scenario.json")
	return b
}

func manyReceptors(n int) []any {
	out := make([]any, n)
	for i := range out {
		out[i] = map[string]any{"id": fmt.Sprintf("R%d", i), "x": 1250 + float64(i%100), "y": 830}
	}
	return out
}

func manyTimes(n int) []any {
	out := make([]any, n)
	for i := range out {
		out[i] = float64(i + 1)
	}
	return out
}

func manyStrings(n int) []string {
	out := make([]string, n)
	for i := range out {
		out[i] = fmt.Sprint(i)
	}
	return out
}
