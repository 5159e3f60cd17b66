package api

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// csvLayer is a CSV layer of n grid receptors (the first row is row 2) with
// row bad's line replaced by badLine (bad < 2: none).
func csvLayer(n, bad int, badLine string) string {
	var b strings.Builder
	b.WriteString("id,x,y,z\n")
	for i := range n {
		if i+2 == bad {
			b.WriteString(badLine + "\n")
			continue
		}
		fmt.Fprintf(&b, "C-%d,%g,%g,%g\n", i, 1230+float64(i%37)*17.5, 850-float64(i%11)*6-float64(i%37)*6, float64(i%3))
	}
	return b.String()
}

// streamFailCase is a layer whose receptor 300 (CSV row 302) is bad: the
// stream answers 200 with the 300 receptors before it, then an error
// record naming it.
type streamFailCase struct {
	name   string
	body   func(t *testing.T) ([]byte, map[string]string)
	status int
	field  string
}

var streamFails = []streamFailCase{
	{"CSV bad number", func(t *testing.T) ([]byte, map[string]string) {
		return formBody(t, demoMap(t), csvLayer(400, 302, "C-300,1300,8O0,1"), "text/csv")
	}, 400, "receptors row 302 column y"},
	{"CSV negative depth", func(t *testing.T) ([]byte, map[string]string) {
		return formBody(t, demoMap(t), csvLayer(400, 302, "C-300,1300,800,-1"), "text/csv")
	}, 422, "receptors row 302 column z"},
	{"CSV repeated id", func(t *testing.T) ([]byte, map[string]string) {
		return formBody(t, demoMap(t), csvLayer(400, 302, "C-7,1300,800,1"), "text/csv")
	}, 422, "receptors row 302 column id"},
	{"array wrong type", func(t *testing.T) ([]byte, map[string]string) {
		m := gridScenario(t, 400)
		m["receptors"].([]any)[300].(map[string]any)["x"] = "east"
		return streamBody(t, m), nil
	}, 400, "receptors[300].x"},
	{"array unknown member", func(t *testing.T) ([]byte, map[string]string) {
		m := gridScenario(t, 400)
		m["receptors"].([]any)[300].(map[string]any)["depth"] = 3
		return streamBody(t, m), nil
	}, 422, "receptors[300].depth"},
	{"GeoJSON polygon", func(t *testing.T) ([]byte, map[string]string) {
		m := demoMap(t)
		var fs []any
		for i, r := range gridReceptors(400) {
			rm := r.(map[string]any)
			f := point(rm["x"].(float64), rm["y"].(float64), map[string]any{"id": rm["id"], "z": rm["z"]})
			if i == 300 {
				f["geometry"] = map[string]any{"type": "Polygon", "coordinates": []any{}}
			}
			fs = append(fs, f)
		}
		m["receptors"] = map[string]any{"type": "FeatureCollection", "features": fs}
		return streamBody(t, m), nil
	}, 422, "receptors.features[300].geometry.type"},
}

// The first bad receptor after the first part ends a stream in band: the
// receptors before it, then an error record (NDJSON) or member (GeoJSON)
// naming its field or row with its status.
func TestStreamNamesFirstBadRow(t *testing.T) {
	ts := newTestServer(t, Config{})
	for _, tc := range streamFails {
		t.Run(tc.name, func(t *testing.T) {
			body, hdr := tc.body(t)
			rec := ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", body, hdr)
			if rec.Code != 200 {
				t.Fatalf("%d %.300s", rec.Code, rec.Body.String())
			}
			recs := ndjsonRecords(t, rec.Body.Bytes())
			last := recs[len(recs)-1]
			if len(recs) != 302 || recordKind(last) != "error" {
				t.Fatalf("%d records, last %q; want header, 300 receptors, error", len(recs), recordKind(last))
			}
			checkInBand(t, last["error"], tc.status, tc.field)
			// Not checked against the document: a stream that fails is cut
			// off (in a real connection), not a whole answer.
			req := httptest.NewRequest(http.MethodPost, "/v1/screenings?format=geojson&stream=true", bytes.NewReader(body))
			req.Header.Set("Content-Type", "application/json")
			for k, v := range hdr {
				req.Header.Set(k, v)
			}
			rec = httptest.NewRecorder()
			ts.e.ServeHTTP(rec, req)
			var fc struct {
				Features []json.RawMessage `json:"features"`
				Error    json.RawMessage   `json:"error"`
			}
			if err := json.Unmarshal(rec.Body.Bytes(), &fc); err != nil {
				t.Fatalf("the GeoJSON of a failed stream is not JSON: %v", err)
			}
			if len(fc.Features) != 300 {
				t.Errorf("GeoJSON: %d features before the error", len(fc.Features))
			}
			checkInBand(t, fc.Error, tc.status, tc.field)
		})
	}
}

// checkInBand checks an in-band problem.
func checkInBand(t *testing.T, raw json.RawMessage, status int, field string) {
	t.Helper()
	var p Problem
	if err := json.Unmarshal(raw, &p); err != nil {
		t.Fatalf("in-band error %s: %v", raw, err)
	}
	if p.Status != status || !hasField(p, field) {
		t.Errorf("in-band error %d %+v; want %d naming %q", p.Status, p.Errors, status, field)
	}
}

// The workload limit of the streaming path is StreamWorkFactor times the
// configured one, counted receptor by receptor: the receptors within it
// are answered, then a 413 in band names receptors. The receptor limit
// (1,000,000) is checked on the same path.
func TestStreamLimits(t *testing.T) {
	// 1 time and 1 method: 2 evaluations a receptor; 10 x 100 = 1,000
	// evaluations, 500 receptors.
	ts := newTestServer(t, Config{MaxEvaluations: 10})
	m := gridScenario(t, 600)
	m["times"], m["methods"] = []any{3650}, []any{"domenico"}
	rec := ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", streamBody(t, m), nil)
	recs := ndjsonRecords(t, rec.Body.Bytes())
	if rec.Code != 200 || len(recs) != 502 || recordKind(recs[501]) != "error" {
		t.Fatalf("%d, %d records; want 500 receptors then an error", rec.Code, len(recs))
	}
	checkInBand(t, recs[501]["error"], http.StatusRequestEntityTooLarge, "receptors")
	// Over the workload in the first part (50 receptors): a 413 answer.
	m = gridScenario(t, 60)
	m["times"], m["methods"] = []any{3650}, []any{"domenico"}
	small := newTestServer(t, Config{MaxEvaluations: 1})
	p := problemOf(t, small.call(t, http.MethodPost, "/v1/screenings?format=ndjson", streamBody(t, m), nil), http.StatusRequestEntityTooLarge)
	if !hasField(p, "receptors") {
		t.Errorf("413 %+v", p)
	}
	st := &stream{}
	if p := st.checkCounts(MaxStreamReceptors-1, 1, 1<<40); p != nil {
		t.Errorf("receptor %d refused: %+v", MaxStreamReceptors-1, p)
	}
	if p := st.checkCounts(MaxStreamReceptors, 1, 1<<40); p == nil || p.Status != http.StatusRequestEntityTooLarge || !hasField(*p, "receptors") {
		t.Errorf("receptor %d: %+v", MaxStreamReceptors, p)
	}
	// numeric is not run on a layer.
	m["methods"] = []any{"exact", "numeric"}
	p = problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", streamBody(t, m), nil), http.StatusUnprocessableEntity)
	if !hasField(p, "methods[1]") {
		t.Errorf("numeric streamed: %+v", p)
	}
}

// The deadline of a streamed request grows when extended and ends the
// context as context.WithTimeout's does once it passes.
func TestDeadlineCtxExtends(t *testing.T) {
	dc := newDeadlineCtx(context.Background(), 50*time.Millisecond)
	defer dc.stop()
	first, _ := dc.Deadline()
	dc.extend(time.Hour)
	if at, _ := dc.Deadline(); at.Sub(first) != time.Hour {
		t.Errorf("extended by %v", at.Sub(first))
	}
	time.Sleep(100 * time.Millisecond)
	if dc.Err() != nil {
		t.Fatalf("ended at its first deadline: %v", dc.Err())
	}
	short := newDeadlineCtx(context.Background(), time.Millisecond)
	defer short.stop()
	<-short.Done()
	if short.Err() != context.DeadlineExceeded {
		t.Errorf("err %v", short.Err())
	}
	short.extend(time.Hour) // nothing once passed
	if short.Err() != context.DeadlineExceeded {
		t.Errorf("revived: %v", short.Err())
	}
}

// A client that disconnects stops the work: the handler returns (after
// every goroutine of the stream has ended) soon after, having screened a
// small part of the layer, and nothing is screened after it returns.
func TestStreamClientDisconnectStopsWork(t *testing.T) {
	const n = 200_000
	h, err := New(Config{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	var st atomic.Pointer[stream]
	hook := func(s *stream) { st.Store(s) }
	testHookStream.Store(&hook)
	t.Cleanup(func() { testHookStream.Store(nil) })
	done := make(chan struct{})
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h.ServeHTTP(w, r)
		close(done)
	}))
	t.Cleanup(srv.Close)

	pr, pw := io.Pipe()
	var sent atomic.Int64
	go func() { // the layer, written as the server reads it
		bw := bufio.NewWriter(pw)
		m := demoMap(t)
		delete(m, "receptors")
		b := mustJSON(t, m)
		bw.Write(b[:len(b)-1])
		bw.WriteString(`,"receptors":[`)
		for i := range n {
			if i > 0 {
				bw.WriteByte(',')
			}
			fmt.Fprintf(bw, `{"id":"D-%d","x":%g,"y":%g,"z":1}`, i, 1260+float64(i%500), 800-float64(i%300)*0.5)
			if bw.Buffered() > 32<<10 {
				if bw.Flush() != nil {
					return
				}
			}
			sent.Store(int64(i))
		}
		bw.WriteString("]}")
		bw.Flush()
		pw.Close()
	}()
	ctx, cancel := context.WithCancel(context.Background())
	req, _ := http.NewRequestWithContext(ctx, http.MethodPost, srv.URL+"/v1/screenings?format=ndjson", pr)
	req.Header.Set("Content-Type", "application/json")
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	lines := bufio.NewScanner(resp.Body)
	for k := 0; k < 3 && lines.Scan(); k++ {
	}
	if resp.StatusCode != 200 || lines.Err() != nil {
		t.Fatalf("%d %v", resp.StatusCode, lines.Err())
	}
	cancel()
	resp.Body.Close()
	select {
	case <-done:
	case <-time.After(20 * time.Second):
		t.Fatal("the stream did not end within 20 s of the client leaving")
	}
	s := st.Load()
	if s == nil {
		t.Fatal("no stream started")
	}
	screened := s.screened.Load()
	if screened >= n/2 {
		t.Errorf("%d of %d receptors screened after the client left", screened, n)
	}
	time.Sleep(50 * time.Millisecond)
	if s.screened.Load() != screened {
		t.Error("screening went on after the handler returned")
	}
	t.Logf("screened %d of %d receptors (%d sent) before the client left", screened, n, sent.Load())
}
