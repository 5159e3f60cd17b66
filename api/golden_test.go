package api

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"flag"
	"fmt"
	"math"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"sort"
	"strings"
	"testing"
	"time"
)

// updateGolden rewrites the golden files: go test ./api -run Golden -update.
var updateGolden = flag.Bool("update", false, "rewrite the golden files of TestGolden under testdata/golden")

// goldenDir holds the golden files; see its README.md.
const goldenDir = "testdata/golden"

// goldenVersion is the engine version of the golden server, so that
// engine.version in every result is a fixed string.
const goldenVersion = "golden"

// goldenClock is the fixed time the golden reports say they were run.
func goldenClock() time.Time { return time.Date(2024, 5, 17, 9, 30, 0, 0, time.UTC) }

// goldenCase is one request whose whole response is pinned: the body in
// <name>.<ext>; the request line and headers, the status and the response
// headers in <name>.<ext>.head.
type goldenCase struct {
	name   string            // file stem under testdata/golden
	ext    string            // extension of the body file
	method string            // HTTP method
	target string            // path and query
	header map[string]string // request headers besides Content-Type and X-Request-ID
	body   string            // key of goldenBodies ("" for none); stored as requests/<body>.json
	noID   bool              // send no X-Request-ID, so the server draws one (masked, see goldenMasks)
}

// goldenBodies build the request bodies from the helpers of the other tests;
// each is also pinned as requests/<key>.json, so a changed helper shows up as
// a changed request rather than as a changed answer.
var goldenBodies = map[string]func(testing.TB) []byte{
	"demo":         demoBody,
	"demo-column":  func(t testing.TB) []byte { return mustJSON(t, goldenColumn(t)) },
	"demo-spill":   func(t testing.TB) []byte { return mustJSON(t, goldenSpill(t)) },
	"demo-numeric": func(t testing.TB) []byte { return mustJSON(t, goldenNumeric(t)) },
	"imperial":     func(t testing.TB) []byte { return []byte(goldenImperial) },
	// The invented dry-cleaner chain, closed forms only (the numeric chain
	// takes seconds), and the same with one retardation factor so that the
	// chain's closed forms give every compound.
	"dry-cleaner": func(t testing.TB) []byte { return mustJSON(t, dryCleanerMapB(t)) },
	"dry-cleaner-equal-r": func(t testing.TB) []byte {
		m := dryCleanerMapB(t)
		equalRChain(m)
		return mustJSON(t, m)
	},
	"uncertainty": func(t testing.TB) []byte {
		m := uncertaintyMap(t)
		m["realizations"], m["methods"] = 50, []any{"exact"}
		return mustJSON(t, m)
	},
	"attenuation":  func(t testing.TB) []byte { return mustJSON(t, attenuationMap(t)) },
	"calibration":  func(t testing.TB) []byte { return mustJSON(t, calibrationMap(t)) },
	"map-plan":     func(t testing.TB) []byte { return mustJSON(t, mapRequest(t, map[string]any{"cells": 2000})) },
	"demo-memo":    func(t testing.TB) []byte { return mustJSON(t, memoMap(t)) },
	"map-section":  func(t testing.TB) []byte { return mustJSON(t, goldenSection(t)) },
	"bad-fields":   func(t testing.TB) []byte { return mustJSON(t, goldenBadFields(t)) },
	"bad-scenario": func(t testing.TB) []byte { return mustJSON(t, goldenBadScenario(t)) },
	"malformed":    func(t testing.TB) []byte { return []byte("{\n  \"aquifer\": {\"hydraulic_conductivity\": 8.6,,}\n}\n") },
	// The invented dry cleaner's chain with one retardation factor, closed forms only.
	"chain": func(t testing.TB) []byte { return mustJSON(t, equalRDryCleaner(t)) },
}

// goldenCases: the demo in the three representations of a screening, one
// request (or one per representation) for every other route, the source
// kinds and units the demo does not use, and the classes of error.
var goldenCases = []goldenCase{
	// Screenings: the demo in JSON, CSV and GeoJSON.
	{name: "screenings-demo", ext: "json", method: "POST", target: "/v1/screenings", body: "demo"},
	{name: "screenings-demo-csv", ext: "csv", method: "POST", target: "/v1/screenings", body: "demo", header: map[string]string{"Accept": "text/csv"}},
	{name: "screenings-demo-format-csv", ext: "csv", method: "POST", target: "/v1/screenings?format=csv", body: "demo"},
	{name: "screenings-demo-geojson", ext: "geojson", method: "POST", target: "/v1/screenings", body: "demo", header: map[string]string{"Accept": "application/geo+json"}},
	// Source kinds, units and the numeric method.
	{name: "screenings-column", ext: "json", method: "POST", target: "/v1/screenings", body: "demo-column"},
	{name: "screenings-spill", ext: "json", method: "POST", target: "/v1/screenings", body: "demo-spill"},
	{name: "screenings-imperial", ext: "json", method: "POST", target: "/v1/screenings", body: "imperial"},
	{name: "screenings-imperial-csv", ext: "csv", method: "POST", target: "/v1/screenings?format=csv", body: "imperial"},
	{name: "screenings-imperial-geojson", ext: "geojson", method: "POST", target: "/v1/screenings?format=geojson", body: "imperial"},
	{name: "screenings-numeric", ext: "json", method: "POST", target: "/v1/screenings", body: "demo-numeric"},
	{name: "screenings-dry-cleaner", ext: "json", method: "POST", target: "/v1/screenings", body: "dry-cleaner"},
	{name: "screenings-dry-cleaner-equal-r-csv", ext: "csv", method: "POST", target: "/v1/screenings?format=csv", body: "dry-cleaner-equal-r"},
	{name: "screenings-dry-cleaner-equal-r-geojson", ext: "geojson", method: "POST", target: "/v1/screenings?format=geojson", body: "dry-cleaner-equal-r"},
	// The spreadsheet GET (text/plain is its only representation).
	{name: "concentration-demo-365", ext: "txt", method: "GET", target: concentrationQuery(1287.6, 816.3, 1, "365", "exact")},
	{name: "concentration-demo-steady", ext: "txt", method: "GET", target: concentrationQuery(1449.4, 763.8, 5, "steady", "domenico")},
	// Reference table and meta routes.
	{name: "contaminants", ext: "json", method: "GET", target: "/v1/contaminants"},
	{name: "healthz", ext: "json", method: "GET", target: "/healthz", noID: true},
	{name: "openapi", ext: "yaml", method: "GET", target: "/openapi.yaml"},
	{name: "openapi", ext: "json", method: "GET", target: "/openapi.json"},
	// Uncertainty (50 realizations, seed 7, exact) in its three representations.
	{name: "uncertainty", ext: "json", method: "POST", target: "/v1/uncertainty", body: "uncertainty"},
	{name: "uncertainty-csv", ext: "csv", method: "POST", target: "/v1/uncertainty?format=csv", body: "uncertainty"},
	{name: "uncertainty-geojson", ext: "geojson", method: "POST", target: "/v1/uncertainty", body: "uncertainty", header: map[string]string{"Accept": "application/geo+json"}},
	// Fitting.
	{name: "attenuation", ext: "json", method: "POST", target: "/v1/attenuation", body: "attenuation"},
	{name: "calibrations", ext: "json", method: "POST", target: "/v1/calibrations", body: "calibration"},
	// Maps: outlines, grid and CSV of the plan view; a section's grid.
	{name: "plume-maps", ext: "geojson", method: "POST", target: "/v1/plume-maps", body: "map-plan"},
	{name: "plume-maps-grid", ext: "json", method: "POST", target: "/v1/plume-maps?format=grid", body: "map-plan"},
	{name: "plume-maps-csv", ext: "csv", method: "POST", target: "/v1/plume-maps", body: "map-plan", header: map[string]string{"Accept": "text/csv"}},
	{name: "plume-maps-section-grid", ext: "json", method: "POST", target: "/v1/plume-maps?format=grid", body: "map-section"},
	// The printable report and every kind of picture (SVG; one PNG).
	{name: "reports", ext: "html", method: "POST", target: "/v1/reports", body: "demo"},
	{name: "reports-memo", ext: "html", method: "POST", target: "/v1/reports?labels=all", body: "demo-memo"},
	{name: "reports-uncertainty", ext: "html", method: "POST", target: "/v1/reports", body: "uncertainty"},
	{name: "plots-section", ext: "svg", method: "POST", target: "/v1/plots?kind=section", body: "demo"},
	{name: "plots-map-options", ext: "svg", method: "POST", target: "/v1/plots?kind=map&time=3650&levels=0.01,0.1&labels=exceedances", body: "demo"},
	{name: "plots-breakthrough-linear", ext: "svg", method: "POST", target: "/v1/plots?kind=breakthrough&receptor=MW-1&scale=linear", body: "demo"},
	{name: "plots-breakthrough", ext: "svg", method: "POST", target: "/v1/plots?kind=breakthrough", body: "demo"},
	{name: "plots-breakthrough-mw2", ext: "svg", method: "POST", target: "/v1/plots?kind=breakthrough&receptor=MW-2", body: "demo"},
	{name: "plots-profile", ext: "svg", method: "POST", target: "/v1/plots?kind=profile", body: "demo"},
	{name: "plots-map", ext: "svg", method: "POST", target: "/v1/plots?kind=map", body: "demo"},
	{name: "plots-breakthrough-png", ext: "png", method: "POST", target: "/v1/plots?kind=breakthrough", body: "demo", header: map[string]string{"Accept": "image/png"}},
	// Several compounds: the memo (a row per receptor and compound, maps of
	// two compounds) and a breakthrough plot with a line per compound.
	{name: "reports-chain", ext: "html", method: "POST", target: "/v1/reports", body: "chain"},
	{name: "plots-breakthrough-chain", ext: "svg", method: "POST", target: "/v1/plots?kind=breakthrough&receptor=Orchard%20Lane%20well", body: "chain"},
	// Problems.
	{name: "problem-422-schema", ext: "json", method: "POST", target: "/v1/screenings", body: "bad-fields"},
	{name: "problem-422-scenario", ext: "json", method: "POST", target: "/v1/screenings", body: "bad-scenario"},
	{name: "problem-400-malformed", ext: "json", method: "POST", target: "/v1/screenings", body: "malformed"},
	{name: "problem-406", ext: "json", method: "POST", target: "/v1/screenings", body: "demo", header: map[string]string{"Accept": "text/html"}},
	{name: "problem-404", ext: "json", method: "GET", target: "/v1/no-such-route"},
	// The validator refuses the method and the unknown parameter before the time is read.
	{name: "problem-422-query", ext: "json", method: "GET", target: concentrationQuery(1287.6, 816.3, 1, "-1", "magic") + "&receptor.colour=red"},
}

// goldenMasks are the only response parts the golden files do not pin, each
// with the reason it cannot be pinned. A masked value must still match its
// pattern; the golden file holds the placeholder. Nothing in a body is masked.
var goldenMasks = []struct {
	header      string
	pattern     *regexp.Regexp
	placeholder string
	why         string
}{
	{HeaderRequestID, regexp.MustCompile(`^[0-9a-f]{32}$`), "<32 random lowercase hex digits>",
		"newRequestID draws it from crypto/rand when the request sends no X-Request-ID (cases with noID only; every other case sends a fixed ID, which must come back unchanged)"},
}

// TestGolden sends every golden case through the whole handler and compares
// the status, the headers and the body byte for byte with testdata/golden.
// It pins behaviour, not correctness: the other tests check the numbers
// against their sources.
func TestGolden(t *testing.T) {
	if !goldenPlatformMatches(t) {
		return
	}
	ts := newTestServer(t, Config{Version: goldenVersion, Clock: goldenClock})
	want := map[string]bool{"README.md": true, goldenPlatformFile: true}
	seen := map[string]bool{}
	for _, c := range goldenCases {
		id := c.name + "." + c.ext
		if seen[id] {
			t.Fatalf("two golden cases write %s", id)
		}
		seen[id] = true
		want[c.name+"."+c.ext], want[c.name+"."+c.ext+".head"] = true, true
		if c.body != "" {
			want[filepath.Join("requests", c.body+".json")] = true
		}
		t.Run(id, func(t *testing.T) { runGoldenCase(t, ts, c) })
	}
	checkStaleGolden(t, want)
}

func runGoldenCase(t *testing.T, ts *testServer, c goldenCase) {
	var body []byte
	if c.body != "" {
		build, ok := goldenBodies[c.body]
		if !ok {
			t.Fatalf("no golden body %q", c.body)
		}
		body = build(t)
		compareGolden(t, filepath.Join("requests", c.body+".json"), body)
	}
	header := map[string]string{HeaderRequestID: "golden-" + c.name + "." + c.ext}
	if c.noID {
		header[HeaderRequestID] = ""
	}
	for k, v := range c.header {
		header[k] = v
	}
	rec := ts.call(t, c.method, c.target, body, header)
	compareGolden(t, c.name+"."+c.ext, rec.Body.Bytes())
	compareGolden(t, c.name+"."+c.ext+".head", goldenHead(t, c, body, header, rec))
}

// goldenHead is the readable record of the exchange: the request line and
// headers, then the status and every response header, sorted.
func goldenHead(t *testing.T, c goldenCase, body []byte, reqHeader map[string]string, rec *httptest.ResponseRecorder) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "%s %s\n", c.method, c.target)
	if body != nil {
		reqHeader["Content-Type"] = "application/json"
	}
	keys := make([]string, 0, len(reqHeader))
	for k, v := range reqHeader {
		if v != "" {
			keys = append(keys, k)
		}
	}
	sort.Strings(keys)
	for _, k := range keys {
		fmt.Fprintf(&b, "%s: %s\n", k, reqHeader[k])
	}
	if c.body != "" {
		fmt.Fprintf(&b, "(body: requests/%s.json)\n", c.body)
	}
	fmt.Fprintf(&b, "\nHTTP %d\n", rec.Code)
	h := rec.Header()
	keys = keys[:0]
	for k := range h {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		for _, v := range h[k] {
			fmt.Fprintf(&b, "%s: %s\n", k, maskHeader(t, c, k, v))
		}
	}
	fmt.Fprintf(&b, "(body: %s.%s, %d bytes)\n", c.name, c.ext, rec.Body.Len())
	return b.Bytes()
}

// maskHeader replaces a value named in goldenMasks by its placeholder when
// the case allows it and the value has the expected shape.
func maskHeader(t *testing.T, c goldenCase, key, value string) string {
	for _, m := range goldenMasks {
		if !c.noID || http.CanonicalHeaderKey(key) != http.CanonicalHeaderKey(m.header) {
			continue
		}
		if !m.pattern.MatchString(value) {
			t.Errorf("%s: %s %q does not match %s", c.name, key, value, m.pattern)
			return value
		}
		return m.placeholder
	}
	return value
}

// compareGolden compares got with the golden file name (under goldenDir), or
// rewrites the file with -update.
func compareGolden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *updateGolden {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Errorf("%s: %v (create it with: go test ./api -run Golden -update)", path, err)
		return
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from the response: %s\n(if the change is intended, regenerate with go test ./api -run Golden -update and say so in the commit)",
			path, firstDifference(want, got))
	}
}

// firstDifference describes where got first departs from want: byte offset,
// line and column, and the two lines (shortened) around it.
func firstDifference(want, got []byte) string {
	n := min(len(want), len(got))
	i := 0
	for i < n && want[i] == got[i] {
		i++
	}
	line := 1 + bytes.Count(want[:i], []byte("\n"))
	start := bytes.LastIndexByte(want[:i], '\n') + 1
	lineOf := func(b []byte) string {
		end := bytes.IndexByte(b[start:], '\n')
		if end < 0 {
			end = len(b) - start
		}
		s := b[start : start+end]
		col := i - start
		lo, hi := max(0, col-80), min(len(s), col+80)
		return fmt.Sprintf("%q", s[lo:hi])
	}
	return fmt.Sprintf("first difference at byte %d (line %d, column %d); lengths want %d, got %d\n  want: %s\n  got:  %s",
		i, line, i-start+1, len(want), len(got), lineOf(want), lineOf(got))
}

// checkStaleGolden reports (or with -update removes) files under goldenDir
// that no case writes, so that a renamed case leaves nothing behind.
func checkStaleGolden(t *testing.T, want map[string]bool) {
	err := filepath.WalkDir(goldenDir, func(path string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		rel, err := filepath.Rel(goldenDir, path)
		if err != nil || want[rel] {
			return err
		}
		if *updateGolden {
			return os.Remove(path)
		}
		t.Errorf("%s: no golden case writes this file (remove it, or run go test ./api -run Golden -update)", path)
		return nil
	})
	if err != nil {
		t.Error(err)
	}
}

// goldenPlatformFile records the floating-point fingerprint of the machine
// and build that wrote the golden files.
const goldenPlatformFile = "platform.txt"

// goldenFingerprint digests how this build on this CPU rounds operations
// whose last bit depends on the platform, so the golden numbers are compared
// only where they can be reproduced: math.Exp (on amd64 its assembly takes a
// fused multiply-add path on CPUs with AVX and FMA, another path without
// them), math.Log, and x*y + z, which the compiler fuses into one FMA on
// arm64 and other GOARCHes and on amd64 with GOAMD64=v3 or later.
func goldenFingerprint() string {
	h := sha256.New()
	var b [8]byte
	put := func(v float64) {
		binary.LittleEndian.PutUint64(b[:], math.Float64bits(v))
		h.Write(b[:])
	}
	for i := 1; i <= 2000; i++ {
		x := float64(i) * 0.0173
		put(math.Exp(-x))
		put(math.Log(x))
		put(x*(x+1/3.0) + 1/x)
	}
	return runtime.GOARCH + "-" + hex.EncodeToString(h.Sum(nil))[:16]
}

// goldenPlatformMatches compares the fingerprint with platform.txt (or
// writes it with -update). On a platform that rounds differently the golden
// numbers cannot match to the last digit, so the test is skipped, saying why.
func goldenPlatformMatches(t *testing.T) bool {
	fp := goldenFingerprint()
	path := filepath.Join(goldenDir, goldenPlatformFile)
	if *updateGolden {
		txt := fmt.Sprintf("# Floating-point fingerprint of the machine and build that wrote the golden files\n"+
			"# (goldenFingerprint in api/golden_test.go); written by %s %s/%s.\n%s\n", runtime.Version(), runtime.GOOS, runtime.GOARCH, fp)
		if err := os.MkdirAll(goldenDir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(txt), 0o644); err != nil {
			t.Fatal(err)
		}
		return true
	}
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%s: %v (create the golden files with: go test ./api -run Golden -update)", path, err)
	}
	lines := strings.Split(strings.TrimSpace(string(raw)), "\n")
	if want := lines[len(lines)-1]; want != fp {
		t.Skipf("golden files not comparable here: they were written where the floating-point fingerprint is %s, this build on this CPU gives %s "+
			"(another GOARCH, GOAMD64=v3 or later, or an amd64 CPU without AVX and FMA, changes the last digit of math.Exp and of fused x*y+z)", want, fp)
		return false
	}
	return true
}

// goldenColumn is the demo as a 1D column (no width or depth) with a flux
// inlet, checked by the numeric method: the cheap numeric run of the metrics
// test, with two times.
func goldenColumn(t testing.TB) map[string]any {
	m := demoMap(t)
	m["methods"] = []any{"exact", "numeric"}
	m["times"] = []any{365, 1825}
	m["receptors"] = m["receptors"].([]any)[:3]
	set(m, "source.width", deleteMarker)
	set(m, "source.depth", deleteMarker)
	set(m, "source.inlet", "flux")
	return m
}

// goldenSpill is the demo as an instantaneous release of 2 kg at 1 m depth
// (invented), with the default methods.
func goldenSpill(t testing.TB) map[string]any {
	m := demoMap(t)
	set(m, "source.concentration", deleteMarker)
	set(m, "source.width", deleteMarker)
	set(m, "source.depth", deleteMarker)
	set(m, "source.mass", 2)
	set(m, "source.release_depth", 1)
	m["methods"] = []any{"exact", "domenico"}
	return m
}

// goldenNumeric is the demo's first well with the 3D numeric cross-check
// at one time. The release lasts 3000 d, so the steady state is zero and the
// numeric method needs no steady solve (that solve alone takes about 3 s
// under -race; the 1D column case covers a numeric steady state): the case
// takes about half a second under -race.
func goldenNumeric(t testing.TB) map[string]any {
	m := demoMap(t)
	m["receptors"] = m["receptors"].([]any)[:1]
	set(m, "source.duration", 3000)
	m["times"] = []any{365}
	m["methods"] = []any{"exact", "domenico", "numeric"}
	return m
}

// goldenSection is a vertical section of the demo along the centreline at
// 3650 d with two explicit levels.
func goldenSection(t testing.TB) map[string]any {
	return mapRequest(t, map[string]any{"view": "section", "time": 3650, "levels": []any{0.01, 1}, "cells": 600})
}

// goldenBadFields breaks several fields the OpenAPI schema checks.
func goldenBadFields(t testing.TB) map[string]any {
	m := demoMap(t)
	set(m, "aquifer.effective_porosity", 1.5)
	set(m, "aquifer.hydraulic_conductivity", -8.6)
	set(m, "contaminant.half_life", 0)
	set(m, "receptors.1.z", -1)
	set(m, "methods", []any{"magic"})
	set(m, "units.length", "yards")
	set(m, "aquifer.seepage_velocty", 0.3)
	return m
}

// goldenBadScenario passes the schema but not the scenario's own rules.
func goldenBadScenario(t testing.TB) map[string]any {
	m := demoMap(t)
	set(m, "receptors.2.screen_top", 9)
	set(m, "source.mass", 2)
	set(m, "source.duration", 100)
	return m
}

// goldenImperial is an invented scenario in ft, yr and ug/L: a chlorinated
// solvent with a source of limited duration and depletion, flow toward
// azimuth 215 degrees, a screened well, a deep point, a receptor to the side
// and one upgradient, retardation from sorption and decay of the dissolved
// phase. INVENTED numbers, for the golden test only.
const goldenImperial = `{
  "description": "INVENTED golden-test scenario in feet, years and micrograms per litre.",
  "units": {"length": "ft", "time": "yr", "concentration": "ug/L"},
  "aquifer": {
    "hydraulic_conductivity": 12000,
    "hydraulic_gradient": 0.002,
    "effective_porosity": 0.3,
    "bulk_density": 1.7,
    "organic_carbon_fraction": 0.002,
    "dispersivity": {"longitudinal": 40, "transverse": 4, "vertical": 0.4}
  },
  "contaminant": {"name": "TCE", "half_life": 5, "decay_applies_to": "dissolved", "screening_level": 5},
  "source": {"x": 5000, "y": 8000, "flow_azimuth_deg": 215, "concentration": 800, "width": 60, "depth": 12,
             "start": 1, "duration": 20, "half_life": 15},
  "receptors": [
    {"id": "MW-A", "x": 4885, "y": 7836, "z": 5},
    {"id": "MW-B screened", "x": 4656, "y": 7509, "screen_top": 5, "screen_bottom": 25},
    {"id": "MW-C deep", "x": 4771, "y": 7672, "z": 40},
    {"id": "MW-D side", "x": 4730, "y": 7780, "z": 0},
    {"id": "MW-E upgradient", "x": 5060, "y": 8090, "z": 2}
  ],
  "times": [2, 5, 10, 25, 50],
  "methods": ["exact", "domenico"]
}
`

// The difference report names the first differing byte, its line and both lines.
func TestGoldenFirstDifference(t *testing.T) {
	got := firstDifference([]byte("a\nbcd\ne"), []byte("a\nbxd\ne"))
	for _, want := range []string{"byte 3", "line 2", "column 2", `"bcd"`, `"bxd"`} {
		if !strings.Contains(got, want) {
			t.Errorf("%q lacks %q", got, want)
		}
	}
	if got := firstDifference([]byte("abc"), []byte("abc\n")); !strings.Contains(got, "byte 3") || !strings.Contains(got, "want 3, got 4") {
		t.Errorf("longer got: %q", got)
	}
}
