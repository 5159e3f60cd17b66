package api

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"net/http"
	"reflect"
	"slices"
	"strings"
	"testing"

	"downgradient/plume"
)

// gridReceptors are n invented receptors around the demo source (site
// 1250, 830, flow towards azimuth 110 degrees): along and across the
// flow, upgradient and inside the source zone, points and screens, so that
// every status and most receptor caveats occur.
func gridReceptors(n int) []any {
	rs := make([]any, n)
	for i := range rs {
		r := map[string]any{"id": fmt.Sprintf("G-%d", i),
			"x": 1230 + float64(i%37)*17.5, "y": 850 - float64(i%11)*6 - float64(i%37)*6}
		switch i % 5 {
		case 0:
			r["screen_top"], r["screen_bottom"] = 1.0, 2+float64(i%7)
		case 3:
			r["z"] = float64(i%13) * 0.7
		default:
			r["z"] = float64(i % 3)
		}
		rs[i] = r
	}
	return rs
}

// gridScenario is the demo scenario with n grid receptors.
func gridScenario(t testing.TB, n int) map[string]any {
	t.Helper()
	m := demoMap(t)
	m["receptors"] = gridReceptors(n)
	return m
}

// ndjsonRecords splits a streamed NDJSON answer into its records.
func ndjsonRecords(t testing.TB, body []byte) []map[string]json.RawMessage {
	t.Helper()
	var out []map[string]json.RawMessage
	sc := bufio.NewScanner(bytes.NewReader(body))
	sc.Buffer(make([]byte, 1<<20), 16<<20)
	for sc.Scan() {
		var rec map[string]json.RawMessage
		if err := json.Unmarshal(sc.Bytes(), &rec); err != nil {
			t.Fatalf("line %d is not one JSON object: %v: %.200s", len(out)+1, err, sc.Text())
		}
		out = append(out, rec)
	}
	return out
}

// recordKind is a record's "record" member.
func recordKind(rec map[string]json.RawMessage) string { return jsonString(rec["record"]) }

// streamCase is a scenario screened both ways in TestStreamEqualsJSON.
type streamCase struct {
	name string
	body func(t *testing.T) map[string]any
	// codes are caveat codes the case must give for several receptors
	// (caveats that Model.Screen lists apart from the receptors' own).
	codes []string
}

// The streamed answer is the answer that is not streamed, value for value:
// every receptor's members (compared as JSON text, whose shortest
// round-trip numbers make equal text equal bits), the summary, the
// caveats (the result-wide ones in the last record, each receptor's in its
// line) and engine.input_sha256; CSV rows equal but for their empty hash
// cell; GeoJSON features equal.
func TestStreamEqualsJSON(t *testing.T) {
	ts := newTestServer(t, Config{})
	cases := []streamCase{
		{"demo grid, 3 parts and a bit", func(t *testing.T) map[string]any { return gridScenario(t, 3*streamChunk+17) }, nil},
		{"a source of finite mass", func(t *testing.T) map[string]any {
			m := readDemo(t, "source-mass.json")
			m["methods"] = []any{"exact", "domenico"}
			rs := append(m["receptors"].([]any), gridReceptors(8)...)
			for d := 650.0; d < 1200; d += 100 { // far down the flow (azimuth 110 degrees)
				rs = append(rs, map[string]any{"id": fmt.Sprintf("F-%g", d), "x": 1250 + 0.9397*d, "y": 830 - 0.3420*d, "z": 1})
			}
			m["receptors"] = rs
			return m
		}, []string{plume.CaveatAllowableNotReached}},
		{"two sources and a transect", func(t *testing.T) map[string]any {
			m := readDemo(t, "sources-and-brook.json")
			m["methods"] = []any{"exact", "domenico"}
			return m
		}, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m := tc.body(t)
			body := streamBody(t, m)
			plain := ts.call(t, http.MethodPost, "/v1/screenings", body, nil)
			if plain.Code != 200 {
				t.Fatalf("not streamed: %d %.400s", plain.Code, plain.Body.String())
			}
			var want plume.Result
			if err := json.Unmarshal(plain.Body.Bytes(), &want); err != nil {
				t.Fatal(err)
			}
			rec := ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", body, nil)
			if rec.Code != 200 || rec.Header().Get("Content-Type") != mimeNDJSON {
				t.Fatalf("streamed: %d %s %.400s", rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
			}
			for _, code := range tc.codes {
				n := 0
				for _, c := range want.Caveats {
					if c.Code == code {
						n++
					}
				}
				if n < 2 {
					t.Fatalf("%d caveats %s, want several", n, code)
				}
			}
			compareNDJSON(t, rec.Body.Bytes(), &want)
			if got := rec.Header().Get(headerInputHash); got != want.Engine.InputSHA256 {
				t.Errorf("trailer %s = %q, want %q", headerInputHash, got, want.Engine.InputSHA256)
			}
			compareStreamCSV(t, ts, body)
			compareStreamGeoJSON(t, ts, body)
		})
	}
}

// compareNDJSON checks a streamed NDJSON answer against the JSON result.
func compareNDJSON(t *testing.T, body []byte, want *plume.Result) {
	t.Helper()
	recs := ndjsonRecords(t, body)
	if len(recs) != len(want.Receptors)+2 || recordKind(recs[0]) != "header" || recordKind(recs[len(recs)-1]) != "end" {
		t.Fatalf("%d records (first %q, last %q), want header, %d receptors, end", len(recs), recordKind(recs[0]), recordKind(recs[len(recs)-1]), len(want.Receptors))
	}
	sameJSON(t, "units", recs[0]["units"], want.Units)
	sameJSON(t, "derived", recs[0]["derived"], want.Derived)
	var own []plume.Caveat
	for i, rr := range want.Receptors {
		line := recs[i+1]
		if recordKind(line) != "receptor" || string(line["index"]) != fmt.Sprint(i) {
			t.Fatalf("record %d: %s index %s", i+1, line["record"], line["index"])
		}
		var wantMembers map[string]json.RawMessage
		if err := json.Unmarshal(mustJSON(t, rr), &wantMembers); err != nil {
			t.Fatal(err)
		}
		for k, v := range wantMembers {
			if !bytes.Equal(v, line[k]) {
				t.Fatalf("receptor %d (%s) member %s: streamed %.200s, not streamed %.200s", i, rr.ID, k, line[k], v)
			}
		}
		if got, wantCodes := jsonString(line["caveat_codes"]), strings.Join(want.CaveatCodes(rr.ID), ";"); got != wantCodes {
			t.Errorf("receptor %s caveat_codes %q, want %q", rr.ID, got, wantCodes)
		}
		var mine []plume.Caveat
		if err := json.Unmarshal(line["caveats"], &mine); err != nil {
			t.Fatal(err)
		}
		own = append(own, mine...)
	}
	end := recs[len(recs)-1]
	var engine plume.Engine
	var summary plume.Summary
	var tail []plume.Caveat
	for _, u := range []struct {
		k string
		v any
	}{{"engine", &engine}, {"summary", &summary}, {"caveats", &tail}} {
		if err := json.Unmarshal(end[u.k], u.v); err != nil {
			t.Fatalf("end record %s: %v", u.k, err)
		}
	}
	if engine != want.Engine {
		t.Errorf("engine %+v, want %+v", engine, want.Engine)
	}
	if !reflect.DeepEqual(summary, want.Summary) {
		t.Errorf("summary %+v, want %+v", summary, want.Summary)
	}
	sameJSON(t, "transects", end["transects"], want.Transects)
	got := append(slices.Clone(tail), own...)
	if !sameCaveats(got, want.Caveats) {
		t.Errorf("caveats: streamed %d (%d result-wide), not streamed %d", len(got), len(tail), len(want.Caveats))
	}
}

// sameJSON compares a streamed member with the value the JSON result has.
func sameJSON(t *testing.T, what string, got json.RawMessage, want any) {
	t.Helper()
	w := mustJSON(t, want)
	if string(w) == "null" && got == nil {
		return
	}
	if !bytes.Equal(bytes.TrimSpace(got), w) {
		t.Errorf("%s: streamed %.300s, not streamed %.300s", what, got, w)
	}
}

// sameCaveats compares two lists of caveats as multisets.
func sameCaveats(a, b []plume.Caveat) bool {
	key := func(c plume.Caveat) string { return string(mustJSONNoT(c)) }
	count := map[string]int{}
	for _, c := range a {
		count[key(c)]++
	}
	for _, c := range b {
		count[key(c)]--
	}
	for _, n := range count {
		if n != 0 {
			return false
		}
	}
	return len(a) == len(b)
}

func mustJSONNoT(v any) []byte {
	b, err := json.Marshal(v)
	if err != nil {
		panic(err)
	}
	return b
}

// compareStreamCSV checks the streamed CSV against the CSV not streamed:
// the same rows, each with its input_sha256 cell empty.
func compareStreamCSV(t *testing.T, ts *testServer, body []byte) {
	t.Helper()
	read := func(target string) [][]string {
		rec := ts.call(t, http.MethodPost, target, body, nil)
		if rec.Code != 200 {
			t.Fatalf("%s: %d %.300s", target, rec.Code, rec.Body.String())
		}
		rows, err := csv.NewReader(rec.Body).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		return rows
	}
	want, got := read("/v1/screenings?format=csv"), read("/v1/screenings?format=csv&stream=true")
	if len(got) != len(want) || len(want) < 2 {
		t.Fatalf("streamed CSV %d rows, not streamed %d", len(got), len(want))
	}
	hash := slices.Index(want[0], "input_sha256")
	for i := range want {
		if i > 0 {
			if got[i][hash] != "" {
				t.Fatalf("row %d: streamed input_sha256 %q, want empty", i, got[i][hash])
			}
			want[i][hash] = ""
		}
		if !slices.Equal(got[i], want[i]) {
			t.Fatalf("row %d: streamed %v\nnot streamed %v", i, got[i], want[i])
		}
	}
}

// compareStreamGeoJSON checks the streamed GeoJSON against the GeoJSON not
// streamed: type and features first, the same features.
func compareStreamGeoJSON(t *testing.T, ts *testServer, body []byte) {
	t.Helper()
	read := func(target string) (map[string]json.RawMessage, []byte) {
		rec := ts.call(t, http.MethodPost, target, body, nil)
		if rec.Code != 200 || rec.Header().Get("Content-Type") != mimeGeoJSON {
			t.Fatalf("%s: %d %s %.300s", target, rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
		}
		var fc map[string]json.RawMessage
		if err := json.Unmarshal(rec.Body.Bytes(), &fc); err != nil {
			t.Fatalf("%s: %v", target, err)
		}
		return fc, rec.Body.Bytes()
	}
	want, _ := read("/v1/screenings?format=geojson")
	got, raw := read("/v1/screenings?format=geojson&stream=true")
	if !bytes.HasPrefix(raw, []byte(`{"type":"FeatureCollection","features":[`)) {
		t.Errorf("streamed GeoJSON starts %.60s", raw)
	}
	var wf, gf []json.RawMessage
	if json.Unmarshal(want["features"], &wf) != nil || json.Unmarshal(got["features"], &gf) != nil || len(wf) != len(gf) {
		t.Fatalf("features: streamed %d, not streamed %d", len(gf), len(wf))
	}
	for i := range wf {
		if !bytes.Equal(bytes.TrimSpace(gf[i]), wf[i]) {
			t.Fatalf("feature %d: streamed %.300s\nnot streamed %.300s", i, gf[i], wf[i])
		}
	}
	for _, k := range []string{"units", "derived", "engine", "coordinate_frame"} {
		if !bytes.Equal(got[k], want[k]) {
			t.Errorf("%s: streamed %.200s, not streamed %.200s", k, got[k], want[k])
		}
	}
}

// streamBody encodes a scenario with its receptors as its last member, as
// the streaming path reads it (json.Marshal writes a map's keys in order).
func streamBody(t testing.TB, m map[string]any) []byte {
	t.Helper()
	rest := map[string]any{}
	for k, v := range m {
		if k != "receptors" {
			rest[k] = v
		}
	}
	b := mustJSON(t, rest)
	return append(append(b[:len(b)-1], `,"receptors":`...), append(mustJSON(t, m["receptors"]), '}')...)
}

// A streamed scenario whose members come in alphabetical order (receptors
// before source, times and units) is refused with the reason; an empty
// body is malformed.
func TestStreamReceptorsLast(t *testing.T) {
	ts := newTestServer(t, Config{})
	problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", []byte{}, nil), http.StatusBadRequest)
	rec := ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", mustJSON(t, demoMap(t)), nil)
	p := problemOf(t, rec, http.StatusUnprocessableEntity)
	if !hasField(p, "source") || !strings.Contains(p.Detail, "receptors must be its last member") {
		t.Errorf("problem %+v", p)
	}
}

// How a request picks the streaming path and its format.
func TestStreamNegotiation(t *testing.T) {
	ts := newTestServer(t, Config{})
	body := streamBody(t, demoMap(t))
	cases := []struct {
		target, accept string
		status         int
		ctype, field   string
	}{
		{"/v1/screenings", mimeNDJSON, 200, mimeNDJSON, ""},
		{"/v1/screenings?stream=true", "", 200, mimeNDJSON, ""},
		{"/v1/screenings?stream=true", "text/csv", 200, "text/csv; charset=utf-8; header=present", ""},
		{"/v1/screenings?stream=true", mimeGeoJSON, 200, mimeGeoJSON, ""},
		{"/v1/screenings?stream=1&format=geojson", "text/csv", 200, mimeGeoJSON, ""},
		{"/v1/screenings?stream=true&format=json", "", 422, "", "format"},
		{"/v1/screenings?stream=false&format=ndjson", "", 422, "", "stream"},
		{"/v1/screenings?stream=true", "image/png", 406, "", "Accept"},
		{"/v1/screenings", "application/json", 200, "application/json", ""},
	}
	for _, tc := range cases {
		rec := ts.call(t, http.MethodPost, tc.target, body, map[string]string{"Accept": tc.accept})
		if tc.status != 200 {
			if p := problemOf(t, rec, tc.status); !hasField(p, tc.field) {
				t.Errorf("%s Accept %q: %+v, want %q named", tc.target, tc.accept, p.Errors, tc.field)
			}
			continue
		}
		if rec.Code != 200 || rec.Header().Get("Content-Type") != tc.ctype {
			t.Errorf("%s Accept %q: %d %s, want %s", tc.target, tc.accept, rec.Code, rec.Header().Get("Content-Type"), tc.ctype)
		}
	}
}
