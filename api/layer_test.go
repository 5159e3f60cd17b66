package api

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"mime/multipart"
	"net/http"
	"net/textproto"
	"os"
	"strings"
	"testing"

	"downgradient/plume"
)

// formBody is a multipart/form-data body: a part scenario (the JSON
// scenario without receptors) and a part receptors holding text of the
// given Content-Type ("" for none). It returns the body and its header.
func formBody(t testing.TB, scen map[string]any, receptors, contentType string) ([]byte, map[string]string) {
	t.Helper()
	rest := map[string]any{}
	for k, v := range scen {
		if k != "receptors" {
			rest[k] = v
		}
	}
	var buf bytes.Buffer
	w := multipart.NewWriter(&buf)
	sp, err := w.CreateFormField("scenario")
	if err != nil {
		t.Fatal(err)
	}
	sp.Write(mustJSON(t, rest))
	h := textproto.MIMEHeader{"Content-Disposition": {`form-data; name="receptors"; filename="wells"`}}
	if contentType != "" {
		h.Set("Content-Type", contentType)
	}
	rp, err := w.CreatePart(h)
	if err != nil {
		t.Fatal(err)
	}
	rp.Write([]byte(receptors))
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes(), map[string]string{"Content-Type": w.FormDataContentType()}
}

// demoCSV is the demo's six wells as a CSV layer.
const demoCSV = `id,x,y,z,screen_top,screen_bottom
MW-1,1287.6,816.3,1,,
MW-2,1331.2,789.8,1.5,,
W-4 supply well,1449.4,763.8,,2,8
P-7 parcel corner,1585.7,729.1,0,,
S-1 creek bank,1813.8,624.8,0,,
MW-5 upgradient,1230.4,863.8,1,,
`

// utmLayer is the invented demo layer of testdata/demo: the scenario of
// site-utm.json with the wells of wells-layer.geojson (WGS 84).
func utmLayer(t testing.TB) (map[string]any, map[string]any) {
	t.Helper()
	scen := readDemo(t, "site-utm.json")
	b, err := os.ReadFile("../testdata/demo/wells-layer.geojson")
	if err != nil {
		t.Fatal(err)
	}
	var layer map[string]any
	if err := json.Unmarshal(b, &layer); err != nil {
		t.Fatal(err)
	}
	return scen, layer
}

// screenResult posts a body and decodes the JSON result.
func screenResult(t *testing.T, ts *testServer, target string, body []byte, hdr map[string]string) plume.Result {
	t.Helper()
	rec := ts.call(t, http.MethodPost, target, body, hdr)
	if rec.Code != 200 {
		t.Fatalf("%s: %d %.600s", target, rec.Code, rec.Body.String())
	}
	var res plume.Result
	if err := json.Unmarshal(rec.Body.Bytes(), &res); err != nil {
		t.Fatal(err)
	}
	return res
}

// A layer in gives the answer the same receptors give as an array: the
// demo's wells as CSV in a multipart body; the UTM demo's GeoJSON layer
// (ids from well_id, WGS 84 points) in the JSON body and as a multipart
// part; the same wells as lon/lat receptors. Values and input hash equal.
func TestLayersInEqualArrays(t *testing.T) {
	ts := newTestServer(t, Config{})
	// CSV against the demo's array.
	want := screenResult(t, ts, "/v1/screenings", demoBody(t), nil)
	body, hdr := formBody(t, demoMap(t), demoCSV, "text/csv")
	got := screenResult(t, ts, "/v1/screenings", body, hdr)
	sameResult(t, "multipart CSV", got, want)
	// The GeoJSON layer against lon/lat receptors.
	scen, layer := utmLayer(t)
	var arr []any
	for _, f := range layer["features"].([]any) {
		fm := f.(map[string]any)
		props, c := fm["properties"].(map[string]any), fm["geometry"].(map[string]any)["coordinates"].([]any)
		r := map[string]any{"id": props["well_id"], "lon": c[0], "lat": c[1]}
		for _, k := range []string{"z", "screen_top", "screen_bottom"} {
			if v, ok := props[k]; ok {
				r[k] = v
			}
		}
		arr = append(arr, r)
	}
	asArray := clone(t, scen)
	delete(asArray, "receptor_id_property")
	asArray["receptors"] = arr
	want = screenResult(t, ts, "/v1/screenings", mustJSON(t, asArray), nil)
	if len(want.Receptors) != 8 || want.Receptors[0].ID != "PW-01" {
		t.Fatalf("lon/lat array: %d receptors, first %q", len(want.Receptors), want.Receptors[0].ID)
	}
	inBody := clone(t, scen)
	inBody["receptors"] = layer
	sameResult(t, "GeoJSON in the body", screenResult(t, ts, "/v1/screenings", mustJSON(t, inBody), nil), want)
	body, hdr = formBody(t, scen, string(mustJSON(t, layer)), "application/geo+json")
	sameResult(t, "GeoJSON part", screenResult(t, ts, "/v1/screenings", body, hdr), want)
	// The same wells as a CSV of lon, lat (any order and case of columns).
	var lonlat strings.Builder
	lonlat.WriteString("Lat,Lon,well_id,screen_bottom,screen_top,z\n")
	for _, r := range arr {
		rm := r.(map[string]any)
		cell := func(k string) string {
			if v, ok := rm[k]; ok {
				return fmt.Sprint(v)
			}
			return ""
		}
		fmt.Fprintf(&lonlat, "%s,%s,%s,%s,%s,%s\n", cell("lat"), cell("lon"), cell("id"), cell("screen_bottom"), cell("screen_top"), cell("z"))
	}
	body, hdr = formBody(t, scen, lonlat.String(), "text/csv")
	sameResult(t, "lon/lat CSV", screenResult(t, ts, "/v1/screenings", body, hdr), want)
	// The same wells as testdata/demo/wells.csv (UTM x, y to the cm).
	csvText, err := os.ReadFile("../testdata/demo/wells.csv")
	if err != nil {
		t.Fatal(err)
	}
	body, hdr = formBody(t, scen, string(csvText), "")
	fromCSV := screenResult(t, ts, "/v1/screenings", body, hdr)
	if fromCSV.Summary.Text != want.Summary.Text || len(fromCSV.Receptors) != len(want.Receptors) {
		t.Fatalf("wells.csv: %q, want %q", fromCSV.Summary.Text, want.Summary.Text)
	}
	for i, rr := range fromCSV.Receptors {
		if w := want.Receptors[i]; rr.ID != w.ID || rr.Status != w.Status || math.Abs(rr.X-w.X) > 0.01 || math.Abs(rr.Y-w.Y) > 0.01 {
			t.Errorf("wells.csv receptor %d: %s %s (%v, %v), want %s %s (%v, %v)", i, rr.ID, rr.Status, rr.X, rr.Y, w.ID, w.Status, w.X, w.Y)
		}
	}
	// A layer is accepted wherever a scenario is: a plot of its wells.
	rec := ts.call(t, http.MethodPost, "/v1/plots?kind=breakthrough&receptor=PW-02", mustJSON(t, inBody), nil)
	if rec.Code != 200 {
		t.Errorf("plot of a layer's well: %d %.300s", rec.Code, rec.Body.String())
	}
}

// clone deep-copies a JSON tree.
func clone(t testing.TB, m map[string]any) map[string]any {
	t.Helper()
	var c map[string]any
	if err := json.Unmarshal(mustJSON(t, m), &c); err != nil {
		t.Fatal(err)
	}
	return c
}

// sameResult compares two results' receptors, summary and input hash.
func sameResult(t *testing.T, what string, got, want plume.Result) {
	t.Helper()
	if g, w := string(mustJSON(t, got.Receptors)), string(mustJSON(t, want.Receptors)); g != w {
		t.Errorf("%s: receptors differ:\n got %.400s\nwant %.400s", what, g, w)
	}
	if got.Summary.Text != want.Summary.Text || got.Engine.InputSHA256 != want.Engine.InputSHA256 {
		t.Errorf("%s: summary %q hash %s, want %q %s", what, got.Summary.Text, got.Engine.InputSHA256, want.Summary.Text, want.Engine.InputSHA256)
	}
}

// layerCase is a bad receptor layer: the request, the status and the field
// the problem must name.
type layerCase struct {
	name   string
	build  func(t *testing.T) ([]byte, map[string]string)
	status int
	field  string
}

// point is a GeoJSON Point feature with properties.
func point(x, y float64, props map[string]any) map[string]any {
	return map[string]any{"type": "Feature", "geometry": map[string]any{"type": "Point", "coordinates": []any{x, y}}, "properties": props}
}

// siteLayer is a GeoJSON layer of the given features in the demo's site
// frame (no crs) in the demo scenario's body (receptors last, so that the
// same body serves the streaming path).
func siteLayer(features ...any) func(t *testing.T) ([]byte, map[string]string) {
	return func(t *testing.T) ([]byte, map[string]string) {
		m := demoMap(t)
		if features == nil {
			features = []any{}
		}
		m["receptors"] = map[string]any{"type": "FeatureCollection", "features": features}
		return streamBody(t, m), nil
	}
}

// utmWith is the UTM demo layer changed by edit.
func utmWith(edit func(scen, layer map[string]any)) func(t *testing.T) ([]byte, map[string]string) {
	return func(t *testing.T) ([]byte, map[string]string) {
		scen, layer := utmLayer(t)
		edit(scen, layer)
		scen["receptors"] = layer
		return streamBody(t, scen), nil
	}
}

// csvForm is a multipart body of the demo scenario (edited) with a CSV.
func csvForm(text string, edit func(scen map[string]any)) func(t *testing.T) ([]byte, map[string]string) {
	return func(t *testing.T) ([]byte, map[string]string) {
		m := demoMap(t)
		if edit != nil {
			edit(m)
		}
		return formBody(t, m, text, "text/csv")
	}
}

func props(id string) map[string]any { return map[string]any{"id": id} }

// badLayers are the bad layers of issue 15: non-point geometries, missing
// and repeated ids, a CSV missing a column, longitude/latitude out of
// range, unknown and geographic CRS, and their neighbours.
var badLayers = []layerCase{
	{"line string", siteLayer(point(1300, 800, props("A")), map[string]any{"type": "Feature",
		"geometry": map[string]any{"type": "LineString", "coordinates": []any{[]any{1300, 800}, []any{1310, 790}}}, "properties": props("B")}),
		422, "receptors.features[1].geometry.type"},
	{"polygon", siteLayer(map[string]any{"type": "Feature",
		"geometry": map[string]any{"type": "Polygon", "coordinates": []any{[]any{[]any{0, 0}, []any{1, 0}, []any{0, 1}, []any{0, 0}}}}, "properties": props("A")}),
		422, "receptors.features[0].geometry.type"},
	{"no geometry", siteLayer(map[string]any{"type": "Feature", "geometry": nil, "properties": props("A")}), 422, "receptors.features[0].geometry"},
	{"missing id", siteLayer(point(1300, 800, props("A")), point(1310, 790, map[string]any{"name": "B"})), 422, "receptors.features[1].properties.id"},
	{"empty id", siteLayer(point(1300, 800, props(""))), 422, "receptors.features[0].properties.id"},
	{"duplicate id", siteLayer(point(1300, 800, props("A")), point(1310, 790, props("B")), point(1320, 780, props("A"))), 422, "receptors.features[2].properties.id"},
	{"id property named", utmWith(func(s, _ map[string]any) { s["receptor_id_property"] = "name" }), 422, "receptors.features[0].properties.name"},
	{"no features", siteLayer(), 422, "receptors"},
	{"features not an array", func(t *testing.T) ([]byte, map[string]string) {
		m := demoMap(t)
		m["receptors"] = map[string]any{"type": "FeatureCollection", "features": map[string]any{}}
		return streamBody(t, m), nil
	}, 400, "receptors.features"},
	{"not a collection", func(t *testing.T) ([]byte, map[string]string) {
		m := demoMap(t)
		m["receptors"] = map[string]any{"type": "GeometryCollection", "features": []any{point(1300, 800, props("A"))}}
		return streamBody(t, m), nil
	}, 422, "receptors.type"},
	{"a feature not an object", siteLayer(point(1300, 800, props("A")), 7), 400, "receptors.features[1]"},
	{"bad depth", siteLayer(point(1300, 800, map[string]any{"id": "A", "z": "deep"})), 400, "receptors.features[0].properties.z"},
	{"negative depth", siteLayer(point(1300, 800, map[string]any{"id": "A", "z": -2})), 422, "receptors.features[0].properties.z"},
	{"longitude out of range", utmWith(func(_, l map[string]any) {
		l["features"].([]any)[0].(map[string]any)["geometry"].(map[string]any)["coordinates"] = []any{512000.0, 4181000.0}
	}), 422, "receptors.features[0].geometry.coordinates"},
	{"latitude out of range", utmWith(func(_, l map[string]any) {
		l["features"].([]any)[1].(map[string]any)["geometry"].(map[string]any)["coordinates"] = []any{-80.86, 97.0}
	}), 422, "receptors.features[1].geometry.coordinates"},
	{"layer in another CRS", utmWith(func(_, l map[string]any) {
		l["crs"] = map[string]any{"type": "name", "properties": map[string]any{"name": "urn:ogc:def:crs:EPSG::32618"}}
	}), 422, "receptors.crs"},
	{"layer CRS not EPSG", utmWith(func(_, l map[string]any) {
		l["crs"] = map[string]any{"type": "name", "properties": map[string]any{"name": "my local grid"}}
	}), 422, "receptors.crs"},
	{"unknown CRS", utmWith(func(s, _ map[string]any) { s["crs"] = "EPSG:999999" }), 422, "crs"},
	{"geographic CRS", utmWith(func(s, _ map[string]any) { s["crs"] = "EPSG:4326" }), 422, "crs"},
	{"lon/lat layer without a crs", siteLayer(point(1300, 800, props("A"))), 0, ""}, // site coordinates: fine
	{"CSV missing column y", csvForm("id,x,z\nA,1300,1\n", nil), 422, "receptors column y"},
	{"CSV missing id column", csvForm("name,x,y\nA,1300,800\n", nil), 422, "receptors column id"},
	{"CSV missing coordinates", csvForm("id,z\nA,1\n", nil), 422, "receptors column x"},
	{"CSV id column named", csvForm("id,x,y\nA,1300,800\n", func(m map[string]any) { m["receptor_id_property"] = "well" }), 422, "receptors column well"},
	{"CSV empty", csvForm("", nil), 422, "receptors"},
	{"CSV bad number", csvForm("id,x,y\nA,1300,800\nB,1310,79o\n", nil), 400, "receptors row 3 column y"},
	{"CSV decimal comma", csvForm("id;x;y\nA;1300,5;800\n", nil), 400, "receptors row 2 column x"},
	{"CSV empty id", csvForm("id,x,y\nA,1300,800\n,1310,790\n", nil), 422, "receptors row 3 column id"},
	{"CSV duplicate id", csvForm("id,x,y\nA,1300,800\nB,1310,790\nA,1320,780\n", nil), 422, "receptors row 4 column id"},
	{"CSV bare quote", csvForm("id,x,y\nA,1300,800\nB,13\"10,790\n", nil), 400, "receptors row 3"},
	{"CSV ragged row", csvForm("id,x,y\nA,1300,800\nB,1310\n", nil), 400, "receptors row 3"},
	{"CSV missing x value", csvForm("id,x,y\nA,,800\n", nil), 422, "receptors row 2 column x"},
	{"CSV longitude out of range", csvForm("id,lon,lat\nA,-80.86,37.78\nB,-280.86,37.78\n", func(m map[string]any) {
		m["crs"], m["source"].(map[string]any)["x"], m["source"].(map[string]any)["y"] = "EPSG:32617", 512000.0, 4181000.0
	}), 422, "receptors row 3 column lon"},
	{"CSV lon/lat without crs", csvForm("id,lon,lat\nA,-80.86,37.78\n", nil), 422, "receptors row 2 column lon"},
	{"CSV geographic CRS", csvForm("id,lon,lat\nA,-80.86,37.78\n", func(m map[string]any) { m["crs"] = "EPSG:4269" }), 422, "crs"},
	{"multipart without receptors", func(t *testing.T) ([]byte, map[string]string) {
		var buf bytes.Buffer
		w := multipart.NewWriter(&buf)
		sp, _ := w.CreateFormField("scenario")
		sp.Write(demoBody(t))
		w.Close()
		return buf.Bytes(), map[string]string{"Content-Type": w.FormDataContentType()}
	}, 422, "receptors"},
	{"multipart receptors first", func(t *testing.T) ([]byte, map[string]string) {
		var buf bytes.Buffer
		w := multipart.NewWriter(&buf)
		rp, _ := w.CreateFormField("receptors")
		rp.Write([]byte(demoCSV))
		w.Close()
		return buf.Bytes(), map[string]string{"Content-Type": w.FormDataContentType()}
	}, 422, "scenario"},
	{"multipart scenario not JSON", func(t *testing.T) ([]byte, map[string]string) {
		var buf bytes.Buffer
		w := multipart.NewWriter(&buf)
		sp, _ := w.CreateFormField("scenario")
		sp.Write([]byte("{units: m}"))
		w.Close()
		return buf.Bytes(), map[string]string{"Content-Type": w.FormDataContentType()}
	}, 400, "scenario"},
	{"receptors in the scenario part", func(t *testing.T) ([]byte, map[string]string) {
		var buf bytes.Buffer
		w := multipart.NewWriter(&buf)
		sp, _ := w.CreateFormField("scenario")
		sp.Write(demoBody(t))
		rp, _ := w.CreateFormField("receptors")
		rp.Write([]byte(demoCSV))
		w.Close()
		return buf.Bytes(), map[string]string{"Content-Type": w.FormDataContentType()}
	}, 422, "receptors"},
}

// Every bad layer is a 4xx problem naming the field or row, never a 500,
// whether the answer is streamed or not.
func TestLayerBadInput(t *testing.T) {
	ts := newTestServer(t, Config{})
	for _, tc := range badLayers {
		for _, target := range []string{"/v1/screenings", "/v1/screenings?format=ndjson"} {
			t.Run(tc.name+" "+target, func(t *testing.T) {
				body, hdr := tc.build(t)
				rec := ts.call(t, http.MethodPost, target, body, hdr)
				if tc.status == 0 {
					if rec.Code != 200 {
						t.Fatalf("%d %.500s", rec.Code, rec.Body.String())
					}
					return
				}
				p := problemOf(t, rec, tc.status)
				if !hasField(p, tc.field) {
					t.Errorf("problem does not name %q: %+v", tc.field, p.Errors)
				}
			})
		}
	}
}

// A layer of 10,001 receptors is over the limit of an answer that is not
// streamed (413, naming receptors); streamed, it is screened.
func TestLayerLimitNotStreamed(t *testing.T) {
	ts := newTestServer(t, Config{MaxBodyBytes: 4 << 20})
	var b strings.Builder
	b.WriteString("id,x,y\n")
	for i := range 10001 {
		fmt.Fprintf(&b, "R%d,%d,%d\n", i, 1000+i%50, 500+i/50)
	}
	m := demoMap(t)
	m["times"] = []any{3650}
	m["methods"] = []any{"domenico"}
	body, hdr := formBody(t, m, b.String(), "")
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/screenings", body, hdr), http.StatusRequestEntityTooLarge)
	if !hasField(p, "receptors") {
		t.Errorf("413 does not name receptors: %+v", p)
	}
	rec := ts.call(t, http.MethodPost, "/v1/screenings?format=ndjson", body, hdr)
	if rec.Code != 200 {
		t.Fatalf("streamed: %d %.300s", rec.Code, rec.Body.String())
	}
	recs := ndjsonRecords(t, rec.Body.Bytes())
	if len(recs) != 10003 || recordKind(recs[len(recs)-1]) != "end" {
		t.Errorf("streamed %d records, last %q", len(recs), recordKind(recs[len(recs)-1]))
	}
}

// mayHoldLayer lets every body with a layer or receptor_id_property through
// to the full parse, and passes the usual array body by.
func TestMayHoldLayer(t *testing.T) {
	for _, c := range []struct {
		body string
		want bool
	}{
		{`{"receptors": [{"id": "MW-1", "x": 1, "y": 2}]}`, false},
		{`{"receptors":{"type":"FeatureCollection","features":[]}}`, true},
		{"{\"receptors\" \n:\t {\"type\": \"FeatureCollection\"}}", true},
		{`{"scenario": {"receptors": {"type": "FeatureCollection"}}}`, true},
		{`{"receptors": [], "receptor_id_property": "name"}`, true},
		{`{"description": "\"receptors\": none", "receptors": []}`, false},
		{`{"receptors": []}{"receptors": {}}`, true}, // a false positive only costs a parse
		{`{}`, false},
		{``, false},
	} {
		if got := mayHoldLayer([]byte(c.body)); got != c.want {
			t.Errorf("mayHoldLayer(%s) = %v, want %v", c.body, got, c.want)
		}
	}
}
