package api

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"mime"
	"mime/multipart"
	"strings"

	"downgradient/plume"
)

// receptorInput is a scenario body read in one pass: the members of the
// scenario other than its receptors (head, already read), and its
// receptors, read one at a time by next (io.EOF after the last; issues
// name what is wrong with one receptor; any other error is the body's).
// finish reads what follows the receptors and says what is wrong with it.
type receptorInput struct {
	multipart bool // the body is multipart/form-data (else a JSON scenario)
	head      map[string]json.RawMessage
	names     *layerNames
	next      func() (plume.Receptor, []issue, error)
	finish    func() ([]issue, error)
}

// layerSettings reads from a scenario's members the two that say how to
// read its layer: receptor_id_property (default "id") and crs.
func layerSettings(head map[string]json.RawMessage) (idProp, code string, is *issue) {
	idProp = "id"
	if raw, ok := head["receptor_id_property"]; ok && !isNull(raw) {
		if err := json.Unmarshal(raw, &idProp); err != nil {
			return "", "", &issue{"receptor_id_property", "wrong type: must be a string, got " + jsonKind(raw), kindMalformed}
		}
		if idProp == "" || len(idProp) > maxIDBytes {
			return "", "", &issue{"receptor_id_property", fmt.Sprintf("must name a property of 1 to %d characters", maxIDBytes), kindInvalid}
		}
	}
	if raw, ok := head["crs"]; ok && !isNull(raw) {
		_ = json.Unmarshal(raw, &code) // a crs of the wrong type is the schema's to name
	}
	return idProp, code, nil
}

// openJSONScenario reads a scenario object from dec up to its receptors,
// which must be its last member (a streamed body is read in one pass):
// an array of receptor objects or a GeoJSON layer.
func openJSONScenario(dec *json.Decoder, prefix string) (*receptorInput, []issue, error) {
	if tok, err := dec.Token(); err != nil {
		return nil, nil, err
	} else if tok != json.Delim('{') {
		return nil, []issue{{"", "wrong type: the body must be a JSON object (a scenario)", kindMalformed}}, nil
	}
	head := map[string]json.RawMessage{}
	found := false
	for dec.More() {
		key, err := memberKey(dec)
		if err != nil {
			return nil, nil, err
		}
		if key == "receptors" {
			found = true
			break
		}
		var raw json.RawMessage
		if err := dec.Decode(&raw); err != nil {
			return nil, nil, err
		}
		if _, dup := head[key]; dup {
			return nil, []issue{{key, "given twice: give each member once", kindMalformed}}, nil
		}
		head[key] = raw
	}
	if !found {
		return nil, []issue{{prefix, "required: the receptors (an array, or a GeoJSON layer), as the scenario's last member", kindMissing}}, nil
	}
	idProp, code, is := layerSettings(head)
	if is != nil {
		return nil, []issue{*is}, nil
	}
	names := &layerNames{prefix: prefix, idProp: idProp}
	ids := newIDSet()
	tok, err := dec.Token()
	if err != nil {
		return nil, nil, err
	}
	in := &receptorInput{head: head, names: names}
	switch tok {
	case json.Delim('['):
		ar := &arrayReader{dec: dec, names: names, ids: ids}
		dec.DisallowUnknownFields()
		in.next = ar.next
		in.finish = func() ([]issue, error) { return endScenario(dec, prefix) }
	case json.Delim('{'):
		fr, issues, err := featuresAfterBrace(dec, names, code, ids)
		if err != nil || len(issues) > 0 {
			return nil, issues, err
		}
		in.next = fr.next
		in.finish = func() ([]issue, error) {
			if issues, err := fr.finish(); err != nil || len(issues) > 0 {
				return issues, err
			}
			return endScenario(dec, prefix)
		}
	default:
		return nil, []issue{{prefix, "wrong type: must be an array of receptors or a GeoJSON FeatureCollection", kindMalformed}}, nil
	}
	return in, nil, nil
}

// endScenario reads the end of a streamed scenario after its receptors:
// no member may follow them, and nothing may follow the object.
func endScenario(dec *json.Decoder, prefix string) ([]issue, error) {
	if dec.More() {
		key, err := memberKey(dec)
		if err != nil {
			return nil, err
		}
		return []issue{{key, fmt.Sprintf("comes after %s: in a streamed scenario the receptors must be the last member (everything else is needed before the first receptor is screened)", prefix), kindInvalid}}, nil
	}
	if _, err := dec.Token(); err != nil { // }
		return nil, err
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		if err != nil {
			return nil, err
		}
		return []issue{{"", "malformed JSON: data after the scenario object", kindMalformed}}, nil
	}
	return nil, nil
}

// arrayReader reads a JSON array of receptor objects one at a time, with
// the schema's rules for each (known members of the right types, an id of
// at most 200 characters) and unique ids.
type arrayReader struct {
	dec   *json.Decoder // with DisallowUnknownFields
	names *layerNames
	ids   *idSet
	i     int
	done  bool
}

func (r *arrayReader) next() (plume.Receptor, []issue, error) {
	if err := arrayEnd(r.dec, &r.done); err != nil {
		return plume.Receptor{}, nil, err
	}
	i := r.i
	r.i++
	at := fmt.Sprintf("%s[%d]", r.names.prefix, i)
	var rec plume.Receptor
	if err := r.dec.Decode(&rec); err != nil {
		if is := receptorDecodeIssue(err, at); is != nil {
			return plume.Receptor{}, []issue{*is}, nil
		}
		return plume.Receptor{}, nil, err
	}
	if rec.ID != "" {
		if is := checkLayerID(r.ids, rec.ID, i, at+".id", func(j int) string { return fmt.Sprintf("%s[%d]", r.names.prefix, j) }); is != nil {
			return rec, []issue{*is}, nil
		}
	}
	return rec, nil, nil
}

// receptorDecodeIssue names a receptor that decodes but breaks the
// schema (a value of the wrong type, a number out of range, an unknown
// member); nil for an error of the body itself.
func receptorDecodeIssue(err error, at string) *issue {
	var ute *json.UnmarshalTypeError
	if errors.As(err, &ute) {
		field := joinFieldPath(at, jsonFieldPath(ute.Field))
		if strings.HasPrefix(ute.Value, "number") {
			return &issue{field, "out of range: not a finite 64-bit floating-point number", kindInvalid}
		}
		if ute.Field == "" {
			return &issue{at, "wrong type: each receptor must be an object, got " + ute.Value, kindMalformed}
		}
		return &issue{field, fmt.Sprintf("wrong type: must be %s, got %s", ute.Type, ute.Value), kindMalformed}
	}
	if msg := err.Error(); strings.HasPrefix(msg, `json: unknown field "`) {
		name := strings.TrimSuffix(strings.TrimPrefix(msg, `json: unknown field "`), `"`)
		return &issue{joinFieldPath(at, name), "unknown field; check the spelling against the OpenAPI document", kindInvalid}
	}
	return nil
}

// Multipart bodies of POST /v1/screenings: a part "scenario" (the
// scenario as JSON, without receptors) first, then a part "receptors" (a
// CSV table, or a GeoJSON layer when the part's Content-Type is
// application/geo+json or application/json, or its first character is
// "{"). Nothing may follow.

// openMultipart reads a multipart body's scenario part (at most
// maxScenario bytes) and opens its receptors part.
func openMultipart(body io.Reader, boundary string, maxScenario int64) (*receptorInput, []issue, error) {
	mr := multipart.NewReader(body, boundary)
	part, err := mr.NextPart()
	if errors.Is(err, io.EOF) {
		return nil, []issue{{"scenario", "required: a part named scenario (the scenario as JSON), then a part named receptors", kindMissing}}, nil
	}
	if err != nil {
		return nil, nil, err
	}
	if part.FormName() != "scenario" {
		return nil, []issue{{"scenario", fmt.Sprintf("required as the first part: a part named scenario (the scenario as JSON), then a part named receptors; the first part is named %q", part.FormName()), kindMissing}}, nil
	}
	b, err := io.ReadAll(io.LimitReader(part, maxScenario+1))
	if err != nil {
		return nil, nil, err
	}
	if int64(len(b)) > maxScenario {
		return nil, []issue{{"scenario", fmt.Sprintf("the scenario part is over %d bytes", maxScenario), kindTooLarge}}, nil
	}
	if p := checkJSONSyntax(b); p != nil {
		fps := p.Errors
		if len(fps) == 0 {
			fps = []FieldProblem{{Message: p.Detail}}
		}
		return nil, []issue{{"scenario", "the scenario part: " + fps[0].Message, kindMalformed}}, nil
	}
	var head map[string]json.RawMessage
	if err := json.Unmarshal(b, &head); err != nil || head == nil {
		return nil, []issue{{"scenario", "wrong type: the scenario part must be a JSON object", kindMalformed}}, nil
	}
	if _, ok := head["receptors"]; ok {
		return nil, []issue{{"receptors", "given in the scenario part: give the receptors in the part named receptors only", kindInvalid}}, nil
	}
	rp, err := mr.NextPart()
	if errors.Is(err, io.EOF) {
		return nil, []issue{{"receptors", "required: a part named receptors (a CSV table or a GeoJSON layer) after the scenario part", kindMissing}}, nil
	}
	if err != nil {
		return nil, nil, err
	}
	if rp.FormName() != "receptors" {
		return nil, []issue{{"receptors", fmt.Sprintf("required as the second part: a part named receptors; got a part named %q", rp.FormName()), kindMissing}}, nil
	}
	in, issues, err := openReceptorPart(rp, head)
	if err != nil || len(issues) > 0 {
		return nil, issues, err
	}
	in.multipart = true
	finish := in.finish
	in.finish = func() ([]issue, error) {
		if issues, err := finish(); err != nil || len(issues) > 0 {
			return issues, err
		}
		switch extra, err := mr.NextPart(); {
		case errors.Is(err, io.EOF):
			return nil, nil
		case err != nil:
			return nil, err
		default:
			return []issue{{extra.FormName(), "unknown part: send a part scenario, then a part receptors, and nothing else", kindInvalid}}, nil
		}
	}
	return in, nil, nil
}

// openReceptorPart opens the receptors part as CSV or GeoJSON.
func openReceptorPart(part *multipart.Part, head map[string]json.RawMessage) (*receptorInput, []issue, error) {
	idProp, code, is := layerSettings(head)
	if is != nil {
		return nil, []issue{*is}, nil
	}
	names := &layerNames{prefix: "receptors", idProp: idProp}
	ids := newIDSet()
	br := bufio.NewReaderSize(part, 64<<10)
	if !isGeoJSONPart(part.Header.Get("Content-Type"), br) {
		cr, issues, err := openCSV(br, names, ids)
		if err != nil || len(issues) > 0 {
			return nil, issues, err
		}
		return &receptorInput{head: head, names: names, next: cr.next, finish: func() ([]issue, error) { return nil, nil }}, nil, nil
	}
	dec := json.NewDecoder(br)
	fr, issues, err := openFeatures(dec, names, code, ids)
	if err != nil || len(issues) > 0 {
		return nil, issues, err
	}
	return &receptorInput{head: head, names: names, next: fr.next, finish: func() ([]issue, error) {
		if issues, err := fr.finish(); err != nil || len(issues) > 0 {
			return issues, err
		}
		if _, err := dec.Token(); !errors.Is(err, io.EOF) {
			if err != nil {
				return nil, err
			}
			return []issue{{"receptors", "malformed JSON: data after the layer", kindMalformed}}, nil
		}
		return nil, nil
	}}, nil, nil
}

// isGeoJSONPart says whether a receptors part is a GeoJSON layer: by its
// Content-Type, else by its first character.
func isGeoJSONPart(contentType string, br *bufio.Reader) bool {
	if mt, _, err := mime.ParseMediaType(contentType); err == nil {
		switch {
		case mt == mimeGeoJSON || mt == "application/json":
			return true
		case mt == mimeCSV || strings.HasPrefix(mt, "text/"):
			return false
		}
	}
	for n := 1; n <= 64; n++ {
		b, err := br.Peek(n)
		if len(b) < n || err != nil {
			return false
		}
		switch c := b[n-1]; {
		case c == ' ' || c == '\t' || c == '\r' || c == '\n':
			continue
		case n == 1 && c == 0xef: // a UTF-8 byte-order mark: CSV from a spreadsheet
			return false
		default:
			return c == '{'
		}
	}
	return false
}

// problemFromIssues is the problem of a body's issues (at most the first
// maxLayerIssues are listed): 400 when any is a wrong type or unparseable,
// else 413 when one is over a limit, else 422 (missing-input when all are
// missing values).
func problemFromIssues(issues []issue, detail string) *Problem {
	kind := issuesKind(issues)
	fps := make([]FieldProblem, 0, len(issues))
	for _, is := range issues {
		fps = append(fps, FieldProblem{Field: is.field, Message: is.message})
	}
	if kind == kindInvalid {
		kind = invalidKind(fps)
	}
	return newProblem(kind, fmt.Sprintf("%s: %d problem(s)", detail, len(fps)), fps...)
}

// maxLayerIssues is the most problems of a layer listed at once.
const maxLayerIssues = 100

// layerReceptor is a receptor as the array form writes it: members not
// given are left out (x and y of a receptor given by lon and lat).
type layerReceptor struct {
	ID           string   `json:"id,omitempty"`
	X            *float64 `json:"x,omitempty"`
	Y            *float64 `json:"y,omitempty"`
	Lon          *float64 `json:"lon,omitempty"`
	Lat          *float64 `json:"lat,omitempty"`
	Z            *float64 `json:"z,omitempty"`
	ScreenTop    *float64 `json:"screen_top,omitempty"`
	ScreenBottom *float64 `json:"screen_bottom,omitempty"`
}

// collectLayer reads every receptor of in (a body already in memory), with
// the issues of all of them (up to maxLayerIssues) and of what follows.
func collectLayer(in *receptorInput) ([]layerReceptor, []issue, error) {
	out := []layerReceptor{}
	var issues []issue
	for len(issues) < maxLayerIssues {
		r, is, err := in.next()
		if errors.Is(err, io.EOF) {
			more, err := in.finish()
			return out, append(issues, more...), err
		}
		if err != nil {
			return nil, issues, err
		}
		issues = append(issues, is...)
		out = append(out, layerReceptor{ID: r.ID, X: r.X, Y: r.Y, Lon: r.Lon, Lat: r.Lat, Z: r.Z, ScreenTop: r.ScreenTop, ScreenBottom: r.ScreenBottom})
	}
	return out, issues[:maxLayerIssues], nil
}

// bodyDecodeProblem is the problem of a body in memory that one-pass
// reading could not parse.
func bodyDecodeProblem(err error, body []byte) *Problem {
	var se *json.SyntaxError
	switch {
	case errors.As(err, &se):
		return newProblem(kindMalformed, "malformed JSON: "+se.Error(),
			FieldProblem{Field: "", Message: "syntax error at " + lineCol(body, se.Offset) + ": " + se.Error()})
	case errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF):
		return newProblem(kindMalformed, "malformed body: it ends early", FieldProblem{Field: "", Message: "unexpected end of the body"})
	}
	return newProblem(kindMalformed, "malformed body: "+err.Error(), FieldProblem{Field: "", Message: err.Error()})
}

// mayHoldLayer reports whether body can hold a receptor layer or a
// receptor_id_property: whether the bytes "receptor_id_property" occur, or
// some "receptors" is followed (after white space and a colon) by an
// object. A cheap scan of the raw bytes, so that the usual body (an array
// of receptors) is not parsed a second time; a false positive only costs
// that parse. (A key spelt with escapes, "receptor\u0073", is not
// recognised: its layer then fails the schema check, which names it.)
func mayHoldLayer(body []byte) bool {
	if bytes.Contains(body, []byte(`"receptor_id_property"`)) {
		return true
	}
	key := []byte(`"receptors"`)
	for rest := body; ; {
		i := bytes.Index(rest, key)
		if i < 0 {
			return false
		}
		rest = bytes.TrimLeft(rest[i+len(key):], " \t\r\n")
		if len(rest) > 0 && rest[0] == ':' {
			if v := bytes.TrimLeft(rest[1:], " \t\r\n"); len(v) > 0 && v[0] == '{' {
				return true
			}
		}
	}
}

// normalizeLayer rewrites a scenario body (a request in memory, not
// streamed) whose receptors are a GeoJSON layer into the array form, and
// drops receptor_id_property, so that the schema check, the domain's rules
// and the handlers see one form. at is the member holding the scenario
// ("" for the body itself). The names map the array's field paths back to
// the layer's; nil when the body is left as it is.
func normalizeLayer(body []byte, at string) ([]byte, *layerNames, *Problem) {
	if !mayHoldLayer(body) {
		return body, nil, nil
	}
	var top map[string]json.RawMessage
	if json.Unmarshal(body, &top) != nil || top == nil {
		return body, nil, nil // the schema check names what is wrong
	}
	scen, prefix := top, "receptors"
	if at != "" {
		if json.Unmarshal(top[at], &scen) != nil || scen == nil {
			return body, nil, nil
		}
		prefix = at + ".receptors"
	}
	raw, hasID := scen["receptors"], scen["receptor_id_property"] != nil
	layer := len(bytes.TrimSpace(raw)) > 0 && bytes.TrimSpace(raw)[0] == '{'
	if !layer && !hasID {
		return body, nil, nil
	}
	var names *layerNames
	if layer {
		idProp, code, is := layerSettings(scen)
		if is != nil {
			is.field = joinFieldPath(at, is.field)
			return nil, nil, problemFromIssues([]issue{*is}, "the receptor layer cannot be read")
		}
		names = &layerNames{prefix: prefix, idProp: idProp}
		dec := json.NewDecoder(bytes.NewReader(raw))
		fr, issues, err := openFeatures(dec, names, code, newIDSet())
		if err != nil {
			return nil, nil, bodyDecodeProblem(err, raw)
		}
		if len(issues) > 0 {
			return nil, nil, problemFromIssues(issues, "the receptor layer cannot be read")
		}
		in := &receptorInput{names: names, next: fr.next, finish: func() ([]issue, error) { return fr.finish() }}
		rs, issues, err := collectLayer(in)
		if err != nil {
			return nil, nil, bodyDecodeProblem(err, raw)
		}
		if len(issues) > 0 {
			return nil, nil, problemFromIssues(issues, "the receptor layer has bad features")
		}
		if scen["receptors"], err = json.Marshal(rs); err != nil {
			return nil, nil, newProblem(kindInternal, "the layer could not be re-encoded")
		}
	}
	delete(scen, "receptor_id_property")
	out, err := remarshal(top, scen, at)
	if err != nil {
		return nil, nil, newProblem(kindInternal, "the layer could not be re-encoded")
	}
	return out, names, nil
}

// remarshal encodes the body with its scenario (at: its member, "" for the
// body itself) replaced.
func remarshal(top, scen map[string]json.RawMessage, at string) ([]byte, error) {
	if at == "" {
		return json.Marshal(scen)
	}
	b, err := json.Marshal(scen)
	if err != nil {
		return nil, err
	}
	top[at] = b
	return json.Marshal(top)
}

// multipartBody turns a multipart body in memory (POST /v1/screenings, not
// streamed) into the JSON scenario it stands for, with its receptors as an
// array; the names map the array's paths back to the layer's rows or
// features.
func multipartBody(body []byte, boundary string, maxScenario int64) ([]byte, *layerNames, *Problem) {
	in, issues, err := openMultipart(bytes.NewReader(body), boundary, maxScenario)
	if err != nil {
		return nil, nil, multipartProblem(err)
	}
	if len(issues) > 0 {
		return nil, nil, problemFromIssues(issues, "the multipart body cannot be read")
	}
	in.names.lines = []int{}
	rs, issues, err := collectLayer(in)
	if err != nil {
		return nil, nil, multipartProblem(err)
	}
	if len(issues) > 0 {
		return nil, nil, problemFromIssues(issues, "the receptor layer has bad rows")
	}
	if in.head["receptors"], err = json.Marshal(rs); err != nil {
		return nil, nil, newProblem(kindInternal, "the layer could not be re-encoded")
	}
	delete(in.head, "receptor_id_property")
	out, err := json.Marshal(in.head)
	if err != nil {
		return nil, nil, newProblem(kindInternal, "the layer could not be re-encoded")
	}
	return out, in.names, nil
}

// multipartProblem is the problem of a multipart body that does not parse.
func multipartProblem(err error) *Problem {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return newProblem(kindMalformed, "malformed JSON in the receptors part: "+se.Error(), FieldProblem{Field: "receptors", Message: se.Error()})
	}
	return newProblem(kindMalformed, "malformed multipart body: "+err.Error(), FieldProblem{Field: "", Message: err.Error()})
}

// arrayEnd reports io.EOF once dec has no more elements in the array it is
// reading (consuming the closing bracket the first time, and marking done);
// nil while elements remain; any other error is the body's.
func arrayEnd(dec *json.Decoder, done *bool) error {
	if !*done && dec.More() {
		return nil
	}
	if !*done {
		*done = true
		if _, err := dec.Token(); err != nil { // ]
			return err
		}
	}
	return io.EOF
}
