// Package gistest is a test helper: it opens a file with GDAL's ogrinfo
// (Debian gdal-bin), a real GIS reader, and reports what ogrinfo says of
// it: the driver, and per layer the geometry type, feature count,
// coordinate reference system and attribute fields.
//
// ogrinfo opens the file as any GIS user's tool would, without forcing a
// driver, so a GeoJSON document that GDAL does not recognise (for example
// one whose "type" and "features" come only after a large foreign member)
// fails here as it fails for the user.
//
// When ogrinfo is not installed the tests that need it are skipped, unless
// the environment says this is CI (DOWNGRADIENT_CI=1, set by .ci/run,
// which installs gdal-bin): then they fail, so that a CI machine without
// the reader cannot pass silently.
package gistest

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// CIEnv is the environment variable that .ci/run sets to 1.
const CIEnv = "DOWNGRADIENT_CI"

// timeout bounds one ogrinfo run.
const timeout = 2 * time.Minute

// Info is what ogrinfo -ro -al -so reports of a file.
type Info struct {
	// Driver is the GDAL driver that opened the file ("GeoJSON").
	Driver string
	Layers []Layer
	// Warnings are the lines ogrinfo wrote to its standard error (GDAL
	// warnings such as "Warning 1: ..."), empty for a clean file.
	Warnings []string
}

// Layer is one layer's summary.
type Layer struct {
	Name string
	// Geometry as GDAL names it: "Point", "Polygon", "Multi Polygon",
	// "Line String", "Unknown (any)" (an empty or mixed layer), "None".
	Geometry     string
	FeatureCount int
	// CRSName is the name in the layer's WKT ("WGS 84"), empty when
	// ogrinfo reports no CRS; CRSID its identifier ("EPSG:4326").
	CRSName, CRSID string
	// AxisMapping is GDAL's data-axis-to-CRS-axis mapping ("2,1": the
	// data are longitude, latitude for a latitude-first CRS).
	AxisMapping string
	// Extent is the bounding box in the data's axis order (minimum x,
	// minimum y, maximum x, maximum y: longitude first for GeoJSON);
	// HasExtent is false when ogrinfo prints none (an empty layer).
	Extent    [4]float64
	HasExtent bool
	Fields    []Field
}

// Field is an attribute column: its name and GDAL type ("String",
// "Real", "Integer", "Integer64", "Integer(Boolean)", "StringList", ...).
type Field struct {
	Name, Type string
}

// Field returns the column named name and whether there is one.
func (l Layer) Field(name string) (Field, bool) {
	for _, f := range l.Fields {
		if f.Name == name {
			return f, true
		}
	}
	return Field{}, false
}

// Required reports whether ogrinfo must be present (CI).
func Required() bool { return os.Getenv(CIEnv) == "1" }

// Ogrinfo runs ogrinfo on the file at path and returns its report. It
// skips the test when ogrinfo is absent outside CI, fails it in CI, and
// fails it when ogrinfo cannot open or summarise the file.
func Ogrinfo(t testing.TB, path string) Info {
	t.Helper()
	requireOgrinfo(t)
	info, err := Run(path)
	if err != nil {
		t.Fatalf("ogrinfo %s: %v", filepath.Base(path), err)
	}
	return info
}

// OgrinfoBytes writes data to a file named name in a temporary directory
// and runs Ogrinfo on it; the name's extension tells GDAL the format
// (".geojson").
func OgrinfoBytes(t testing.TB, name string, data []byte) Info {
	t.Helper()
	requireOgrinfo(t)
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	return Ogrinfo(t, path)
}

func requireOgrinfo(t testing.TB) {
	t.Helper()
	if _, err := exec.LookPath("ogrinfo"); err != nil {
		if Required() {
			t.Fatalf("ogrinfo not found but %s=1: CI must install gdal-bin (.ci/run)", CIEnv)
		}
		t.Skipf("ogrinfo not installed (apt-get install -y gdal-bin to run this GIS-reader check; it is required in CI)")
	}
}

// Run runs ogrinfo -ro -al -so on path and parses its report. A file that
// GDAL cannot open is an error holding ogrinfo's first lines of output.
func Run(path string) (Info, error) {
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, "ogrinfo", "-ro", "-al", "-so", path)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		return Info{}, fmt.Errorf("%w: %s", err, firstLines(stdout.String()+stderr.String(), 3))
	}
	info, err := Parse(stdout.String())
	if err != nil {
		return Info{}, err
	}
	for _, line := range strings.Split(stderr.String(), "\n") {
		if line = strings.TrimSpace(line); line != "" {
			info.Warnings = append(info.Warnings, line)
		}
	}
	return info, nil
}

func firstLines(s string, n int) string {
	lines := strings.SplitN(strings.TrimSpace(s), "\n", n+1)
	if len(lines) > n {
		lines = lines[:n]
	}
	return strings.Join(lines, " | ")
}

var (
	driverLine = regexp.MustCompile("using driver `([^']+)' successful")
	fieldLine  = regexp.MustCompile(`^(.+): (\S+(?:\(\S+\))?) \((\d+)\.(\d+)\)$`)
	extentLine = regexp.MustCompile(`^Extent: \((\S+), (\S+)\) - \((\S+), (\S+)\)$`)
	wktName    = regexp.MustCompile(`^[A-Z0-9_]+\["([^"]*)"`)
	wktID      = regexp.MustCompile(`ID\["([^"]+)",\s*"?([^",\]]+)"?\]`)
)

// Parse reads the report of ogrinfo -al -so (GDAL 3.x).
func Parse(out string) (Info, error) {
	var info Info
	if m := driverLine.FindStringSubmatch(out); m != nil {
		info.Driver = m[1]
	}
	lines := strings.Split(out, "\n")
	for i := 0; i < len(lines); i++ {
		line := strings.TrimRight(lines[i], "\r")
		if name, ok := strings.CutPrefix(line, "Layer name: "); ok {
			info.Layers = append(info.Layers, Layer{Name: name})
			continue
		}
		if len(info.Layers) == 0 {
			continue
		}
		l := &info.Layers[len(info.Layers)-1]
		var err error
		i, err = parseLayerLine(l, lines, i)
		if err != nil {
			return Info{}, err
		}
	}
	if len(info.Layers) == 0 {
		return Info{}, errors.New("ogrinfo reported no layer: " + firstLines(out, 3))
	}
	return info, nil
}

// parseLayerLine reads lines[i] into l and returns the index of the last
// line it used (a WKT spans several).
func parseLayerLine(l *Layer, lines []string, i int) (int, error) {
	line := strings.TrimRight(lines[i], "\r")
	switch {
	case strings.HasPrefix(line, "Geometry: "):
		l.Geometry = strings.TrimPrefix(line, "Geometry: ")
	case strings.HasPrefix(line, "Feature Count: "):
		n, err := strconv.Atoi(strings.TrimPrefix(line, "Feature Count: "))
		if err != nil {
			return i, fmt.Errorf("ogrinfo feature count %q: %w", line, err)
		}
		l.FeatureCount = n
	case line == "Layer SRS WKT:":
		return parseWKT(l, lines, i+1), nil
	case strings.HasPrefix(line, "Data axis to CRS axis mapping: "):
		l.AxisMapping = strings.TrimPrefix(line, "Data axis to CRS axis mapping: ")
	case strings.HasPrefix(line, "Extent: "):
		return i, parseExtent(l, line)
	case strings.HasPrefix(line, "FID Column"),
		strings.HasPrefix(line, "Geometry Column"), strings.HasPrefix(line, "Metadata"):
	default:
		if m := fieldLine.FindStringSubmatch(line); m != nil {
			l.Fields = append(l.Fields, Field{Name: m[1], Type: m[2]})
		}
	}
	return i, nil
}

func parseExtent(l *Layer, line string) error {
	m := extentLine.FindStringSubmatch(line)
	if m == nil {
		return fmt.Errorf("ogrinfo extent %q", line)
	}
	for k := range 4 {
		v, err := strconv.ParseFloat(m[k+1], 64)
		if err != nil {
			return fmt.Errorf("ogrinfo extent %q: %w", line, err)
		}
		l.Extent[k] = v
	}
	l.HasExtent = true
	return nil
}

// parseWKT reads the WKT that starts at lines[i] (or "(unknown)") into l
// and returns the index of its last line.
func parseWKT(l *Layer, lines []string, i int) int {
	if i >= len(lines) || strings.TrimSpace(lines[i]) == "(unknown)" {
		return i
	}
	var wkt strings.Builder
	depth := 0
	j := i
	for ; j < len(lines); j++ {
		wkt.WriteString(strings.TrimSpace(lines[j]))
		depth += strings.Count(lines[j], "[") - strings.Count(lines[j], "]")
		if depth <= 0 {
			break
		}
	}
	text := wkt.String()
	if m := wktName.FindStringSubmatch(text); m != nil {
		l.CRSName = m[1]
	}
	if ids := wktID.FindAllStringSubmatch(text, -1); len(ids) > 0 {
		last := ids[len(ids)-1]
		l.CRSID = last[1] + ":" + last[2]
	}
	return j
}
