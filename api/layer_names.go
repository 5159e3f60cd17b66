package api

import (
	"fmt"
	"hash/maphash"
	"strconv"
	"strings"
)

// layerForm is how a request gave its receptors.
type layerForm int

const (
	formArray   layerForm = iota // a JSON array of receptor objects
	formGeoJSON                  // a GeoJSON FeatureCollection of points
	formCSV                      // a CSV table (a multipart part)
)

// layerNames names a layer's receptors the way its author sees them:
// receptors[i].x of the scenario is receptors.features[i].geometry.coordinates[0]
// of a GeoJSON layer, or "receptors row 57 column x" of a CSV (row: the
// line of the file, the header being row 1).
type layerNames struct {
	prefix string // JSON path of the receptors: "receptors" or "scenario.receptors"
	form   layerForm
	idProp string // the id's property (GeoJSON) or column (CSV)
	lonLat bool   // GeoJSON coordinates are longitude, latitude
	lines  []int  // CSV: the row of receptor i
	line   int    // CSV, streaming: the row of the receptor just read (lines nil)
}

// rename maps a field path of the scenario (receptors[12].x) to the
// layer's own name; other paths are returned unchanged.
func (n *layerNames) rename(field string) string {
	if n == nil || n.form == formArray || !strings.HasPrefix(field, n.prefix+"[") {
		return field
	}
	rest := field[len(n.prefix)+1:]
	end := strings.IndexByte(rest, ']')
	if end < 0 {
		return field
	}
	i, err := strconv.Atoi(rest[:end])
	if err != nil {
		return field
	}
	member := strings.TrimPrefix(rest[end+1:], ".")
	if n.form == formCSV {
		return n.csvName(n.rowOf(i), member)
	}
	return n.featureName(i, member)
}

// rowOf is the CSV row of receptor i.
func (n *layerNames) rowOf(i int) int {
	if i >= 0 && i < len(n.lines) {
		return n.lines[i]
	}
	return n.line
}

// csvName names a CSV cell ("receptors row 57 column x"), a row
// (column ""), or a column (row 0: "receptors column x").
func (n *layerNames) csvName(row int, column string) string {
	switch {
	case row <= 0:
		return fmt.Sprintf("%s column %s", n.prefix, column)
	case column == "":
		return fmt.Sprintf("%s row %d", n.prefix, row)
	}
	if column == "id" {
		column = n.idProp
	}
	return fmt.Sprintf("%s row %d column %s", n.prefix, row, column)
}

// featureName names a member of feature i of a GeoJSON layer: a
// receptor's field by where the layer holds it.
func (n *layerNames) featureName(i int, member string) string {
	f := fmt.Sprintf("%s.features[%d]", n.prefix, i)
	switch member {
	case "":
		return f
	case "x", "lon":
		return f + ".geometry.coordinates[0]"
	case "y", "lat":
		return f + ".geometry.coordinates[1]"
	case "id":
		return f + ".properties." + n.idProp
	}
	return f + ".properties." + member
}

// idSet finds repeated receptor ids among up to millions without keeping
// the ids: it keeps a 64-bit hash of each (with a seed chosen per request,
// so a collision, with odds below 1 in 10^7 for a million ids, is not
// repeatable) and where it was first seen: 16 bytes or so per receptor.
type idSet struct {
	seed maphash.Seed
	m    map[uint64]int32
}

func newIDSet() *idSet { return &idSet{seed: maphash.MakeSeed(), m: map[uint64]int32{}} }

// add notes id at position pos (an index, or a CSV row); it reports the
// position of an earlier receptor with the same id, if any.
func (s *idSet) add(id string, pos int) (earlier int, dup bool) {
	h := maphash.String(s.seed, id)
	if j, ok := s.m[h]; ok {
		return int(j), true
	}
	s.m[h] = int32(pos)
	return 0, false
}
