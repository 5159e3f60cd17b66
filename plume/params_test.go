package plume

import (
	"reflect"
	"strings"
	"testing"
)

// Param.Set edits a shallow copy without touching the shared template, and
// ParseParam refuses paths that name no number.
func TestParamSetCopyOnWrite(t *testing.T) {
	tmpl := demoScenario()
	sc := tmpl
	for _, c := range []struct {
		path string
		v    float64
	}{{"aquifer.dispersivity.longitudinal", 3}, {"receptors[1].x", 99}, {"times[2]", 42}, {"source.concentration", 7}} {
		p, err := ParseParam(c.path)
		if err != nil {
			t.Fatal(err)
		}
		if err := p.Set(&sc, c.v); err != nil {
			t.Fatal(err)
		}
	}
	if *sc.Aquifer.Dispersivity.Longitudinal != 3 || *sc.Receptors[1].X != 99 || sc.Times[2] != 42 || *sc.Source.Concentration != 7 {
		t.Errorf("values not set: %s", mustJSON(sc))
	}
	if *tmpl.Aquifer.Dispersivity.Longitudinal != 10 || *tmpl.Receptors[1].X != 60 || tmpl.Times[2] != 3650 || *tmpl.Source.Concentration != 12 {
		t.Errorf("template changed: %s", mustJSON(tmpl))
	}
	for _, bad := range []string{"contaminant.name", "aquifer.nothing", "receptors[x].x", "receptors[1].x[2]", "units.length"} {
		if _, err := ParseParam(bad); err == nil {
			t.Errorf("%q accepted as a number field", bad)
		}
	}
	p, _ := ParseParam("receptors[5].x")
	if err := p.Set(&sc, 1); err == nil {
		t.Error("index beyond the receptors accepted")
	}
}

// Every number field of a Scenario has a setter: the table and the struct
// agree (a new field without a setter fails here).
func TestParamTableCoversScenario(t *testing.T) {
	sc := demoScenario()
	sc.Sources = []Source{sc.Source}
	sc.Transects = []Transect{{}}
	sc.Contaminants = []Constituent{{}}
	for _, path := range ParamPaths() {
		concrete := strings.Replace(path, "[]", "[0]", 1)
		p, err := ParseParam(concrete)
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		if err := p.Set(&sc, 1.5); err != nil {
			t.Errorf("%s: %v", path, err)
		}
	}
	if got, want := len(ParamPaths()), countNumbers(reflect.TypeOf(Scenario{})); got != want {
		t.Errorf("%d settable numbers, want %d (every *float64 and []float64 of Scenario)", got, want)
	}
}

// countNumbers counts the number fields of t, descending into structs,
// pointers to structs and slices of structs.
func countNumbers(t reflect.Type) int {
	n := 0
	for i := range t.NumField() {
		ft := t.Field(i).Type
		for ft.Kind() == reflect.Pointer || ft.Kind() == reflect.Slice {
			if ft.Elem().Kind() == reflect.Float64 {
				n++
				break
			}
			ft = ft.Elem()
		}
		if ft.Kind() == reflect.Struct {
			n += countNumbers(ft)
		}
	}
	return n
}
