//go:build cgo

package crs

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// Reference values from PROJ's command-line programs (Debian proj-bin
// 9.1.1): cs2cs for conversions, proj -V for scale and convergence,
// written by testdata/reference/gen_crs_cs2cs.py into crs_cs2cs.json.

type lonLatXY struct {
	X, Y, Lon, Lat float64
}

type scaleRef struct {
	X, Y, H, K  float64
	Convergence float64 `json:"convergence_deg"`
}

type cs2csSet struct {
	CRS        string     `json:"crs"`
	Geodetic   string     `json:"geodetic_crs"`
	ToWGS84    []lonLatXY `json:"to_wgs84"`
	ToGeodetic []lonLatXY `json:"to_geodetic"`
	FromWGS84  []lonLatXY `json:"from_wgs84"`
	Scale      []scaleRef `json:"scale"`
}

func loadCs2cs(t *testing.T) []cs2csSet {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("..", "..", "testdata", "reference", "crs_cs2cs.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct{ Sets []cs2csSet }
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Sets) == 0 {
		t.Fatal("no reference sets")
	}
	return doc.Sets
}

// lonLatMetres is the distance in metres between two nearby points given
// in degrees, from an upper bound of a degree of latitude (111.7 km): an
// overestimate, which only makes the 1 mm check stricter.
func lonLatMetres(lon1, lat1, lon2, lat2 float64) float64 {
	const metresPerDegree = 111700
	de := math.Remainder(lon2-lon1, 360) * math.Cos(lat1*math.Pi/180)
	return metresPerDegree * math.Hypot(de, lat2-lat1)
}

// Every point agrees with cs2cs to 1 mm, in both directions, for UTM
// (EPSG:32617), State Plane in US survey feet (EPSG:2272) and in
// international feet (EPSG:2222), and two national grids (EPSG:27700;
// EPSG:2193, whose EPSG axis order is northing first).
func TestCs2csReference(t *testing.T) {
	for _, set := range loadCs2cs(t) {
		f, err := Open(set.CRS)
		if err != nil {
			t.Fatalf("Open(%s): %v", set.CRS, err)
		}
		worst := 0.0
		check := func(what string, p lonLatXY, lon, lat float64, err error) {
			d := lonLatMetres(p.Lon, p.Lat, lon, lat)
			worst = math.Max(worst, d)
			if err != nil || d > 0.001 {
				t.Errorf("%s %s(%.3f, %.3f) = (%.10f, %.10f), %v; cs2cs (%.10f, %.10f): %.2g m apart",
					set.CRS, what, p.X, p.Y, lon, lat, err, p.Lon, p.Lat, d)
			}
		}
		for _, p := range set.ToWGS84 {
			lon, lat, err := f.ToLonLat(p.X, p.Y)
			check("ToLonLat", p, lon, lat, err)
		}
		for _, p := range set.ToGeodetic {
			lon, lat, err := f.ToGeodetic(p.X, p.Y)
			check("ToGeodetic", p, lon, lat, err)
		}
		for _, p := range set.FromWGS84 {
			x, y, err := f.FromLonLat(p.Lon, p.Lat)
			d := math.Hypot(x-p.X, y-p.Y) * f.Unit().ToMetres
			worst = math.Max(worst, d)
			if err != nil || d > 0.001 {
				t.Errorf("%s FromLonLat(%.6f, %.6f) = (%.4f, %.4f), %v; cs2cs (%.4f, %.4f): %.2g m apart",
					set.CRS, p.Lon, p.Lat, x, y, err, p.X, p.Y, d)
			}
		}
		t.Logf("%s: %d + %d + %d points, largest difference from cs2cs %.2g m", set.CRS,
			len(set.ToWGS84), len(set.ToGeodetic), len(set.FromWGS84), worst)
	}
}

// Scale and convergence agree with proj -V, which prints h and k to 8
// decimals and the convergence to 8 decimals of a degree.
func TestScaleReference(t *testing.T) {
	for _, set := range loadCs2cs(t) {
		f, err := Open(set.CRS)
		if err != nil {
			t.Fatalf("Open(%s): %v", set.CRS, err)
		}
		worstScale, worstConv := 0.0, 0.0
		for _, p := range set.Scale {
			s, err := f.ScaleAt(p.X, p.Y)
			if err != nil {
				t.Errorf("%s ScaleAt(%g, %g): %v", set.CRS, p.X, p.Y, err)
				continue
			}
			ds := math.Max(math.Abs(s.Meridional-p.H), math.Abs(s.Parallel-p.K))
			dc := math.Abs(s.Convergence - p.Convergence)
			worstScale, worstConv = math.Max(worstScale, ds), math.Max(worstConv, dc)
			if ds > 2e-8 || dc > 2e-8 {
				t.Errorf("%s ScaleAt(%g, %g) = h %.10f k %.10f convergence %.10f; proj -V h %.8f k %.8f convergence %.8f",
					set.CRS, p.X, p.Y, s.Meridional, s.Parallel, s.Convergence, p.H, p.K, p.Convergence)
			}
		}
		t.Logf("%s: scale within %.2g, convergence within %.2g degree of proj -V", set.CRS, worstScale, worstConv)
	}
}
