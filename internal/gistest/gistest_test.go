package gistest

import (
	"encoding/json"
	"os"
	"strings"
	"testing"
)

// A FeatureCollection of WGS 84 points with properties, as RFC 7946 writes
// it (the positions are invented): GDAL's GeoJSON driver must read it as
// three points in WGS 84 (EPSG:4326, longitude first: axis mapping 2,1)
// with one column per property and its type.
func TestOgrinfoReadsPoints(t *testing.T) {
	doc := map[string]any{
		"type": "FeatureCollection",
		"features": []map[string]any{
			point("W-1", -80.8637, 37.7763, 0.128, 1115.9, true),
			point("W-2", -80.8601, 37.7790, 0.0031, nil, false),
			point("MW-5", -80.8702, 37.7741, 0, nil, false),
		},
	}
	data, err := json.Marshal(doc)
	if err != nil {
		t.Fatal(err)
	}
	info := OgrinfoBytes(t, "receptors.geojson", data)
	if info.Driver != "GeoJSON" || len(info.Layers) != 1 || len(info.Warnings) != 0 {
		t.Fatalf("ogrinfo: %+v", info)
	}
	l := info.Layers[0]
	if l.Geometry != "Point" || l.FeatureCount != 3 || l.CRSName != "WGS 84" || l.CRSID != "EPSG:4326" ||
		l.AxisMapping != "2,1" || l.Extent != [4]float64{-80.8702, 37.7741, -80.8601, 37.7790} {
		t.Errorf("layer %+v; want 3 points in WGS 84 (EPSG:4326), axis mapping 2,1, longitude first", l)
	}
	want := map[string]string{"id": "String", "exact_t3650d_mg_L": "Real", "first_exceedance_time_d": "Real",
		"exceeds_screening_level": "Integer(Boolean)"}
	for name, typ := range want {
		if f, ok := l.Field(name); !ok || f.Type != typ {
			t.Errorf("field %s = %+v, %v; want type %s (fields %+v)", name, f, ok, typ, l.Fields)
		}
	}
}

func point(id string, lon, lat, c float64, first any, exceeds bool) map[string]any {
	return map[string]any{
		"type":     "Feature",
		"geometry": map[string]any{"type": "Point", "coordinates": []float64{lon, lat}},
		"properties": map[string]any{"id": id, "exact_t3650d_mg_L": c, "first_exceedance_time_d": first,
			"exceeds_screening_level": exceeds},
	}
}

// The helper reports, not hides, a document GDAL 3.6 does not recognise:
// "type" and "features" only after a foreign member of tens of kilobytes.
// Run (not Ogrinfo, which would fail the test) returns the error.
func TestOgrinfoRefusesLateMembers(t *testing.T) {
	requireOgrinfo(t)
	caveats := make([]map[string]string, 150)
	for i := range caveats {
		caveats[i] = map[string]string{"code": "receptor_upgradient_of_source", "message": strings.Repeat("x", 240)}
	}
	head, err := json.Marshal(map[string]any{"caveats": caveats})
	if err != nil {
		t.Fatal(err)
	}
	late := string(head[:len(head)-1]) + `,"type":"FeatureCollection","features":[` +
		`{"type":"Feature","geometry":{"type":"Point","coordinates":[-80.86,37.77]},"properties":{}}]}`
	path := t.TempDir() + "/late.geojson"
	if err := writeFile(path, late); err != nil {
		t.Fatal(err)
	}
	if info, err := Run(path); err == nil {
		t.Errorf("ogrinfo opened a GeoJSON whose members come after %d bytes: %+v", len(head), info)
	} else if !strings.Contains(err.Error(), "Unable to open") {
		t.Errorf("error %v; want ogrinfo's \"Unable to open datasource\"", err)
	}
	early := `{"type":"FeatureCollection","features":[` +
		`{"type":"Feature","geometry":{"type":"Point","coordinates":[-80.86,37.77]},"properties":{}}],` +
		string(head[1:])
	if err := writeFile(path, early); err != nil {
		t.Fatal(err)
	}
	if info, err := Run(path); err != nil || info.Layers[0].FeatureCount != 1 {
		t.Errorf("members first: %+v, %v; want one feature", info, err)
	}
}

// Parse reads a captured GDAL 3.6.2 report, including a layer without a
// CRS and a field whose name holds a colon.
func TestParse(t *testing.T) {
	out := "INFO: Open of `x.geojson'\n      using driver `GeoJSON' successful.\n\n" +
		"Layer name: outlines\nGeometry: Multi Polygon\nFeature Count: 12\n" +
		"Extent: (0.000000, 0.000000) - (1.000000, 1.000000)\nLayer SRS WKT:\n" +
		"PROJCRS[\"WGS 84 / UTM zone 17N\",\n    BASEGEOGCRS[\"WGS 84\",\n        ID[\"EPSG\",4326]],\n" +
		"    ID[\"EPSG\",32617]]\nData axis to CRS axis mapping: 1,2\n" +
		"level_mg_L: Real (0.0)\nnote: time: String (0.0)\ncount: Integer64 (0.0)\n" +
		"Layer name: bare\nGeometry: None\nFeature Count: 0\nLayer SRS WKT:\n(unknown)\n"
	info, err := Parse(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(info.Layers) != 2 || info.Driver != "GeoJSON" {
		t.Fatalf("%+v", info)
	}
	a, b := info.Layers[0], info.Layers[1]
	if a.Name != "outlines" || a.Geometry != "Multi Polygon" || a.FeatureCount != 12 || !a.HasExtent ||
		a.Extent != [4]float64{0, 0, 1, 1} ||
		a.CRSName != "WGS 84 / UTM zone 17N" || a.CRSID != "EPSG:32617" || a.AxisMapping != "1,2" ||
		len(a.Fields) != 3 || a.Fields[1] != (Field{"note: time", "String"}) || a.Fields[2].Type != "Integer64" {
		t.Errorf("first layer %+v", a)
	}
	if b.Name != "bare" || b.Geometry != "None" || b.HasExtent || b.CRSName != "" || b.CRSID != "" || len(b.Fields) != 0 {
		t.Errorf("second layer %+v", b)
	}
	if _, err := Parse("FAILURE:\nUnable to open datasource `y'"); err == nil {
		t.Error("Parse of a failure report: no error")
	}
}

func writeFile(path, text string) error { return os.WriteFile(path, []byte(text), 0o600) }
