package openapi

import (
	"encoding/json"
	"testing"
)

// The embedded document parses and passes kin-openapi's OpenAPI 3.0 validation,
// and its JSON encoding is valid JSON with the same paths.
func TestLoad(t *testing.T) {
	s, err := Load()
	if err != nil {
		t.Fatal(err)
	}
	if s.Doc.OpenAPI[:3] != "3.0" {
		t.Errorf("openapi version %q, want 3.0.x", s.Doc.OpenAPI)
	}
	var m map[string]any
	if err := json.Unmarshal(s.JSON, &m); err != nil {
		t.Fatal(err)
	}
	paths, _ := m["paths"].(map[string]any)
	if len(paths) != s.Doc.Paths.Len() || len(paths) == 0 {
		t.Errorf("JSON has %d paths, document %d", len(paths), s.Doc.Paths.Len())
	}
	s2, _ := Load()
	if s2 != s {
		t.Error("Load parsed the document twice")
	}
}

// A broken document is reported, not served.
func TestParseRejectsInvalid(t *testing.T) {
	for _, doc := range []string{
		"not: [yaml",
		"openapi: 3.0.3\ninfo: {title: t}\npaths: {}\n", // no version
	} {
		if _, err := parse([]byte(doc)); err == nil {
			t.Errorf("parse(%q) succeeded", doc)
		}
	}
}

// The published document offers receptors as an array or a layer; the
// document requests are checked against has the array alone (layers are
// read into arrays before the check), and the two do not share it.
func TestRequestsNarrowReceptors(t *testing.T) {
	s, err := Load()
	if err != nil {
		t.Fatal(err)
	}
	pub := s.Doc.Components.Schemas["Scenario"].Value.Properties["receptors"].Value
	req := s.Requests.Components.Schemas["Scenario"].Value.Properties["receptors"].Value
	if len(pub.OneOf) != 2 {
		t.Errorf("published receptors: oneOf of %d, want 2", len(pub.OneOf))
	}
	if len(req.OneOf) != 0 || req.Items == nil || req.MaxItems == nil || *req.MaxItems != 10000 {
		t.Errorf("request receptors %+v: want the array of at most 10000", req)
	}
}
