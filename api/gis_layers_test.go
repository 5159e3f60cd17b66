package api

import (
	"bytes"
	"fmt"
	"net/http"
	"strings"
	"testing"

	"downgradient/internal/gistest"
)

// wantLayer checks what ogrinfo says of a layer: one layer of n features
// of geometry geom in WGS 84, without warnings.
func wantLayer(t *testing.T, what string, info gistest.Info, n int, geom string) gistest.Layer {
	t.Helper()
	if len(info.Layers) != 1 {
		t.Fatalf("%s: ogrinfo reports %d layers: %+v", what, len(info.Layers), info)
	}
	l := info.Layers[0]
	if l.FeatureCount != n || l.Geometry != geom || l.CRSName != "WGS 84" || l.CRSID != "EPSG:4326" {
		t.Errorf("%s: ogrinfo says %d features of %q in %q (%s); want %d of %q in WGS 84 (EPSG:4326)",
			what, l.FeatureCount, l.Geometry, l.CRSName, l.CRSID, n, geom)
	}
	if len(info.Warnings) > 0 {
		t.Errorf("%s: ogrinfo warnings: %s", what, strings.Join(info.Warnings, "; "))
	}
	return l
}

// The layers of issue 15 open in GDAL's ogrinfo (skipped without it on a
// developer's machine, required in CI): the invented demo layer of wells
// as it goes in; the same wells screened and streamed out as GeoJSON with
// the site's CRS; a streamed layer of several parts; and a plume map
// carrying many caveats (90 upgradient receptors), whose type and features
// must come before its caveats for GDAL to recognise it.
func TestLayersOpenInOgrinfo(t *testing.T) {
	ts := newTestServer(t, Config{})
	info := gistest.Ogrinfo(t, "../testdata/demo/wells-layer.geojson")
	l := wantLayer(t, "demo layer in", info, 8, "Point")
	if _, ok := l.Field("well_id"); !ok {
		t.Errorf("demo layer: no well_id column in %v", l.Fields)
	}

	scen, layer := utmLayer(t)
	scen["receptors"] = layer
	rec := ts.call(t, http.MethodPost, "/v1/screenings?format=geojson&stream=true", streamBody(t, scen), nil)
	if rec.Code != 200 {
		t.Fatalf("streamed demo layer: %d %.300s", rec.Code, rec.Body.String())
	}
	l = wantLayer(t, "demo layer out", gistest.OgrinfoBytes(t, "wells-out.geojson", rec.Body.Bytes()), 8, "Point")
	for _, want := range []string{"site_x", "site_y", "status", "caveat_codes", "exact_t3650d_mg_L", "domenico_t7300d_mg_L"} {
		if _, ok := l.Field(want); !ok {
			t.Errorf("demo layer out: no column %s in %v", want, l.Fields)
		}
	}
	// Near the invented site: 80.86 W, 37.78 N (wells-layer.geojson).
	if !(l.Extent[0] > -80.87 && l.Extent[2] < -80.85 && l.Extent[1] > 37.77 && l.Extent[3] < 37.78) {
		t.Errorf("demo layer out: extent %v", l.Extent)
	}

	// A streamed layer of several parts, given in site coordinates.
	m := readDemo(t, "site-utm.json")
	delete(m, "receptor_id_property")
	m["times"], m["methods"] = []any{3650}, []any{"domenico"}
	var rs []any
	for _, r := range gridReceptors(5*streamChunk + 3) {
		rm := r.(map[string]any)
		rm["x"], rm["y"] = rm["x"].(float64)-1250+512000, rm["y"].(float64)-830+4181000
		rs = append(rs, rm)
	}
	m["receptors"] = rs
	rec = ts.call(t, http.MethodPost, "/v1/screenings?format=geojson&stream=true", streamBody(t, m), nil)
	if rec.Code != 200 {
		t.Fatalf("streamed grid: %d %.300s", rec.Code, rec.Body.String())
	}
	wantLayer(t, "streamed layer", gistest.OgrinfoBytes(t, "grid.geojson", rec.Body.Bytes()), len(rs), "Point")

	// A plume map of the UTM site with 90 upgradient receptors.
	m = readDemo(t, "site-utm.json")
	delete(m, "receptor_id_property")
	rs = nil
	for i := range 90 {
		rs = append(rs, map[string]any{"id": fmt.Sprintf("U-%d", i), "x": 511900.0 - float64(i%10)*5, "y": 4181040.0 + float64(i/10)*3, "z": 1})
	}
	m["receptors"] = rs
	rec = ts.call(t, http.MethodPost, "/v1/plume-maps", mustJSON(t, map[string]any{"scenario": m, "cells": 4000}), nil)
	if rec.Code != 200 || bytes.Count(rec.Body.Bytes(), []byte(`"receptor_upgradient_of_source"`)) < 90 {
		t.Fatalf("plume map: %d, %d upgradient caveats", rec.Code, bytes.Count(rec.Body.Bytes(), []byte(`"receptor_upgradient_of_source"`)))
	}
	wantLayer(t, "plume map with 90 caveats", gistest.OgrinfoBytes(t, "map.geojson", rec.Body.Bytes()), 3, "Multi Polygon")
}
