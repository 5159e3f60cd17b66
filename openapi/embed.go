// Package openapi holds the public contract of the service, openapi.yaml
// (OpenAPI 3.0), embedded in the binary. The document is parsed and validated
// once, on first use; the api package validates every request against it and
// serves it at GET /openapi.yaml and GET /openapi.json.
package openapi

import (
	"context"
	_ "embed"
	"encoding/json"
	"fmt"
	"sync"

	"github.com/getkin/kin-openapi/openapi3"
)

//go:embed openapi.yaml
var specYAML []byte

// Spec is the loaded, validated document with its YAML and JSON encodings.
// Treat it as read-only: it is shared by every request.
type Spec struct {
	// Doc is the parsed document.
	Doc *openapi3.T
	// Requests is the document requests are checked against: Doc with
	// every schema that admits two forms of the same input narrowed to the
	// form the server turns every request into before it checks it
	// (Scenario.receptors: the array; a receptor layer is read into an
	// array first, see api's layer readers).
	Requests *openapi3.T
	// YAML is the document as written (openapi.yaml).
	YAML []byte
	// JSON is the document re-encoded as JSON.
	JSON []byte
}

var load = sync.OnceValues(func() (*Spec, error) {
	return parse(specYAML)
})

// Load returns the embedded document, parsed and validated on the first call;
// later calls return the same Spec (or the same error).
func Load() (*Spec, error) { return load() }

// parse loads and validates a document.
func parse(data []byte) (*Spec, error) {
	loader := openapi3.NewLoader()
	loader.IsExternalRefsAllowed = false
	doc, err := loader.LoadFromData(data)
	if err != nil {
		return nil, fmt.Errorf("openapi: parse openapi.yaml: %w", err)
	}
	if err := doc.Validate(context.Background()); err != nil {
		return nil, fmt.Errorf("openapi: openapi.yaml is not a valid OpenAPI document: %w", err)
	}
	js, err := json.Marshal(doc)
	if err != nil {
		return nil, fmt.Errorf("openapi: encode as JSON: %w", err)
	}
	req, err := loader.LoadFromData(data)
	if err != nil {
		return nil, fmt.Errorf("openapi: parse openapi.yaml: %w", err)
	}
	if err := narrow(req); err != nil {
		return nil, err
	}
	return &Spec{Doc: doc, Requests: req, YAML: data, JSON: js}, nil
}

// narrow replaces Scenario.receptors (one of an array and a layer) by the
// array alternative, in a document of its own.
func narrow(doc *openapi3.T) error {
	sc := doc.Components.Schemas["Scenario"]
	if sc == nil || sc.Value == nil || sc.Value.Properties["receptors"] == nil || sc.Value.Properties["receptors"].Value == nil {
		return fmt.Errorf("openapi: openapi.yaml has no Scenario.receptors")
	}
	r := sc.Value.Properties["receptors"].Value
	if len(r.OneOf) == 0 || r.OneOf[0].Value == nil || r.OneOf[0].Value.Items == nil {
		return fmt.Errorf("openapi: Scenario.receptors must be oneOf an array and a layer")
	}
	sc.Value.Properties["receptors"] = r.OneOf[0]
	return nil
}
