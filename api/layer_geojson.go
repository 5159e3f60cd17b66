package api

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"downgradient/internal/crs"
	"downgradient/plume"
)

// A receptor layer given as GeoJSON: a FeatureCollection of Point
// features. Each feature's id is the property named by the scenario's
// receptor_id_property (default "id"); its depth and well screen are the
// properties z, screen_top and screen_bottom (numbers or null; any other
// property is ignored). Its coordinates are:
//   - WGS 84 longitude, latitude (RFC 7946) when the layer has no crs
//     member and the scenario names a crs, or when its crs member names
//     CRS84 or EPSG:4326;
//   - site x, y when the layer has no crs member and the scenario has no
//     crs (the convention of the service's own GeoJSON without a crs), or
//     when its crs member (GeoJSON 2008, as GDAL writes it for projected
//     layers) names the scenario's own crs.
// A third coordinate (an elevation) is ignored: depth comes from z.
// The crs member, when a layer has one, must come before its features (so
// that a streamed layer is read in one pass), as GDAL writes it.

// featureReader reads a GeoJSON layer's features one at a time from a
// decoder positioned just inside the features array.
type featureReader struct {
	dec   *json.Decoder
	names *layerNames
	ids   *idSet
	code  string // the scenario's crs
	typed bool   // the collection's type was read (before its features)
	i     int
	done  bool
}

// next returns the next feature as a receptor with its issues (a feature
// with issues is not screened); io.EOF after the last. Any other error is
// the body's (malformed JSON, a read error).
func (r *featureReader) next() (plume.Receptor, []issue, error) {
	if err := arrayEnd(r.dec, &r.done); err != nil {
		return plume.Receptor{}, nil, err
	}
	i := r.i
	r.i++
	var raw json.RawMessage
	if err := r.dec.Decode(&raw); err != nil {
		return plume.Receptor{}, nil, err
	}
	rec, issues := r.feature(i, raw)
	return rec, issues, nil
}

// feature reads feature i.
func (r *featureReader) feature(i int, raw json.RawMessage) (plume.Receptor, []issue) {
	n := r.names
	at := func(member string) string {
		f := fmt.Sprintf("%s.features[%d]", n.prefix, i)
		if member == "" {
			return f
		}
		return f + "." + member
	}
	var f map[string]json.RawMessage
	if err := json.Unmarshal(raw, &f); err != nil || f == nil {
		return plume.Receptor{}, []issue{{at(""), "wrong type: each feature must be a GeoJSON Feature object, got " + jsonKind(raw), kindMalformed}}
	}
	var issues []issue
	if t := jsonString(f["type"]); t != "Feature" {
		issues = append(issues, issue{at("type"), fmt.Sprintf("must be \"Feature\", got %s", shortJSON(f["type"])), kindInvalid})
	}
	var rec plume.Receptor
	issues = append(issues, r.geometry(&rec, f["geometry"], at("geometry"))...)
	issues = append(issues, r.properties(&rec, i, f["properties"], at("properties"))...)
	return rec, issues
}

// geometry reads a feature's Point into rec (x, y or lon, lat).
func (r *featureReader) geometry(rec *plume.Receptor, raw json.RawMessage, at string) []issue {
	if isNull(raw) {
		return []issue{{at, "required: a Point geometry (this feature has none); every receptor is a point", kindInvalid}}
	}
	var g struct {
		Type        string            `json:"type"`
		Coordinates []json.RawMessage `json:"coordinates"`
	}
	if err := json.Unmarshal(raw, &g); err != nil {
		return []issue{{at, "wrong type: must be a GeoJSON Point geometry object: " + err.Error(), kindMalformed}}
	}
	if g.Type != "Point" {
		return []issue{{at + ".type", fmt.Sprintf("must be \"Point\" (every receptor is a point), got %q: convert the layer's features to points first (their centroids, or the well heads)", g.Type), kindInvalid}}
	}
	if len(g.Coordinates) < 2 || len(g.Coordinates) > 3 {
		return []issue{{at + ".coordinates", fmt.Sprintf("must hold 2 numbers (x, y; or longitude, latitude) or 3 (the third, an elevation, is ignored), got %d", len(g.Coordinates)), kindInvalid}}
	}
	var xy [2]float64
	for k := range 2 {
		v, is := numberOf(g.Coordinates[k], fmt.Sprintf("%s.coordinates[%d]", at, k))
		if is != nil {
			return []issue{*is}
		}
		if v == nil {
			return []issue{{fmt.Sprintf("%s.coordinates[%d]", at, k), "wrong type: must be a number, got null", kindMalformed}}
		}
		xy[k] = *v
	}
	if !r.names.lonLat {
		rec.X, rec.Y = plume.Ptr(xy[0]), plume.Ptr(xy[1])
		return nil
	}
	if msg := lonLatMessage(xy[0], xy[1], r.code); msg != "" {
		return []issue{{at + ".coordinates", msg, kindInvalid}}
	}
	rec.Lon, rec.Lat = plume.Ptr(xy[0]), plume.Ptr(xy[1])
	return nil
}

// lonLatMessage explains a longitude or latitude out of range, "" when
// both are in range: most often a layer in projected coordinates read as
// RFC 7946 longitude/latitude because it has no crs member.
func lonLatMessage(lon, lat float64, code string) string {
	if lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90 {
		return ""
	}
	number := "<code>"
	if _, n, err := crs.ParseCode(code); err == nil {
		number = fmt.Sprint(n)
	}
	return fmt.Sprintf("(%g, %g) is not a WGS 84 longitude, latitude: with the scenario's crs, a layer without a crs member is read as RFC 7946 longitude/latitude; if these are site coordinates in %s, add to the layer \"crs\": {\"type\": \"name\", \"properties\": {\"name\": \"urn:ogc:def:crs:EPSG::%s\"}} before its features", lon, lat, code, number)
}

// properties reads a feature's id, depth and screen into rec.
func (r *featureReader) properties(rec *plume.Receptor, i int, raw json.RawMessage, at string) []issue {
	props := map[string]json.RawMessage{}
	if !isNull(raw) {
		if err := json.Unmarshal(raw, &props); err != nil {
			return []issue{{at, "wrong type: must be an object or null, got " + jsonKind(raw), kindMalformed}}
		}
	}
	var issues []issue
	idProp := r.names.idProp
	idAt := at + "." + idProp
	id, is := idOf(props[idProp], idAt, fmt.Sprintf("each feature's id, in its property %q (receptor_id_property names the property)", idProp))
	if is != nil {
		issues = append(issues, *is)
	} else if is := r.checkID(id, i, idAt); is != nil {
		issues = append(issues, *is)
	}
	rec.ID = id
	for _, p := range []struct {
		name string
		dst  **float64
	}{{"z", &rec.Z}, {"screen_top", &rec.ScreenTop}, {"screen_bottom", &rec.ScreenBottom}} {
		v, is := numberOf(props[p.name], at+"."+p.name)
		if is != nil {
			issues = append(issues, *is)
		}
		*p.dst = v
	}
	return issues
}

// checkID refuses an id that is too long or repeats an earlier one.
func (r *featureReader) checkID(id string, i int, at string) *issue {
	return checkLayerID(r.ids, id, i, at, func(j int) string { return fmt.Sprintf("%s.features[%d]", r.names.prefix, j) })
}

// checkLayerID refuses an id over 200 bytes or one that repeats the id of
// an earlier receptor (named by earlier).
func checkLayerID(ids *idSet, id string, i int, at string, earlier func(int) string) *issue {
	if len(id) > maxIDBytes {
		return &issue{at, fmt.Sprintf("at most %d characters, got %d", maxIDBytes, len(id)), kindInvalid}
	}
	if j, dup := ids.add(id, i); dup {
		return &issue{at, fmt.Sprintf("must be unique: %q is also the id of %s", id, earlier(j)), kindInvalid}
	}
	return nil
}

// maxIDBytes is the longest receptor id (the schema's maxLength).
const maxIDBytes = 200

// idOf reads an id: a string, or a number (its text as written); what
// says where it is expected when it is missing.
func idOf(raw json.RawMessage, at, what string) (string, *issue) {
	switch {
	case isNull(raw):
		return "", &issue{at, "required: " + what, kindMissing}
	case raw[0] == '"':
		var s string
		if err := json.Unmarshal(raw, &s); err != nil {
			return "", &issue{at, "wrong type: " + err.Error(), kindMalformed}
		}
		if s == "" {
			return "", &issue{at, "required: " + what + " (it is empty)", kindMissing}
		}
		return s, nil
	case raw[0] == '-' || raw[0] >= '0' && raw[0] <= '9':
		return string(raw), nil
	}
	return "", &issue{at, "wrong type: must be a string or a number, got " + jsonKind(raw), kindMalformed}
}

// numberOf reads an optional number (nil for null or absent).
func numberOf(raw json.RawMessage, at string) (*float64, *issue) {
	if isNull(raw) {
		return nil, nil
	}
	if !(raw[0] == '-' || raw[0] >= '0' && raw[0] <= '9') {
		return nil, &issue{at, "wrong type: must be a number or null, got " + jsonKind(raw), kindMalformed}
	}
	v, err := strconv.ParseFloat(string(raw), 64)
	if err != nil || math.IsInf(v, 0) {
		return nil, &issue{at, "out of range: not a finite 64-bit floating-point number", kindInvalid}
	}
	return &v, nil
}

// isNull reports an absent or null JSON value.
func isNull(raw json.RawMessage) bool {
	raw = bytes.TrimSpace(raw)
	return len(raw) == 0 || string(raw) == "null"
}

// jsonString is a JSON string's value ("" for anything else).
func jsonString(raw json.RawMessage) string {
	var s string
	if json.Unmarshal(raw, &s) != nil {
		return ""
	}
	return s
}

// jsonKind names the JSON type of a value, for messages.
func jsonKind(raw json.RawMessage) string {
	raw = bytes.TrimSpace(raw)
	if len(raw) == 0 {
		return "nothing"
	}
	switch raw[0] {
	case '{':
		return "an object"
	case '[':
		return "an array"
	case '"':
		return "a string"
	case 't', 'f':
		return "a boolean"
	case 'n':
		return "null"
	}
	return "a number"
}

// shortJSON is a value as JSON text, shortened for a message.
func shortJSON(raw json.RawMessage) string {
	s := strings.TrimSpace(string(raw))
	if s == "" {
		return "nothing"
	}
	if len(s) > 40 {
		s = s[:40] + "..."
	}
	return s
}

// layerFrame decides whether a GeoJSON layer's coordinates are longitude,
// latitude (true) or site coordinates (false), from its crs member (raw,
// absent or null for none) and the scenario's crs code (empty for none).
func layerFrame(raw json.RawMessage, scenarioCRS, prefix string) (bool, *issue) {
	if isNull(raw) {
		return scenarioCRS != "", nil
	}
	at, scenAt := prefix+".crs", strings.TrimSuffix(prefix, "receptors")+"crs"
	var c struct {
		Type       string `json:"type"`
		Properties struct {
			Name string `json:"name"`
		} `json:"properties"`
	}
	if err := json.Unmarshal(raw, &c); err != nil || c.Type != "name" || c.Properties.Name == "" {
		return false, &issue{at, `must be {"type": "name", "properties": {"name": "urn:ogc:def:crs:EPSG::<code>"}} (GeoJSON 2008), or left out for RFC 7946 longitude/latitude`, kindInvalid}
	}
	code, lonLat, ok := crsName(c.Properties.Name)
	switch {
	case !ok:
		return false, &issue{at, fmt.Sprintf("names %q, which is neither an EPSG code nor CRS84: name the layer's EPSG code (urn:ogc:def:crs:EPSG::32617) or leave crs out for RFC 7946 longitude/latitude", c.Properties.Name), kindInvalid}
	case lonLat && scenarioCRS == "":
		return false, &issue{scenAt, fmt.Sprintf("required: the receptor layer is in longitude/latitude (its crs member names %s); give the scenario's crs, the projected CRS of the site frame, to place its points", c.Properties.Name), kindMissing}
	case lonLat:
		return true, nil
	case scenarioCRS == "":
		return false, &issue{scenAt, fmt.Sprintf("required: the receptor layer is in %s (its crs member); give the scenario's crs %q so that its coordinates are the site frame's", code, code), kindMissing}
	}
	if want, _, err := crs.ParseCode(scenarioCRS); err == nil && want != code {
		return false, &issue{at, fmt.Sprintf("the layer is in %s but the scenario's site frame is %s: reproject the layer into %s (or into longitude/latitude, leaving crs out)", code, want, want), kindInvalid}
	}
	return false, nil
}

// crsName reads the name of a GeoJSON 2008 crs member: an EPSG code in
// any of its usual spellings ("EPSG:32617", "urn:ogc:def:crs:EPSG::32617",
// "urn:ogc:def:crs:EPSG:9.8:32617", "http://www.opengis.net/def/crs/EPSG/0/32617"),
// or CRS84 (longitude/latitude; also EPSG:4326, whose GeoJSON coordinates
// are longitude first whatever the EPSG axis order).
func crsName(name string) (code string, lonLat, ok bool) {
	n := strings.TrimSpace(name)
	up := strings.ToUpper(n)
	if strings.HasSuffix(up, "CRS84") {
		return "", true, true
	}
	var num string
	switch {
	case strings.HasPrefix(up, "EPSG:"):
		num = n[len("EPSG:"):]
	case strings.HasPrefix(up, "URN:OGC:DEF:CRS:EPSG:"):
		num = n[strings.LastIndexByte(n, ':')+1:]
	case strings.HasPrefix(up, "HTTP://WWW.OPENGIS.NET/DEF/CRS/EPSG/"):
		num = n[strings.LastIndexByte(n, '/')+1:]
	default:
		return "", false, false
	}
	if _, err := strconv.ParseUint(num, 10, 32); err != nil {
		return "", false, false
	}
	code = "EPSG:" + strings.TrimLeft(num, "0")
	return code, code == "EPSG:4326", true
}

// memberKey reads the name of an object's next member.
func memberKey(dec *json.Decoder) (string, error) {
	tok, err := dec.Token()
	if err != nil {
		return "", err
	}
	key, ok := tok.(string)
	if !ok {
		return "", fmt.Errorf("expected a member name, got %v", tok)
	}
	return key, nil
}

// finish reads the rest of a FeatureCollection after its features array:
// its type, when it comes after the features (as a writer that sorts
// members writes it), must be FeatureCollection; a crs member there would
// have changed how the features were read; other members are skipped.
func (r *featureReader) finish() ([]issue, error) {
	at := r.names.prefix
	for r.dec.More() {
		key, err := memberKey(r.dec)
		if err != nil {
			return nil, err
		}
		var raw json.RawMessage
		if err := r.dec.Decode(&raw); err != nil {
			return nil, err
		}
		switch key {
		case "crs":
			return []issue{{at + ".crs", "must come before the features (it says how they are read)", kindInvalid}}, nil
		case "type":
			if is := collectionType(raw, at); is != nil {
				return []issue{*is}, nil
			}
			r.typed = true
		}
	}
	if !r.typed {
		return []issue{{at + ".type", notALayer + `: "type": "FeatureCollection" is required`, kindMissing}}, nil
	}
	_, err := r.dec.Token() // }
	return nil, err
}

// collectionType checks a layer's type member.
func collectionType(raw json.RawMessage, at string) *issue {
	if t := jsonString(raw); t != "FeatureCollection" {
		return &issue{at + ".type", fmt.Sprintf("must be \"FeatureCollection\" (a layer of Point features), got %s", shortJSON(raw)), kindInvalid}
	}
	return nil
}

// openFeatures reads a FeatureCollection from dec up to the start of its
// features array (its "type", and its "crs" member if it has one, must
// come first) and returns the reader of its features. The issues concern
// the collection as a whole (the layer cannot be read); the error is the
// body's.
func openFeatures(dec *json.Decoder, names *layerNames, scenarioCRS string, ids *idSet) (*featureReader, []issue, error) {
	if tok, err := dec.Token(); err != nil {
		return nil, nil, err
	} else if tok != json.Delim('{') {
		return nil, []issue{{names.prefix, notALayer, kindMalformed}}, nil
	}
	return featuresAfterBrace(dec, names, scenarioCRS, ids)
}

// featuresAfterBrace is openFeatures once the collection's '{' is read.
func featuresAfterBrace(dec *json.Decoder, names *layerNames, scenarioCRS string, ids *idSet) (*featureReader, []issue, error) {
	at := names.prefix
	var crsRaw json.RawMessage
	typed := false
	for dec.More() {
		key, err := memberKey(dec)
		if err != nil {
			return nil, nil, err
		}
		var raw json.RawMessage
		if key != "features" {
			if err := dec.Decode(&raw); err != nil {
				return nil, nil, err
			}
		}
		switch key {
		case "features":
			if tok, err := dec.Token(); err != nil {
				return nil, nil, err
			} else if tok != json.Delim('[') {
				return nil, []issue{{at + ".features", "wrong type: must be an array of Point features", kindMalformed}}, nil
			}
			lonLat, is := layerFrame(crsRaw, scenarioCRS, at)
			if is != nil {
				return nil, []issue{*is}, nil
			}
			names.form, names.lonLat = formGeoJSON, lonLat
			return &featureReader{dec: dec, names: names, ids: ids, code: scenarioCRS, typed: typed}, nil, nil
		case "type":
			if is := collectionType(raw, at); is != nil {
				return nil, []issue{*is}, nil
			}
			typed = true
		case "crs":
			crsRaw = raw
		}
	}
	if !typed {
		return nil, []issue{{at, notALayer, kindMalformed}}, nil
	}
	return nil, []issue{{at + ".features", "required: the layer's features (Point features, one per receptor)", kindMissing}}, nil
}

// notALayer says what receptors must be.
const notALayer = "wrong type: must be an array of receptors or a GeoJSON FeatureCollection of Point features"
