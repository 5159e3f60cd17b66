package api

import (
	"bufio"
	"bytes"
	"encoding/json"
	"net/http"
	"os"
	"testing"
	"time"
)

// fuzzLayerTargets are the ways a fuzzed layer is sent: as the receptors
// part of a multipart body (CSV, or GeoJSON by its first character) or as
// the scenario's receptors member, each not streamed and streamed.
var fuzzLayerTargets = []struct {
	target    string
	multipart bool
}{
	{"/v1/screenings", true}, {"/v1/screenings?format=ndjson", true},
	{"/v1/screenings?format=geojson&stream=true", true}, {"/v1/screenings?format=csv&stream=true", true},
	{"/v1/screenings", false}, {"/v1/screenings?format=ndjson", false},
}

// FuzzLayers sends fuzzed receptor layers: never a 500, an undocumented
// status or a broken problem; a streamed NDJSON answer is one JSON object
// per line, ending with an end record or an in-band error of a
// documented 4xx or 503 status.
func FuzzLayers(f *testing.F) {
	geo, err := os.ReadFile("../testdata/demo/wells-layer.geojson")
	if err != nil {
		f.Fatal(err)
	}
	seeds := [][]byte{[]byte(demoCSV), geo, []byte("id;x;y\nA;1300,5;800\n"), []byte("id,x,y\nA,1300,800\nA,1310,790\n"),
		[]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","geometry":{"type":"LineString","coordinates":[[0,0],[1,1]]},"properties":{"id":1}}]}`),
		[]byte(`{"features":[{"type":"Feature","geometry":{"type":"Point","coordinates":[1300,800]},"properties":{"id":"A","z":1e999}}],"type":"FeatureCollection"}`),
		[]byte("\ufeffID,X,Y,Z\nA,1300,800,1\n\"B,1310,790,1\n")}
	for _, s := range seeds {
		for i := range uint8(len(fuzzLayerTargets)) {
			f.Add(s, i)
		}
	}
	scen := demoMap(f)
	f.Fuzz(func(t *testing.T, layer []byte, mode uint8) {
		ts := fuzzServer(t)
		tg := fuzzLayerTargets[int(mode)%len(fuzzLayerTargets)]
		var body []byte
		var hdr map[string]string
		if tg.multipart {
			body, hdr = formBody(t, scen, string(layer), "")
		} else {
			if !json.Valid(layer) {
				return // the byte-level fuzzers cover malformed JSON bodies
			}
			m := clone(t, scen)
			m["receptors"] = json.RawMessage(layer)
			body = streamBody(t, m)
		}
		start := time.Now()
		rec := fuzzCall(t, ts, http.MethodPost, tg.target, body, hdr)
		if d := time.Since(start); d > 10*time.Second {
			t.Fatalf("POST %s took %v (the deadline is %v)", tg.target, d, fuzzConfig.RequestTimeout)
		}
		checkFuzzResponse(t, rec, "POST "+tg.target)
		if rec.Code == 200 && rec.Header().Get("Content-Type") == mimeNDJSON {
			checkFuzzNDJSON(t, rec.Body.Bytes())
		}
	})
}

// checkFuzzNDJSON checks a streamed NDJSON answer's shape and its end.
func checkFuzzNDJSON(t *testing.T, body []byte) {
	t.Helper()
	sc := bufio.NewScanner(bytes.NewReader(body))
	sc.Buffer(make([]byte, 1<<20), 16<<20)
	var last map[string]json.RawMessage
	for sc.Scan() {
		last = nil
		if err := json.Unmarshal(sc.Bytes(), &last); err != nil {
			t.Fatalf("a line is not a JSON object: %v: %.300s", err, sc.Text())
		}
	}
	switch recordKind(last) {
	case "end":
	case "error":
		var p Problem
		if err := json.Unmarshal(last["error"], &p); err != nil || !documentedStatus[p.Status] || p.Status == 200 || p.Detail == "" {
			t.Fatalf("in-band error %s", last["error"])
		}
	default:
		t.Fatalf("the stream ends with %.300s", body[max(0, len(body)-300):])
	}
}
