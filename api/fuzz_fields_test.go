package api

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"errors"
	"io"
	"maps"
	"math"
	"math/rand/v2"
	"net/http"
	"net/url"
	"os"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"unicode/utf8"

	"github.com/getkin/kin-openapi/openapi3"

	"downgradient/openapi"
)

// Structure-aware fuzz targets (issue 12, item 9). The byte-level targets
// of fuzz_test.go mostly produce bodies that the JSON parser or the schema
// refuses, so they ran 8-31 inputs a minute and seldom reached the engine.
// These start from a valid request and let the fuzzer choose which fields
// to change and to what: each input names up to two members (by index
// into every path of the request's schema, present in the seed or not)
// and, for each, an operation (a number of the fuzzer's choosing, an
// interesting number, a string, null, removal, a distribution object, an
// array of many copies...). Most inputs therefore validate and run the
// computation; TestFieldFuzzReachesEngine checks that they do. Run one
// longer with
//
//	go test ./api -run XXX -fuzz FuzzScreeningFields -fuzztime 10m

// fieldTarget is what a structure-aware target mutates: a seed tree and
// the JSON paths that may be changed.
type fieldTarget struct {
	method, target string
	seed           func(testing.TB) map[string]any
	paths          []fieldPath
	uncertain      bool // numbers may become distribution objects
}

// fieldPath is a member's path with its schema (nil: a number).
type fieldPath struct {
	segs   []string
	schema *openapi3.Schema
}

var (
	fieldPathsOnce sync.Once
	scenarioPaths  []fieldPath
	mapPaths       []fieldPath
)

// loadFieldPaths lists the member paths of the Scenario and MapRequest
// schemas (arrays at indices 0 and 1, to a depth of 6).
func loadFieldPaths(tb testing.TB) {
	fieldPathsOnce.Do(func() {
		spec, err := openapi.Load()
		if err != nil {
			tb.Fatal(err)
		}
		schemaPaths(spec.Doc.Components.Schemas["Scenario"].Value, nil, 6, &scenarioPaths)
		props := spec.Doc.Components.Schemas["MapRequest"].Value.Properties
		for _, name := range slices.Sorted(maps.Keys(props)) {
			if p := props[name]; name != "scenario" && p.Value != nil {
				schemaPaths(p.Value, []string{name}, 3, &mapPaths)
			}
		}
	})
}

// schemaPaths appends the paths of s's members under prefix.
func schemaPaths(s *openapi3.Schema, prefix []string, depth int, out *[]fieldPath) {
	if s == nil || depth == 0 {
		return
	}
	if len(prefix) > 0 {
		*out = append(*out, fieldPath{append([]string(nil), prefix...), s})
	}
	for _, name := range slices.Sorted(maps.Keys(s.Properties)) { // sorted: an input must name the same path every run
		if p := s.Properties[name]; p.Value != nil {
			schemaPaths(p.Value, append(append([]string(nil), prefix...), name), depth-1, out)
		}
	}
	if s.Items != nil && s.Items.Value != nil {
		for _, i := range []string{"0", "1"} {
			schemaPaths(s.Items.Value, append(append([]string(nil), prefix...), i), depth-1, out)
		}
	}
	for _, sub := range append(append(s.OneOf, s.AnyOf...), s.AllOf...) {
		if sub.Value != nil {
			for _, name := range slices.Sorted(maps.Keys(sub.Value.Properties)) {
				if p := sub.Value.Properties[name]; p.Value != nil {
					schemaPaths(p.Value, append(append([]string(nil), prefix...), name), depth-1, out)
				}
			}
		}
	}
}

// prefixed returns paths under a top-level member.
func prefixed(top string, paths []fieldPath) []fieldPath {
	out := make([]fieldPath, len(paths))
	for i, p := range paths {
		out[i] = fieldPath{append([]string{top}, p.segs...), p.schema}
	}
	return out
}

// numberPaths are paths of numbers without a schema at hand.
func numberPaths(paths ...[]string) []fieldPath {
	out := make([]fieldPath, len(paths))
	for i, p := range paths {
		out[i] = fieldPath{segs: p}
	}
	return out
}

// interesting are numbers at the edges of what validates and computes.
var interesting = []float64{0, -1, 1, 0.5, 2, 1e-300, 5e-324, 1e300, math.MaxFloat64, -math.MaxFloat64,
	1e-9, 1e9, 1e6, 365, 3650, 1e-3, 0.999999, 1.000001, 10000, 1e15}

// mutation is one fuzzer-chosen change of a request tree.
type mutation struct {
	path uint16
	op   uint8
	num  float64
	str  string
}

// apply makes the change at paths[path mod len]: a value of the member's
// own type (so that most requests still validate and reach the engine),
// and one time in sixteen anything at all.
func (m mutation) apply(tree map[string]any, paths []fieldPath, uncertain bool) {
	if len(paths) == 0 {
		return
	}
	// The first path from the chosen one whose parent exists: a member
	// of an object or array the request holds (a new sources[1] or
	// transects[0] made of one member could only be refused).
	var fp fieldPath
	for i := range paths {
		fp = paths[(int(m.path)+i)%len(paths)]
		if _, ok := getAt(tree, fp.segs[:len(fp.segs)-1]); ok {
			break
		}
	}
	p := fp.segs
	num := m.num
	if math.IsNaN(num) || math.IsInf(num, 0) { // not JSON: the byte-level targets try those
		num = math.Copysign(math.MaxFloat64, num)
	}
	sub := int(m.op / 16)
	kind := "number"
	if fp.schema != nil {
		kind = schemaType(fp.schema)
		if len(fp.schema.Enum) > 0 {
			kind = "enum"
		}
	}
	op := m.op % 16
	if op == 15 { // anything at all
		kind, op = "wild", uint8(sub%8)
	}
	var v any
	switch {
	case op == 12:
		deleteAt(tree, p)
		return
	case op == 13 && (fp.schema == nil || fp.schema.Nullable):
		v = nil
	case kind == "enum":
		v = fp.schema.Enum[int(m.op)%len(fp.schema.Enum)]
	case kind == "string":
		v = m.str
	case kind == "boolean":
		v = m.op%2 == 0
	case kind == "array":
		cur, ok := getAt(tree, p)
		items, isArr := cur.([]any)
		if !ok || !isArr || len(items) == 0 || op >= 8 {
			v = []any{}
			break
		}
		arr := make([]any, 2+sub%40) // many copies of the first item
		for i := range arr {
			arr[i] = items[0]
		}
		v = arr
	case kind == "object":
		deleteAt(tree, p)
		return
	case kind == "wild":
		v = []any{num, m.str, nil, true, []any{}, map[string]any{}, -num, math.Round(num)}[op]
	case op <= 5:
		v = num
	case op <= 9:
		v = interesting[sub%len(interesting)]
	case op >= 11 && uncertain: // an uncertain number (the uncertainty route samples it)
		v = map[string]any{"distribution": "uniform", "min": math.Abs(num) / 2, "max": math.Abs(num)*2 + 1e-9}
	default:
		v = math.Round(num)
	}
	setAt(tree, p, v)
}

// getAt returns the member at path.
func getAt(tree any, path []string) (any, bool) {
	cur := tree
	for _, seg := range path {
		switch c := cur.(type) {
		case map[string]any:
			next, ok := c[seg]
			if !ok {
				return nil, false
			}
			cur = next
		case []any:
			i, err := strconv.Atoi(seg)
			if err != nil || i >= len(c) {
				return nil, false
			}
			cur = c[i]
		default:
			return nil, false
		}
	}
	return cur, true
}

// setAt stores v at path, making the objects and array items on the way.
func setAt(tree map[string]any, path []string, v any) {
	var cur any = tree
	for i, seg := range path {
		last := i == len(path)-1
		switch c := cur.(type) {
		case map[string]any:
			if last {
				c[seg] = v
				return
			}
			next, ok := c[seg]
			if !ok || next == nil {
				if _, err := strconv.Atoi(path[i+1]); err == nil {
					next = []any{}
				} else {
					next = map[string]any{}
				}
				c[seg] = next
			}
			if arr, ok := next.([]any); ok {
				idx, err := strconv.Atoi(path[i+1])
				if err == nil && idx >= len(arr) {
					for len(arr) <= idx {
						arr = append(arr, map[string]any{})
					}
					c[seg] = arr
					next = arr
				}
			}
			cur = next
		case []any:
			idx, err := strconv.Atoi(seg)
			if err != nil || idx >= len(c) {
				return
			}
			if last {
				c[idx] = v
				return
			}
			if c[idx] == nil {
				c[idx] = map[string]any{}
			}
			cur = c[idx]
		default:
			return // a scalar on the way: the change has nowhere to go
		}
	}
}

// deleteAt removes the member at path.
func deleteAt(tree map[string]any, path []string) {
	parent, ok := getAt(tree, path[:len(path)-1])
	if !ok {
		return
	}
	switch c := parent.(type) {
	case map[string]any:
		delete(c, path[len(path)-1])
	case []any:
		if i, err := strconv.Atoi(path[len(path)-1]); err == nil && i < len(c) {
			setAt(tree, path[:len(path)-1], append(c[:i:i], c[i+1:]...))
		}
	}
}

// fieldBody applies the mutations to a fresh seed and encodes it.
func fieldBody(tb testing.TB, ft fieldTarget, muts ...mutation) []byte {
	tree := ft.seed(tb)
	for _, m := range muts {
		m.apply(tree, ft.paths, ft.uncertain)
	}
	b, err := json.Marshal(tree)
	if err != nil {
		tb.Fatal(err)
	}
	return b
}

// fieldTargets are the requests the structure-aware targets start from
// (the invented demo, testdata/demo), kept small so that an input runs in
// milliseconds to a second.
func fieldTargets(tb testing.TB) map[string]fieldTarget {
	loadFieldPaths(tb)
	demo := func(tb testing.TB) map[string]any {
		m := demoMap(tb)
		m["times"] = []any{365, 3650}
		return m
	}
	unc := func(tb testing.TB) map[string]any {
		m := uncertaintyMap(tb)
		m["realizations"] = 40
		m["scenario"].(map[string]any)["times"] = []any{3650}
		return m
	}
	envelope := append(prefixed("scenario", scenarioPaths), numberPaths([]string{"realizations"}, []string{"seed"})...)
	fitPaths := append(prefixed("scenario", scenarioPaths), numberPaths([]string{"observations", "0", "x"}, []string{"observations", "0", "time"},
		[]string{"observations", "0", "concentration"}, []string{"observations", "1", "detection_limit"}, []string{"time"})...)
	return map[string]fieldTarget{
		"screenings":   {http.MethodPost, "/v1/screenings", demo, scenarioPaths, false},
		"reports":      {http.MethodPost, "/v1/reports", demo, scenarioPaths, false},
		"plots":        {http.MethodPost, "/v1/plots?kind=", demo, scenarioPaths, false},
		"uncertainty":  {http.MethodPost, "/v1/uncertainty", unc, envelope, true},
		"plume-maps":   {http.MethodPost, "/v1/plume-maps", func(tb testing.TB) map[string]any { return mapRequest(tb, map[string]any{"cells": 900, "time": 3650}) }, append(prefixed("scenario", scenarioPaths), mapPaths...), false},
		"attenuation":  {http.MethodPost, "/v1/attenuation", attenuationMap, fitPaths, false},
		"calibrations": {http.MethodPost, "/v1/calibrations", calibrationMap, fitPaths, false},
	}
}

// fuzzFields is the body of every structure-aware POST target.
func fuzzFields(f *testing.F, name string) {
	ft := fieldTargets(f)[name]
	f.Add(uint16(0), uint8(255), 0.0, uint16(0), uint8(255), 0.0, "", uint8(0)) // the seed as is (op 255 sets the path's first interesting value... see apply)
	f.Add(uint16(3), uint8(0), 1e-3, uint16(17), uint8(2), 0.0, "x", uint8(1))
	f.Add(uint16(40), uint8(10), 5.0, uint16(9), uint8(6), 0.0, "", uint8(2))
	f.Add(uint16(11), uint8(9), 30.0, uint16(25), uint8(4), 0.0, "MW\u00e9", uint8(3))
	f.Add(uint16(7), uint8(1), 1e300, uint16(8), uint8(1), -1e-300, "", uint8(4))
	f.Fuzz(func(t *testing.T, p1 uint16, op1 uint8, v1 float64, p2 uint16, op2 uint8, v2 float64, s string, accept uint8) {
		ts := fuzzServer(t)
		body := fieldBody(t, ft, mutation{p1, op1, v1, s}, mutation{p2, op2, v2, s})
		target := ft.target
		if strings.HasSuffix(target, "kind=") {
			target += []string{"breakthrough", "profile", "map"}[int(accept)%3]
		}
		hdr := map[string]string{"Accept": fuzzAccepts[int(accept)%len(fuzzAccepts)]}
		rec := fuzzCall(t, ts, ft.method, target, body, hdr)
		checkFuzzResponse(t, rec, ft.method+" "+target)
		checkFuzzBody(t, rec)
	})
}

// checkFuzzBody checks a 200's body by its media type: SVG well-formed
// XML, HTML valid UTF-8 without NUL, CSV rows of one length, JSON without
// NaN or infinity (which encoding/json cannot produce, so a body that does
// not decode says so).
func checkFuzzBody(t *testing.T, rec interface {
	Result() *http.Response
}) {
	t.Helper()
	resp := rec.Result()
	if resp.StatusCode != http.StatusOK {
		return
	}
	body, _ := io.ReadAll(resp.Body)
	ct := resp.Header.Get("Content-Type")
	switch {
	case strings.HasPrefix(ct, mimeSVG):
		dec := xml.NewDecoder(bytes.NewReader(body))
		for {
			_, err := dec.Token()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				t.Fatalf("SVG is not well-formed XML: %v", err)
			}
		}
	case strings.HasPrefix(ct, "text/html"):
		if !utf8.Valid(body) || bytes.IndexByte(body, 0) >= 0 {
			t.Fatal("HTML with invalid UTF-8 or NUL bytes")
		}
	case strings.HasPrefix(ct, mimeCSV):
		r := csv.NewReader(bytes.NewReader(body))
		if _, err := r.ReadAll(); err != nil {
			t.Fatalf("CSV does not parse: %v", err)
		}
	case strings.Contains(ct, "json"):
		if !json.Valid(body) {
			t.Fatalf("invalid JSON: %.300s", body)
		}
	}
}

func FuzzScreeningFields(f *testing.F)   { fuzzFields(f, "screenings") }
func FuzzReportFields(f *testing.F)      { fuzzFields(f, "reports") }
func FuzzPlotFields(f *testing.F)        { fuzzFields(f, "plots") }
func FuzzUncertaintyFields(f *testing.F) { fuzzFields(f, "uncertainty") }
func FuzzPlumeMapFields(f *testing.F)    { fuzzFields(f, "plume-maps") }
func FuzzAttenuationFields(f *testing.F) { fuzzFields(f, "attenuation") }
func FuzzCalibrationFields(f *testing.F) { fuzzFields(f, "calibrations") }

// FuzzConcentrationFields changes the values of a valid spreadsheet GET:
// the fuzzer picks parameters (by index) and values (its numbers, the
// interesting ones, or its string).
func FuzzConcentrationFields(f *testing.F) {
	f.Add(uint16(0), uint8(0), 0.3, uint16(5), uint8(2), 0.0, "")
	f.Add(uint16(9), uint8(4), 0.0, uint16(12), uint8(1), 1e20, "steady")
	f.Fuzz(func(t *testing.T, p1 uint16, op1 uint8, v1 float64, p2 uint16, op2 uint8, v2 float64, s string) {
		ts := fuzzServer(t)
		q := concentrationValues()
		for _, m := range []mutation{{p1, op1, v1, s}, {p2, op2, v2, s}} {
			name := concentrationParams[int(m.path)%len(concentrationParams)]
			switch m.op % 4 {
			case 0:
				q.Set(name, strconv.FormatFloat(m.num, 'g', -1, 64))
			case 1:
				q.Set(name, strconv.FormatFloat(interesting[int(m.op/4)%len(interesting)], 'g', -1, 64))
			case 2:
				q.Set(name, m.s())
			default:
				q.Del(name)
			}
		}
		rec := fuzzCall(t, ts, http.MethodGet, "/v1/concentration?"+q.Encode(), nil, nil)
		checkFuzzResponse(t, rec, "GET /v1/concentration?"+q.Encode())
		if rec.Code == 200 && strings.ContainsAny(rec.Body.String(), "NnIi") && !strings.HasPrefix(rec.Header().Get("Content-Type"), "application/json") {
			t.Fatalf("non-finite answer %q", rec.Body.String())
		}
	})
}

// s is the mutation's string (kept to the query's printable range).
func (m mutation) s() string { return strings.ToValidUTF8(m.str, "") }

// concentrationParams are the parameters FuzzConcentrationFields changes.
var concentrationParams = []string{"aquifer.seepage_velocity", "aquifer.dispersivity.longitudinal", "aquifer.dispersivity.transverse",
	"aquifer.dispersivity.vertical", "contaminant.retardation", "contaminant.half_life", "source.concentration", "source.width",
	"source.depth", "time", "receptor.x", "receptor.y", "receptor.z", "method", "source.duration", "source.half_life", "units.time", "format"}

// concentrationValues is the demo's spreadsheet GET (invented data).
func concentrationValues() url.Values {
	q, _ := url.ParseQuery("aquifer.seepage_velocity=0.1229&aquifer.dispersivity.longitudinal=10&aquifer.dispersivity.transverse=1" +
		"&aquifer.dispersivity.vertical=0.1&contaminant.retardation=1.37&contaminant.half_life=720&source.concentration=12" +
		"&source.width=15&source.depth=3&receptor.x=210&receptor.y=6&receptor.z=2&time=3650&method=exact")
	return q
}

// The structure-aware targets reach the engine: of random two-field
// mutations of each target's seed (a fixed stream), at least half are
// computed (answered 200, or stopped by the engine), where the byte-level
// targets reached it for a few inputs in a hundred.
func TestFieldFuzzReachesEngine(t *testing.T) {
	ts := newTestServer(t, fuzzConfig)
	var calls atomic.Int64
	setHook(t, &testHookCompute, func(context.Context) { calls.Add(1) })
	seed := uint64(1)
	if v, err := strconv.ParseUint(os.Getenv("DOWNGRADIENT_FIELD_SEED"), 10, 64); err == nil {
		seed = v
	}
	rng := rand.New(rand.NewPCG(seed, 2))
	const n = 40
	for _, name := range []string{"screenings", "plots", "uncertainty", "plume-maps", "attenuation", "calibrations", "reports"} {
		ft := fieldTargets(t)[name]
		reached, statuses := 0, map[int]int{}
		for range n {
			rnd := func() mutation {
				return mutation{uint16(rng.IntN(1 << 16)), uint8(rng.IntN(256)), rng.NormFloat64() * math.Pow(10, float64(rng.IntN(12)-4)), "MW-9"}
			}
			body := fieldBody(t, ft, rnd(), rnd())
			calls.Store(0)
			target := strings.Replace(ft.target, "kind=", "kind=map", 1)
			rec := ts.call(t, ft.method, target, body, nil)
			statuses[rec.Code]++
			if rec.Code >= 500 && rec.Code != 503 {
				t.Errorf("%s: %d %s\nbody: %s", name, rec.Code, rec.Body.String(), body)
			}
			if calls.Load() > 0 {
				reached++
			}
		}
		t.Logf("%-12s %d of %d inputs reached the engine; statuses %v", name, reached, n, statuses)
		if reached < n/2 {
			t.Errorf("%s: only %d of %d inputs reached the engine", name, reached, n)
		}
	}
}
