package plume

import (
	"fmt"
	"reflect"
	"sort"
	"strconv"
	"strings"
)

// UncertainParameter is one scenario number given as a distribution.
type UncertainParameter struct {
	// JSON path of the number within the scenario, e.g.
	// "aquifer.hydraulic_conductivity" or "receptors[2].x".
	Path string `json:"parameter"`
	// Its distribution, in the unit of the field.
	Dist Distribution `json:"distribution"`
}

// ExtractUncertain walks the JSON tree of a scenario (as decoded by
// encoding/json into map[string]any, []any, float64 or json.Number),
// replaces every distribution object (an object with a "distribution"
// member) in place by the distribution's median, and returns the uncertain
// parameters in a fixed order (object members sorted by name). Wrong JSON
// types inside a distribution are returned in malformed, missing or
// out-of-range members in invalid, each named by its path within the
// scenario (e.g. "aquifer.hydraulic_conductivity.p95").
func ExtractUncertain(tree any) (params []UncertainParameter, malformed, invalid FieldErrors) {
	var walk func(v any, path string) (any, bool)
	walk = func(v any, path string) (any, bool) {
		switch x := v.(type) {
		case map[string]any:
			if isDistribution(x) {
				d, ok := parseDistribution(path, x, &malformed, &invalid)
				if ok {
					params = append(params, UncertainParameter{Path: path, Dist: d})
					return d.Median(), true
				}
				return 1.0, true // keeps the schema check quiet about this field
			}
			keys := make([]string, 0, len(x))
			for k := range x {
				keys = append(keys, k)
			}
			sort.Strings(keys)
			for _, k := range keys {
				if nv, repl := walk(x[k], joinField(path, k)); repl {
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
	return params, malformed, invalid
}

func joinField(path, k string) string {
	if path == "" {
		return k
	}
	return path + "." + k
}

// pathSegments splits "receptors[2].x" into "receptors", 2, "x".
func pathSegments(path string) ([]any, error) {
	var segs []any
	for _, part := range strings.Split(path, ".") {
		name, rest, _ := strings.Cut(part, "[")
		if name != "" {
			segs = append(segs, name)
		}
		for rest != "" {
			idx, after, ok := strings.Cut(rest, "]")
			if !ok {
				return nil, fmt.Errorf("bad index in %q", path)
			}
			i, err := strconv.Atoi(idx)
			if err != nil || i < 0 {
				return nil, fmt.Errorf("bad index in %q", path)
			}
			segs = append(segs, i)
			rest = strings.TrimPrefix(after, "[")
		}
	}
	return segs, nil
}

// setNumber stores v at the JSON path of sc. Pointers to structs and
// slices along the path are copied first, so a shallow copy of a shared
// template can be edited without touching the template (copy on write).
func setNumber(sc *Scenario, path string, v float64) error {
	segs, err := pathSegments(path)
	if err != nil {
		return err
	}
	cur := reflect.ValueOf(sc).Elem()
	for i, seg := range segs {
		last := i == len(segs)-1
		switch s := seg.(type) {
		case string:
			if cur.Kind() != reflect.Struct {
				return fmt.Errorf("%s: %q is not an object field", path, s)
			}
			f, ok := fieldByJSON(cur, s)
			if !ok {
				return fmt.Errorf("%s: no field %q", path, s)
			}
			cur = f
		case int:
			if cur.Kind() != reflect.Slice || s >= cur.Len() {
				return fmt.Errorf("%s: index %d out of range", path, s)
			}
			cp := reflect.MakeSlice(cur.Type(), cur.Len(), cur.Len())
			reflect.Copy(cp, cur)
			cur.Set(cp)
			cur = cur.Index(s)
		}
		if last {
			break
		}
		if cur.Kind() == reflect.Pointer && cur.Type().Elem().Kind() == reflect.Struct {
			nv := reflect.New(cur.Type().Elem())
			if !cur.IsNil() {
				nv.Elem().Set(cur.Elem())
			}
			cur.Set(nv)
			cur = nv.Elem()
		}
	}
	switch {
	case cur.Kind() == reflect.Float64:
		cur.SetFloat(v)
	case cur.Kind() == reflect.Pointer && cur.Type().Elem().Kind() == reflect.Float64:
		p := new(float64)
		*p = v
		cur.Set(reflect.ValueOf(p))
	default:
		return fmt.Errorf("%s: not a number field", path)
	}
	return nil
}

// fieldByJSON finds the struct field with the given JSON name.
func fieldByJSON(v reflect.Value, name string) (reflect.Value, bool) {
	t := v.Type()
	for i := range t.NumField() {
		tag, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ",")
		if tag == name {
			return v.Field(i), true
		}
	}
	return reflect.Value{}, false
}
