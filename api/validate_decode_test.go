package api

import (
	"bytes"
	"encoding/json"
	"reflect"
	"testing"

	"github.com/getkin/kin-openapi/openapi3filter"
)

// TestValidationBodyDecoder: the validation's decoder gives the value
// kin-openapi's own JSON decoder gives (the reference), numbers compared
// as float64 where both are finite, for the demo body and for bodies the
// v2 decoder refuses (those go to kin-openapi's decoder).
func TestValidationBodyDecoder(t *testing.T) {
	cases := map[string][]byte{
		"demo":             demoBody(t),
		"repeated name":    []byte(`{"a": 1, "a": 2, "b": [1, 2.5e3, -0]}`),
		"invalid UTF-8":    []byte("{\"id\": \"W\xff-1\"}"),
		"number too large": []byte(`{"x": 1e999}`),
		"nested":           []byte(`{"s": {"t": [{"u": null, "v": true, "w": "é"}]}}`),
	}
	for name, body := range cases {
		got, err := decodeValidationBody(bytes.NewReader(body), nil, nil, nil)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		want, err := openapi3filter.JSONBodyDecoder(bytes.NewReader(body), nil, nil, nil)
		if err != nil {
			t.Fatalf("%s: reference: %v", name, err)
		}
		if !reflect.DeepEqual(asFloats(got), asFloats(want)) {
			t.Errorf("%s:\n got %#v\nwant %#v", name, got, want)
		}
	}
}

// asFloats replaces every finite json.Number in v by its float64.
func asFloats(v any) any {
	switch x := v.(type) {
	case json.Number:
		if f, err := x.Float64(); err == nil {
			return f
		}
		return x
	case map[string]any:
		out := make(map[string]any, len(x))
		for k, e := range x {
			out[k] = asFloats(e)
		}
		return out
	case []any:
		out := make([]any, len(x))
		for i, e := range x {
			out[i] = asFloats(e)
		}
		return out
	}
	return v
}
