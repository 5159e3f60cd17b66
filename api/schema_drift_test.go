package api

import (
	"reflect"
	"sort"
	"strings"
	"testing"

	"github.com/getkin/kin-openapi/openapi3"

	"downgradient/openapi"
	"downgradient/plume"
	"downgradient/plume/fit"
)

// jsonFields lists the JSON names of a struct's fields (embedded structs
// flattened) with their Go types.
func jsonFields(t reflect.Type) map[string]reflect.Type {
	out := map[string]reflect.Type{}
	for i := range t.NumField() {
		f := t.Field(i)
		if !f.IsExported() {
			continue
		}
		tag := f.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, _, _ := strings.Cut(tag, ",")
		if f.Anonymous && name == "" {
			for k, v := range jsonFields(f.Type) {
				out[k] = v
			}
			continue
		}
		if name == "" {
			name = f.Name
		}
		out[name] = f.Type
	}
	return out
}

// structOf strips pointers, slices and arrays down to a struct type, or nil.
func structOf(t reflect.Type) reflect.Type {
	for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice || t.Kind() == reflect.Array {
		t = t.Elem()
	}
	if t.Kind() == reflect.Struct {
		return t
	}
	return nil
}

// itemsOf strips array schemas down to their item schema.
func itemsOf(s *openapi3.Schema) *openapi3.Schema {
	for {
		switch {
		case s != nil && len(s.OneOf) > 0 && s.OneOf[0].Value != nil:
			s = s.OneOf[0].Value // Scenario.receptors: the array (the Go type's form); a layer is read into it
		case s != nil && s.Type != nil && s.Type.Is("array") && s.Items != nil:
			s = s.Items.Value
		default:
			return s
		}
	}
}

// schemaOnly are properties a schema has beyond a Go type's fields: a
// fitted scenario is a Scenario in the document, and the free text a
// request may add to one (memo, sources_of_values) lives in api, not in
// the domain's type.
var schemaOnly = map[reflect.Type][]string{
	reflect.TypeFor[fit.FittedScenario](): {"memo", "sources_of_values", "receptor_id_property"},
}

// compareStruct checks that the schema's properties are exactly the JSON
// fields of the Go type, recursively.
func compareStruct(t *testing.T, where string, gt reflect.Type, s *openapi3.Schema, extra ...string) {
	t.Helper()
	fields := jsonFields(gt)
	for _, e := range append(extra, schemaOnly[gt]...) {
		fields[e] = nil
	}
	var missing, unknown []string
	for name := range fields {
		if _, ok := s.Properties[name]; !ok {
			missing = append(missing, name)
		}
	}
	for name := range s.Properties {
		if _, ok := fields[name]; !ok {
			unknown = append(unknown, name)
		}
	}
	sort.Strings(missing)
	sort.Strings(unknown)
	if len(missing) > 0 {
		t.Errorf("%s: Go fields not in openapi.yaml: %v", where, missing)
	}
	if len(unknown) > 0 {
		t.Errorf("%s: openapi.yaml properties with no Go field: %v", where, unknown)
	}
	for name, ft := range fields {
		if ft == nil {
			continue
		}
		st := structOf(ft)
		ps, ok := s.Properties[name]
		if st == nil || !ok || ps.Value == nil {
			continue
		}
		sub := itemsOf(ps.Value)
		if sub == nil || len(sub.Properties) == 0 {
			t.Errorf("%s.%s: Go struct %s but the schema has no properties", where, name, st.Name())
			continue
		}
		compareStruct(t, where+"."+name, st, sub)
	}
}

// The request and response schemas of openapi.yaml match the Go types'
// JSON tags field for field, so the contract and the code cannot drift apart.
func TestSchemasMatchGoTypes(t *testing.T) {
	spec, err := openapi.Load()
	if err != nil {
		t.Fatal(err)
	}
	schema := func(name string) *openapi3.Schema {
		ref := spec.Doc.Components.Schemas[name]
		if ref == nil || ref.Value == nil {
			t.Fatalf("schema %s missing", name)
		}
		return ref.Value
	}
	compareStruct(t, "Scenario", reflect.TypeFor[plume.Scenario](), schema("Scenario"), "description", "memo", "sources_of_values", "receptor_id_property")
	compareStruct(t, "MemoHeader", reflect.TypeFor[memoHeader](), schema("MemoHeader"))
	compareStruct(t, "Result", reflect.TypeFor[plume.Result](), schema("Result"))
	compareStruct(t, "Compound", reflect.TypeFor[plume.Compound](), schema("Compound"))
	compareStruct(t, "FeatureCollection", reflect.TypeFor[featureCollection](), schema("FeatureCollection"))
	compareStruct(t, "Problem", reflect.TypeFor[Problem](), schema("Problem"))
	compareStruct(t, "ContaminantTable", reflect.TypeFor[contaminantTable](), schema("ContaminantTable"))
	healthSchema := spec.Doc.Paths.Find("/healthz").Get.Responses.Status(200).Value.Content.Get("application/json").Schema.Value
	compareStruct(t, "health", reflect.TypeFor[health](), healthSchema)
}
