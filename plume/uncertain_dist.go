package plume

import (
	"encoding/json"
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// Distribution names accepted in an uncertain parameter (DESIGN.md 4b).
const (
	DistLognormal  = "lognormal"
	DistUniform    = "uniform"
	DistLogUniform = "loguniform"
	DistTriangular = "triangular"
	DistEmpirical  = "empirical"
)

// MaxEmpiricalValues is the most values an empirical distribution may list.
const MaxEmpiricalValues = 10_000

// z95 is the 95th percentile of the standard normal distribution,
// Phi^-1(0.95) = 1.6448536269514722 (gonum distuv.UnitNormal.Quantile).
var z95 = distuv.UnitNormal.Quantile(0.95)

// Distribution is an uncertain number, in the unit of the field it stands
// for. Sampled values are independent between parameters (no correlation).
//   - lognormal: ln X is normal with its 5th and 95th percentiles at
//     ln P05 and ln P95 (0 < P05 < P95): mu = (ln P05 + ln P95)/2,
//     sigma = (ln P95 - ln P05) / (2 z95);
//   - uniform on [Min, Max], Min < Max;
//   - loguniform: ln X uniform on [ln Min, ln Max], 0 < Min < Max;
//   - triangular on [Min, Max] with its mode at Mode, Min <= Mode <= Max, Min < Max;
//   - empirical: each of Values equally likely (a value listed twice
//     counts twice); the quantile at u is the ceil(u n)-th smallest value.
type Distribution struct {
	// One of the Dist* names.
	Kind string `json:"distribution"`
	// Percentiles of a lognormal distribution.
	P05 float64 `json:"p05,omitempty"`
	P95 float64 `json:"p95,omitempty"`
	// Bounds and mode of uniform, loguniform and triangular distributions.
	Min  float64 `json:"min,omitempty"`
	Max  float64 `json:"max,omitempty"`
	Mode float64 `json:"mode,omitempty"`
	// Values of an empirical distribution, sorted ascending.
	Values []float64 `json:"values,omitempty"`
}

// lognormalParams returns mu and sigma of ln X.
func (d Distribution) lognormalParams() (mu, sigma float64) {
	lo, hi := math.Log(d.P05), math.Log(d.P95)
	return 0.5 * (lo + hi), (hi - lo) / (2 * z95)
}

// Quantile is the inverse cumulative distribution function at u in [0, 1].
// u is clamped into [1e-15, 1 - 1e-15] so unbounded distributions stay finite.
func (d Distribution) Quantile(u float64) float64 {
	u = math.Min(math.Max(u, 1e-15), 1-1e-15)
	switch d.Kind {
	case DistLognormal:
		mu, sigma := d.lognormalParams()
		return distuv.LogNormal{Mu: mu, Sigma: sigma}.Quantile(u)
	case DistUniform:
		return distuv.Uniform{Min: d.Min, Max: d.Max}.Quantile(u)
	case DistLogUniform:
		lo, hi := math.Log(d.Min), math.Log(d.Max)
		return math.Min(math.Max(math.Exp(lo+u*(hi-lo)), d.Min), d.Max)
	case DistTriangular:
		return distuv.NewTriangle(d.Min, d.Max, d.Mode, nil).Quantile(u)
	case DistEmpirical:
		n := len(d.Values)
		i := int(math.Ceil(u*float64(n))) - 1
		return d.Values[min(max(i, 0), n-1)]
	}
	return math.NaN()
}

// Median is the 50th percentile.
func (d Distribution) Median() float64 { return d.Quantile(0.5) }

// Mean is the expected value.
func (d Distribution) Mean() float64 {
	switch d.Kind {
	case DistLognormal:
		mu, sigma := d.lognormalParams()
		return math.Exp(mu + sigma*sigma/2)
	case DistUniform:
		return (d.Min + d.Max) / 2
	case DistLogUniform:
		return (d.Max - d.Min) / math.Log(d.Max/d.Min)
	case DistTriangular:
		return (d.Min + d.Mode + d.Max) / 3
	case DistEmpirical:
		s := 0.0
		for _, v := range d.Values {
			s += v
		}
		return s / float64(len(d.Values))
	}
	return math.NaN()
}

// isDistribution reports whether a JSON object stands for an uncertain number.
func isDistribution(obj map[string]any) bool {
	_, ok := obj["distribution"]
	return ok
}

// distributionFields lists the members each distribution takes.
var distributionFields = map[string][]string{
	DistLognormal:  {"p05", "p95"},
	DistUniform:    {"min", "max"},
	DistLogUniform: {"min", "max"},
	DistTriangular: {"min", "mode", "max"},
	DistEmpirical:  {"values"},
}

// distNames is the list of distribution names for messages.
func distNames() string {
	return `"lognormal", "uniform", "loguniform", "triangular", "empirical"`
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
// object within the scenario). Wrong JSON types go to malformed, values out of
// range or missing members to invalid.
func parseDistribution(path string, obj map[string]any, malformed, invalid *FieldErrors) (Distribution, bool) {
	var d Distribution
	ok := true
	kind, isStr := obj["distribution"].(string)
	if !isStr {
		malformed.add(path+".distribution", fmt.Sprintf("wrong type: must be a string, one of %s", distNames()))
		return d, false
	}
	want, known := distributionFields[kind]
	if !known {
		invalid.add(path+".distribution", fmt.Sprintf("must be one of %s, got %q", distNames(), kind))
		return d, false
	}
	d.Kind = kind
	allowed := map[string]bool{"distribution": true}
	for _, k := range want {
		allowed[k] = true
	}
	keys := make([]string, 0, len(obj))
	for k := range obj {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if !allowed[k] {
			invalid.add(path+"."+k, fmt.Sprintf("unknown field for a %s distribution, which takes %s", kind, strings.Join(want, ", ")))
			ok = false
		}
	}
	num := func(name string) float64 {
		raw, present := obj[name]
		if !present || raw == nil {
			invalid.add(path+"."+name, fmt.Sprintf("required field is missing: a %s distribution needs %s", kind, strings.Join(want, ", ")))
			ok = false
			return math.NaN()
		}
		v, isNum := jsonNumber(raw)
		if !isNum {
			malformed.add(path+"."+name, "wrong type: must be a number, got "+typeName(raw))
			ok = false
			return math.NaN()
		}
		if !finite(v) {
			invalid.add(path+"."+name, "out of range: not a finite 64-bit floating-point number")
			ok = false
			return math.NaN()
		}
		return v
	}
	bad := func(name, msg string, args ...any) {
		invalid.add(path+"."+name, fmt.Sprintf(msg, args...))
		ok = false
	}
	switch kind {
	case DistLognormal:
		d.P05, d.P95 = num("p05"), num("p95")
		if ok {
			if !(d.P05 > 0) {
				bad("p05", "must be > 0 (a lognormal value is positive), got %g", d.P05)
			} else if !(d.P95 > d.P05) {
				bad("p95", "must be > p05 (%g), got %g", d.P05, d.P95)
			}
		}
	case DistUniform, DistLogUniform:
		d.Min, d.Max = num("min"), num("max")
		if ok {
			if kind == DistLogUniform && !(d.Min > 0) {
				bad("min", "must be > 0 for a loguniform distribution, got %g", d.Min)
			} else if !(d.Max > d.Min) {
				bad("max", "must be > min (%g), got %g", d.Min, d.Max)
			}
		}
	case DistTriangular:
		d.Min, d.Mode, d.Max = num("min"), num("mode"), num("max")
		if ok {
			if !(d.Max > d.Min) {
				bad("max", "must be > min (%g), got %g", d.Min, d.Max)
			} else if !(d.Mode >= d.Min && d.Mode <= d.Max) {
				bad("mode", "must lie in [min, max] = [%g, %g], got %g", d.Min, d.Max, d.Mode)
			}
		}
	case DistEmpirical:
		raw, present := obj["values"]
		arr, isArr := raw.([]any)
		switch {
		case !present || raw == nil:
			bad("values", "required field is missing: an empirical distribution needs values (at least 2 numbers)")
		case !isArr:
			malformed.add(path+".values", "wrong type: must be an array of numbers, got "+typeName(raw))
			ok = false
		case len(arr) > MaxEmpiricalValues:
			bad("values", "at most %d items allowed, got %d", MaxEmpiricalValues, len(arr))
		case len(arr) < 2:
			bad("values", "at least 2 values needed, got %d", len(arr))
		default:
			d.Values = make([]float64, len(arr))
			for i, x := range arr {
				v, isNum := jsonNumber(x)
				field := fmt.Sprintf("%s.values[%d]", path, i)
				if !isNum {
					malformed.add(field, "wrong type: must be a number, got "+typeName(x))
					ok = false
				} else if !finite(v) {
					invalid.add(field, "out of range: not a finite 64-bit floating-point number")
					ok = false
				}
				d.Values[i] = v
			}
			sort.Float64s(d.Values)
		}
	}
	return d, ok
}

// typeName names the JSON type of a decoded value for messages.
func typeName(v any) string {
	switch v.(type) {
	case nil:
		return "null"
	case bool:
		return "a boolean"
	case string:
		return "a string"
	case float64, json.Number:
		return "a number"
	case []any:
		return "an array"
	case map[string]any:
		return "an object"
	}
	return fmt.Sprintf("%T", v)
}

// MarshalJSON writes the members the distribution takes (and only those),
// as in a request.
func (d Distribution) MarshalJSON() ([]byte, error) {
	m := map[string]any{"distribution": d.Kind}
	switch d.Kind {
	case DistLognormal:
		m["p05"], m["p95"] = d.P05, d.P95
	case DistUniform, DistLogUniform:
		m["min"], m["max"] = d.Min, d.Max
	case DistTriangular:
		m["min"], m["mode"], m["max"] = d.Min, d.Mode, d.Max
	case DistEmpirical:
		m["values"] = d.Values
	}
	return json.Marshal(m)
}
