package api

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"net/http"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// randomScenario draws a valid scenario over wide ranges: large Peclet
// numbers, tiny concentrations, early times, far and upgradient receptors,
// every unit, source kind and history.
func randomScenario(r *rand.Rand) map[string]any {
	logU := func(lo, hi float64) float64 { return math.Exp(math.Log(lo) + r.Float64()*(math.Log(hi)-math.Log(lo))) }
	pick := func(xs ...any) any { return xs[r.IntN(len(xs))] }
	units := map[string]any{"length": pick("m", "ft"), "time": pick("d", "yr"), "concentration": pick("mg/L", "ug/L")}
	aq := map[string]any{}
	if r.IntN(2) == 0 {
		aq["seepage_velocity"] = logU(1e-4, 1e2)
	} else {
		aq["hydraulic_conductivity"] = logU(1e-3, 1e3)
		aq["hydraulic_gradient"] = logU(1e-5, 0.1)
	}
	aq["effective_porosity"] = 0.01 + 0.49*r.Float64()
	if r.IntN(3) > 0 {
		aL := logU(0.01, 100)
		aq["dispersivity"] = map[string]any{"longitudinal": aL, "transverse": aL * logU(0.01, 1), "vertical": aL * logU(0.001, 0.1)}
	}
	ct := map[string]any{}
	if r.IntN(2) == 0 {
		ct["name"] = pick("benzene", "toluene", "TCE", "vinyl chloride", "mtbe", "xylenes")
		aq["bulk_density"] = 1.4 + 0.6*r.Float64()
		aq["organic_carbon_fraction"] = logU(1e-5, 0.05)
	} else {
		ct["name"] = "tracer-like compound"
		ct["retardation"] = logU(1, 50)
	}
	if r.IntN(3) > 0 {
		ct["half_life"] = logU(0.1, 1e5)
		ct["decay_applies_to"] = pick("total", "dissolved")
	}
	if r.IntN(2) == 0 {
		ct["screening_level"] = logU(1e-6, 10)
	}
	src := map[string]any{"x": (r.Float64() - 0.5) * 2e4, "y": (r.Float64() - 0.5) * 2e4, "flow_azimuth_deg": 360 * r.Float64()}
	kind := r.IntN(4)
	switch kind {
	case 0, 1: // 3D rectangle
		src["concentration"] = logU(1e-6, 1e4)
		src["width"] = logU(0.1, 1000)
		src["depth"] = logU(0.1, 100)
	case 2: // 1D column
		src["concentration"] = logU(1e-6, 1e4)
		if r.IntN(2) == 0 {
			src["inlet"] = "flux"
		}
	case 3: // instantaneous mass
		src["mass"] = logU(1e-3, 1e4)
		src["release_depth"] = logU(0.01, 10)
	}
	if kind < 3 {
		if r.IntN(3) == 0 {
			src["duration"] = logU(1, 1e4)
		}
		if r.IntN(4) == 0 {
			src["half_life"] = logU(1, 1e5)
		}
	}
	az := src["flow_azimuth_deg"].(float64) * math.Pi / 180
	fx, fy := math.Sin(az), math.Cos(az)
	var recs []any
	for i := range 1 + r.IntN(5) {
		along := logU(1e-3, 1e5)
		if r.IntN(8) == 0 {
			along = -logU(0.1, 100) // upgradient
		}
		off := (r.Float64() - 0.5) * 2 * logU(1e-3, 1e3)
		rec := map[string]any{
			"id": fmt.Sprintf("R-%d", i),
			"x":  src["x"].(float64) + along*fx - off*fy,
			"y":  src["y"].(float64) + along*fy + off*fx,
		}
		if r.IntN(3) == 0 {
			top := logU(0.01, 20)
			rec["screen_top"], rec["screen_bottom"] = top, top+logU(0.01, 20)
		} else {
			rec["z"] = logU(1e-3, 50) * float64(r.IntN(2))
		}
		recs = append(recs, rec)
	}
	var times []any
	for range r.IntN(6) {
		times = append(times, logU(1e-3, 1e6))
	}
	if r.IntN(5) == 0 {
		times = append(times, 0.0)
	}
	methods := pick([]any{"exact"}, []any{"domenico"}, []any{"exact", "domenico"})
	return map[string]any{"units": units, "aquifer": aq, "contaminant": ct, "source": src,
		"receptors": recs, "times": times, "methods": methods}
}

// nonFiniteWord matches how Go and JavaScript print non-finite numbers.
var nonFiniteWord = regexp.MustCompile(`\bnan\b|[+-]inf\b|\binfinity\b|\binf\b`)

// finiteJSON walks a decoded JSON tree and reports any number that is not finite.
func finiteJSON(v any) bool {
	switch x := v.(type) {
	case map[string]any:
		for _, e := range x {
			if !finiteJSON(e) {
				return false
			}
		}
	case []any:
		for _, e := range x {
			if !finiteJSON(e) {
				return false
			}
		}
	case json.Number:
		f, err := x.Float64()
		return err == nil && !math.IsNaN(f) && !math.IsInf(f, 0)
	}
	return true
}

// Property: over random valid scenarios no response is a 500, none contains
// NaN or infinity in any format, and every response matches the OpenAPI
// document (checked by call).
func TestPropertyNoNaNOrInf(t *testing.T) {
	// A short deadline: the property is about the answers' shape, and a
	// deadline answer (503) is a valid one.
	ts := newTestServer(t, Config{RequestTimeout: 2 * time.Second})
	r := rand.New(rand.NewPCG(20240611, 7))
	n := 150
	if testing.Short() {
		n = 30
	}
	statuses := map[int]int{}
	for i := range n {
		sc := randomScenario(r)
		body := mustJSON(t, sc)
		for _, format := range []string{"json", "csv", "geojson"} {
			if format != "json" && i%5 != 0 {
				continue
			}
			rec := ts.call(t, http.MethodPost, "/v1/screenings?format="+format, body, nil)
			statuses[rec.Code]++
			if rec.Code != 200 && rec.Code != 422 && rec.Code != 503 {
				t.Fatalf("scenario %d (%s): status %d: %s\n%s", i, format, rec.Code, rec.Body.String(), body)
			}
			if rec.Code != 200 {
				if rec.Code == 503 && format == "json" {
					t.Logf("scenario %d hit the deadline: %s", i, body)
				}
				continue
			}
			out := rec.Body.Bytes()
			low := strings.ToLower(string(out))
			if format == "csv" {
				rows, err := csv.NewReader(bytes.NewReader(out)).ReadAll()
				if err != nil {
					t.Fatal(err)
				}
				for _, row := range rows[1:] {
					for _, col := range []int{1, 2, 3, 4, 5, 9} {
						f, err := strconv.ParseFloat(row[col], 64)
						if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
							t.Fatalf("scenario %d: CSV cell %q in %v\n%s", i, row[col], row, body)
						}
					}
				}
				continue
			}
			// Text such as caveat messages may not print NaN or infinity either.
			if m := nonFiniteWord.FindString(low); m != "" {
				t.Fatalf("scenario %d: body contains %q: %s", i, m, out)
			}
			dec := json.NewDecoder(bytes.NewReader(out))
			dec.UseNumber()
			var v any
			if err := dec.Decode(&v); err != nil || !finiteJSON(v) {
				t.Fatalf("scenario %d: non-finite or undecodable JSON (%v)", i, err)
			}
		}
	}
	if statuses[200] < n/2 {
		t.Errorf("only %d of %d random valid scenarios answered 200: %v", statuses[200], n, statuses)
	}
	t.Logf("statuses: %v", statuses)
}
