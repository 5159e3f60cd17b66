package plume

import (
	"bytes"
	"context"
	"encoding/json"
	"reflect"
	"testing"
)

// Result.JSON writes the same bytes as the Result itself, for results of
// one compound (the view) and of several (the result), and the view keeps
// every field of Result with the same name, type and order, the receptors
// aside.
func TestResultJSONView(t *testing.T) {
	rt, vt := reflect.TypeFor[Result](), reflect.TypeFor[resultView]()
	if rt.NumField() != vt.NumField() {
		t.Fatalf("Result has %d fields, resultView %d: add the new field to resultView and Result.JSON", rt.NumField(), vt.NumField())
	}
	for i := range rt.NumField() {
		a, b := rt.Field(i), vt.Field(i)
		same := a.Name == b.Name && a.Tag == b.Tag && (a.Type == b.Type || a.Name == "Receptors")
		if !same {
			t.Errorf("field %d: Result has %s %v %q, resultView %s %v %q", i, a.Name, a.Type, a.Tag, b.Name, b.Type, b.Tag)
		}
	}
	withSources := massSources(t)
	withSources.Contributions = true
	for name, sc := range map[string]Scenario{
		"demo": demoScenario(), "sources": withSources, "mass": massDemo(t), "dry cleaner": dryCleaner(t),
	} {
		sc.Methods = []string{MethodExact, MethodDomenico} // the numeric chain takes seconds
		res, err := Screen(context.Background(), sc, Options{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		want, err := json.Marshal(res)
		if err != nil {
			t.Fatal(err)
		}
		got, err := json.Marshal(res.JSON())
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s: the view writes %d bytes, the result %d; first difference:\n%s", name, len(got), len(want), firstDiff(string(got), string(want)))
		}
		for i := range res.Receptors {
			a, _ := json.Marshal(&res.Receptors[i])
			b, _ := json.Marshal(res.Receptors[i].JSON())
			if !bytes.Equal(a, b) {
				t.Errorf("%s: receptor %d: %s\nwant %s", name, i, b, a)
			}
		}
		_, isResult := res.JSON().(*Result)
		if compounds := len(sc.Contaminants) > 0; isResult != compounds {
			t.Errorf("%s: JSON() returned the result itself: %v, want %v", name, isResult, compounds)
		}
	}
}
