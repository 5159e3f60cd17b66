package api

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strings"

	"downgradient/plume"
	"downgradient/plume/uncertainty"
)

// The uncertainty body's scenario may hold a distribution object wherever
// a number stands ({"distribution": "lognormal", "p05": 2, "p95": 40}).
// These functions find them in the decoded JSON tree, type-check their
// members and hand the domain typed distributions keyed by parameter.

// distributionTree is what extractUncertain found in a scenario tree.
type distributionTree struct {
	params []uncertainty.UncertainParameter
	// Wrong JSON types (400) and missing, unknown or out-of-range members
	// (422), named by their path within the scenario.
	malformed, invalid plume.FieldErrors
	// Distribution objects at paths that name no number field; reported
	// after the schema check, which usually names them better.
	notNumbers plume.FieldErrors
}

// extractUncertain walks the JSON tree of a scenario (as decoded by
// encoding/json into map[string]any, []any, float64 or json.Number),
// replaces every distribution object (an object with a "distribution"
// member) in place by the distribution's median, and returns the uncertain
// parameters in a fixed order (object members sorted by name).
func extractUncertain(tree any) distributionTree {
	var out distributionTree
	var walk func(v any, path string) (any, bool)
	walk = func(v any, path string) (any, bool) {
		switch x := v.(type) {
		case map[string]any:
			if _, ok := x["distribution"]; ok {
				return out.add(path, x), true
			}
			keys := make([]string, 0, len(x))
			for k := range x {
				keys = append(keys, k)
			}
			sort.Strings(keys)
			for _, k := range keys {
				if nv, repl := walk(x[k], joinFieldPath(path, k)); repl {
					x[k] = nv
				}
			}
		case []any:
			for i := range x {
				if nv, repl := walk(x[i], fmt.Sprintf("%s[%d]", path, i)); repl {
					x[i] = nv
				}
			}
		}
		return nil, false
	}
	walk(tree, "")
	return out
}

// add reads the distribution object at path and returns the number to put
// in its place: its median, or 1 when it is wrong (which keeps the schema
// check quiet about this field).
func (dt *distributionTree) add(path string, obj map[string]any) float64 {
	d, ok := parseDistribution(path, obj, &dt.malformed, &dt.invalid)
	if !ok {
		return 1
	}
	prm, err := plume.ParseParam(path)
	if err != nil {
		dt.notNumbers.Add(path, "cannot be uncertain: "+err.Error())
		return d.Median()
	}
	dt.params = append(dt.params, uncertainty.UncertainParameter{Param: prm, Dist: d})
	return d.Median()
}

// jsonNumber reads a JSON number decoded as float64 or json.Number; ok is
// false for any other type. A number beyond float64 (1e999) comes back as
// +-Inf with ok true.
func jsonNumber(v any) (float64, bool) {
	switch x := v.(type) {
	case float64:
		return x, true
	case json.Number:
		f, err := x.Float64()
		if err != nil {
			if strings.HasPrefix(string(x), "-") {
				return math.Inf(-1), true
			}
			return math.Inf(1), true
		}
		return f, true
	}
	return 0, false
}

// parseDistribution reads a distribution object at path (JSON path of the
// object within the scenario). Wrong JSON types go to malformed; missing,
// unknown or non-finite members and the domain's range rules
// (Distribution.Check) to invalid.
func parseDistribution(path string, obj map[string]any, malformed, invalid *plume.FieldErrors) (uncertainty.Distribution, bool) {
	var d uncertainty.Distribution
	kind, isStr := obj["distribution"].(string)
	if !isStr {
		malformed.Add(path+".distribution", fmt.Sprintf("wrong type: must be a string, one of %s", uncertainty.DistNames))
		return d, false
	}
	want, known := uncertainty.Members[kind]
	if !known {
		invalid.Add(path+".distribution", fmt.Sprintf("must be one of %s, got %q", uncertainty.DistNames, kind))
		return d, false
	}
	d.Kind = kind
	m := memberReader{path: path, obj: obj, kind: kind, want: want, malformed: malformed, invalid: invalid, ok: true}
	m.unknownMembers()
	switch kind {
	case uncertainty.DistLognormal:
		d.P05, d.P95 = m.num("p05"), m.num("p95")
	case uncertainty.DistUniform, uncertainty.DistLogUniform:
		d.Min, d.Max = m.num("min"), m.num("max")
	case uncertainty.DistTriangular:
		d.Min, d.Mode, d.Max = m.num("min"), m.num("mode"), m.num("max")
	case uncertainty.DistEmpirical:
		d.Values = m.values()
	}
	if m.ok {
		if member, msg := d.Check(); member != "" {
			invalid.Add(path+"."+member, msg)
			m.ok = false
		}
	}
	return d, m.ok
}

// memberReader reads the members of one distribution object.
type memberReader struct {
	path               string
	obj                map[string]any
	kind               string
	want               []string
	malformed, invalid *plume.FieldErrors
	ok                 bool
}

// unknownMembers reports members the distribution does not take.
func (m *memberReader) unknownMembers() {
	allowed := map[string]bool{"distribution": true}
	for _, k := range m.want {
		allowed[k] = true
	}
	keys := make([]string, 0, len(m.obj))
	for k := range m.obj {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if !allowed[k] {
			m.invalid.Add(m.path+"."+k, fmt.Sprintf("unknown field for a %s distribution, which takes %s", m.kind, strings.Join(m.want, ", ")))
			m.ok = false
		}
	}
}

// num reads a finite number member.
func (m *memberReader) num(name string) float64 {
	raw, present := m.obj[name]
	if !present || raw == nil {
		m.invalid.Add(m.path+"."+name, fmt.Sprintf("required field is missing: a %s distribution needs %s", m.kind, strings.Join(m.want, ", ")))
		m.ok = false
		return math.NaN()
	}
	v, isNum := jsonNumber(raw)
	if !isNum {
		m.malformed.Add(m.path+"."+name, "wrong type: must be a number, got "+jsonTypeName(raw))
		m.ok = false
		return math.NaN()
	}
	if !plume.Finite(v) {
		m.invalid.Add(m.path+"."+name, "out of range: not a finite 64-bit floating-point number")
		m.ok = false
		return math.NaN()
	}
	return v
}

// values reads an empirical distribution's values (sorted ascending); the
// count limits are the domain's (Distribution.Check).
func (m *memberReader) values() []float64 {
	raw, present := m.obj["values"]
	arr, isArr := raw.([]any)
	switch {
	case !present || raw == nil:
		m.invalid.Add(m.path+".values", "required field is missing: an empirical distribution needs values (at least 2 numbers)")
		m.ok = false
		return nil
	case !isArr:
		m.malformed.Add(m.path+".values", "wrong type: must be an array of numbers, got "+jsonTypeName(raw))
		m.ok = false
		return nil
	case len(arr) > uncertainty.MaxEmpiricalValues || len(arr) < 2:
		count := uncertainty.Distribution{Kind: uncertainty.DistEmpirical, Values: make([]float64, len(arr))}
		member, msg := count.Check()
		m.invalid.Add(m.path+"."+member, msg)
		m.ok = false
		return nil
	}
	vs := make([]float64, len(arr))
	for i, x := range arr {
		v, isNum := jsonNumber(x)
		field := fmt.Sprintf("%s.values[%d]", m.path, i)
		if !isNum {
			m.malformed.Add(field, "wrong type: must be a number, got "+jsonTypeName(x))
			m.ok = false
		} else if !plume.Finite(v) {
			m.invalid.Add(field, "out of range: not a finite 64-bit floating-point number")
			m.ok = false
		}
		vs[i] = v
	}
	sort.Float64s(vs)
	return vs
}
