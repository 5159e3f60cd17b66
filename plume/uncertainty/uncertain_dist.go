package uncertainty

import (
	"encoding/json"
	"fmt"
	"math"

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

// Members lists the members each distribution takes, besides its name.
var Members = map[string][]string{
	DistLognormal:  {"p05", "p95"},
	DistUniform:    {"min", "max"},
	DistLogUniform: {"min", "max"},
	DistTriangular: {"min", "mode", "max"},
	DistEmpirical:  {"values"},
}

// DistNames is the list of distribution names for messages.
const DistNames = `"lognormal", "uniform", "loguniform", "triangular", "empirical"`

// Check returns the first range rule d breaks, as the member concerned and
// a message; member is "" when d is valid. Its members must be finite (the
// decoder checks that) and an empirical distribution's values sorted.
func (d Distribution) Check() (member, msg string) {
	switch d.Kind {
	case DistLognormal:
		if !(d.P05 > 0) {
			return "p05", fmt.Sprintf("must be > 0 (a lognormal value is positive), got %g", d.P05)
		} else if !(d.P95 > d.P05) {
			return "p95", fmt.Sprintf("must be > p05 (%g), got %g", d.P05, d.P95)
		}
	case DistUniform, DistLogUniform:
		if d.Kind == DistLogUniform && !(d.Min > 0) {
			return "min", fmt.Sprintf("must be > 0 for a loguniform distribution, got %g", d.Min)
		} else if !(d.Max > d.Min) {
			return "max", fmt.Sprintf("must be > min (%g), got %g", d.Min, d.Max)
		}
	case DistTriangular:
		if !(d.Max > d.Min) {
			return "max", fmt.Sprintf("must be > min (%g), got %g", d.Min, d.Max)
		} else if !(d.Mode >= d.Min && d.Mode <= d.Max) {
			return "mode", fmt.Sprintf("must lie in [min, max] = [%g, %g], got %g", d.Min, d.Max, d.Mode)
		}
	case DistEmpirical:
		switch n := len(d.Values); {
		case n > MaxEmpiricalValues:
			return "values", fmt.Sprintf("at most %d items allowed, got %d", MaxEmpiricalValues, n)
		case n < 2:
			return "values", fmt.Sprintf("at least 2 values needed, got %d", n)
		}
	default:
		return "distribution", fmt.Sprintf("must be one of %s, got %q", DistNames, d.Kind)
	}
	return "", ""
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
