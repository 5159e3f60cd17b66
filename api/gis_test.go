package api

import (
	"strings"
	"testing"

	"downgradient/internal/gistest"
)

// GeoJSON outputs open in a real GIS reader (GDAL's ogrinfo; the test
// skips without it on a developer's machine and fails in CI): the demo's
// receptor layer in its site frame, and the same layer with a CRS, which
// must come out as WGS 84 points near the site with the flat columns.
func TestGeoJSONOpensInOgrinfo(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	body := screenAs(t, ts, m, "geojson")
	info := gistest.OgrinfoBytes(t, "demo.geojson", body)
	if len(info.Layers) != 1 || info.Layers[0].FeatureCount != 6 || info.Layers[0].Geometry != "Point" {
		t.Fatalf("ogrinfo: %+v", info)
	}
	// The same wells in UTM zone 17N (the invented site moved there).
	set(m, "crs", "EPSG:32617")
	set(m, "source.x", 512000.0)
	set(m, "source.y", 4181000.0)
	for _, r := range m["receptors"].([]any) {
		rm := r.(map[string]any)
		rm["x"] = 512000 + (rm["x"].(float64) - 1250)
		rm["y"] = 4181000 + (rm["y"].(float64) - 830)
	}
	body = screenAs(t, ts, m, "geojson")
	info = gistest.OgrinfoBytes(t, "utm.geojson", body)
	l := info.Layers[0]
	if l.FeatureCount != 6 || l.Geometry != "Point" || l.CRSID != "EPSG:4326" {
		t.Fatalf("ogrinfo with a CRS: %+v", l)
	}
	// UTM 17N's central meridian is 81 W (false easting 500 km); 12 km east
	// of it at 37.8 N is 12 km / (111.32 km cos 37.8 deg) = 0.136 deg east:
	// about 80.86 W, 37.78 N (common practice: 111.32 km per degree of
	// longitude at the equator).
	if !(l.Extent[0] > -80.9 && l.Extent[2] < -80.8 && l.Extent[1] > 37.7 && l.Extent[3] < 37.9) {
		t.Errorf("extent %v is not near 80.86 W, 37.78 N", l.Extent)
	}
	names := map[string]bool{}
	for _, f := range l.Fields {
		names[f.Name] = true
	}
	for _, want := range []string{"site_x", "status", "caveat_codes", "exact_t3650d_mg_L", "domenico_steady_mg_L"} {
		if !names[want] {
			t.Errorf("no attribute column %s in %v", want, l.Fields)
		}
	}
	if len(info.Warnings) > 0 {
		t.Errorf("ogrinfo warnings: %s", strings.Join(info.Warnings, "; "))
	}
}
