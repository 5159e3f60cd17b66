//go:build cgo

package crs

import (
	"encoding/json"
	"math"
	"testing"

	"downgradient/internal/gistest"
)

// Site points in a State Plane frame (US survey feet; invented positions)
// converted to WGS 84 and written as RFC 7946 GeoJSON with the site
// coordinates kept as properties: GDAL's ogrinfo reads WGS 84 points whose
// extent is the converted longitudes and latitudes, longitude first.
func TestLayerOpensInGIS(t *testing.T) {
	f := mustOpen(t, "EPSG:2272")
	site := [][2]float64{{2500000.25, 250000.5}, {2501200.75, 250400.125}, {2499300.5, 249100.25}}
	features := make([]map[string]any, 0, len(site))
	minLon, minLat, maxLon, maxLat := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for i, p := range site {
		lon, lat, err := f.ToLonLat(p[0], p[1])
		if err != nil {
			t.Fatal(err)
		}
		minLon, maxLon = math.Min(minLon, lon), math.Max(maxLon, lon)
		minLat, maxLat = math.Min(minLat, lat), math.Max(maxLat, lat)
		features = append(features, map[string]any{
			"type":       "Feature",
			"geometry":   map[string]any{"type": "Point", "coordinates": []float64{lon, lat}},
			"properties": map[string]any{"id": i, "site_x": p[0], "site_y": p[1]},
		})
	}
	data, err := json.Marshal(map[string]any{"type": "FeatureCollection", "features": features})
	if err != nil {
		t.Fatal(err)
	}
	info := gistest.OgrinfoBytes(t, "site.geojson", data)
	l := info.Layers[0]
	if l.Geometry != "Point" || l.FeatureCount != 3 || l.CRSID != "EPSG:4326" {
		t.Errorf("ogrinfo: %+v", l)
	}
	// ogrinfo prints the extent to 6 decimals of a degree.
	want := [4]float64{minLon, minLat, maxLon, maxLat}
	for k := range want {
		if math.Abs(l.Extent[k]-want[k]) > 6e-7 {
			t.Errorf("extent %v; want %v", l.Extent, want)
			break
		}
	}
	// GDAL types a column from its values: whole numbers throughout would
	// make site_x an Integer column.
	if fx, ok := l.Field("site_x"); !ok || fx.Type != "Real" {
		t.Errorf("site_x field %+v, %v", fx, ok)
	}
}
