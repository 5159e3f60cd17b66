package api

import (
	"bytes"
	"encoding/csv"
	"strings"

	"downgradient/plume"
)

// streamEncoder writes one format of a streamed screening: what comes
// before the receptors, the receptors of one part (in a worker, so that
// encoding runs on every core too), what comes after them, and the
// in-band error of a stream that fails after its first byte.
type streamEncoder interface {
	contentType() string
	begin(head plume.Result) ([]byte, error)
	part(l *plume.Layer, sc plume.Scenario, rs []plume.Receptor, first int, part *plume.Result) ([]byte, error)
	// sep goes between the output of two parts.
	sep() string
	end(tail plume.Result) ([]byte, error)
	fail(p *Problem) []byte
}

// newStreamEncoder is the encoder of a streamed format.
func newStreamEncoder(f outputFormat) streamEncoder {
	switch f {
	case formatCSV:
		return csvStream{}
	case formatGeoJSON:
		return geoJSONStream{}
	}
	return ndjsonStream{}
}

// Records of an NDJSON stream: one JSON document per line, told apart by
// their "record" member.
type (
	// streamHeadRecord is the first line: what is known before the first
	// receptor.
	streamHeadRecord struct {
		Record  string        `json:"record"` // "header"
		Engine  streamEngine  `json:"engine"`
		Units   plume.Units   `json:"units"`
		CRS     string        `json:"crs,omitempty"`
		Derived plume.Derived `json:"derived"`
	}
	// streamEngine is the engine without the input hash, which covers
	// every receptor and comes in the last line.
	streamEngine struct {
		Version string `json:"version"`
	}
	// streamEndRecord is the last line of a stream that completed.
	streamEndRecord struct {
		Record               string                 `json:"record"` // "end"
		Engine               plume.Engine           `json:"engine"`
		Summary              plume.Summary          `json:"summary"`
		Transects            []plume.TransectResult `json:"transects,omitempty"`
		AllowableScaleFactor *plume.Allowance       `json:"allowable_scale_factor,omitempty"`
		// The result-wide caveats (each receptor's own are in its line).
		Caveats []plume.Caveat `json:"caveats"`
	}
	// streamErrorRecord is the last line of a stream that failed after
	// its first line.
	streamErrorRecord struct {
		Record string   `json:"record"` // "error"
		Error  *Problem `json:"error"`
	}
)

type ndjsonStream struct{}

func (ndjsonStream) contentType() string { return mimeNDJSON }
func (ndjsonStream) sep() string         { return "" }

func (ndjsonStream) begin(h plume.Result) ([]byte, error) {
	return marshalJSON(streamHeadRecord{Record: "header", Engine: streamEngine{h.Engine.Version}, Units: h.Units, CRS: h.CRS, Derived: h.Derived})
}

// part writes one line per receptor: {"record": "receptor", "index": i,
// the receptor's members as in the JSON result, "caveat_codes": "...",
// "caveats": [its own caveats]}.
func (ndjsonStream) part(l *plume.Layer, _ plume.Scenario, _ []plume.Receptor, first int, part *plume.Result) ([]byte, error) {
	var buf bytes.Buffer
	own := l.OwnCaveats(part)
	for k, rr := range part.Receptors {
		b, err := marshalJSON(part.Receptors[k].JSON())
		if err != nil {
			return nil, err
		}
		b = bytes.TrimRight(b, "\n")
		var mine []plume.Caveat
		for len(own) > 0 && own[0].ReceptorID == rr.ID {
			mine, own = append(mine, own[0]), own[1:]
		}
		if mine == nil {
			mine = []plume.Caveat{}
		}
		codes, err := marshalJSON(strings.Join(part.CaveatCodes(rr.ID), ";"))
		if err != nil {
			return nil, err
		}
		cav, err := marshalJSON(mine)
		if err != nil {
			return nil, err
		}
		buf.WriteString(`{"record":"receptor","index":`)
		buf.WriteString(formatNumber(float64(first + k)))
		buf.WriteByte(',')
		buf.Write(b[1 : len(b)-1])
		buf.WriteString(`,"caveat_codes":`)
		buf.Write(bytes.TrimRight(codes, "\n"))
		buf.WriteString(`,"caveats":`)
		buf.Write(bytes.TrimRight(cav, "\n"))
		buf.WriteString("}\n")
	}
	return buf.Bytes(), nil
}

func (ndjsonStream) end(t plume.Result) ([]byte, error) {
	return marshalJSON(streamEndRecord{Record: "end", Engine: t.Engine, Summary: t.Summary, Transects: t.Transects,
		AllowableScaleFactor: t.AllowableScaleFactor, Caveats: t.Caveats})
}

func (ndjsonStream) fail(p *Problem) []byte {
	b, _ := marshalJSON(streamErrorRecord{Record: "error", Error: p})
	return b
}

// geoJSONStream writes the FeatureCollection of the answer as it is
// computed: type and features first, the foreign members after the
// features (coordinate_frame, units, engine with the input hash, derived,
// summary, transects, allowable_scale_factor and the result-wide caveats).
type geoJSONStream struct{}

func (geoJSONStream) contentType() string { return mimeGeoJSON }
func (geoJSONStream) sep() string         { return ",\n" }

func (geoJSONStream) begin(plume.Result) ([]byte, error) {
	return []byte(`{"type":"FeatureCollection","features":[` + "\n"), nil
}

func (geoJSONStream) part(_ *plume.Layer, sc plume.Scenario, _ []plume.Receptor, _ int, part *plume.Result) ([]byte, error) {
	var frame string
	fb := newFeatureBuilder(sc, part, &frame)
	var buf bytes.Buffer
	for i := range part.Receptors {
		b, err := marshalJSON(fb.feature(i))
		if err != nil {
			return nil, err
		}
		if i > 0 {
			buf.WriteString(",\n")
		}
		buf.Write(bytes.TrimRight(b, "\n"))
	}
	return buf.Bytes(), nil
}

// streamGeoJSONTail is what follows a streamed collection's features.
type streamGeoJSONTail struct {
	CoordinateFrame      string                 `json:"coordinate_frame"`
	Units                plume.Units            `json:"units"`
	Engine               plume.Engine           `json:"engine"`
	Derived              plume.Derived          `json:"derived"`
	Summary              plume.Summary          `json:"summary"`
	Transects            []plume.TransectResult `json:"transects,omitempty"`
	AllowableScaleFactor *plume.Allowance       `json:"allowable_scale_factor,omitempty"`
	Caveats              []plume.Caveat         `json:"caveats"`
}

func (geoJSONStream) end(t plume.Result) ([]byte, error) {
	tail := streamGeoJSONTail{Units: t.Units, Engine: t.Engine, Derived: t.Derived, Summary: t.Summary,
		Transects: t.Transects, AllowableScaleFactor: t.AllowableScaleFactor, Caveats: t.Caveats}
	geoFrame(t.CRS, t.Units, &tail.CoordinateFrame)
	b, err := marshalJSON(tail)
	if err != nil {
		return nil, err
	}
	return append([]byte("\n],"), b[1:]...), nil
}

func (geoJSONStream) fail(p *Problem) []byte {
	b, _ := marshalJSON(p)
	return append(append([]byte("\n],\"error\":"), bytes.TrimRight(b, "\n")...), "}\n"...)
}

// csvStream writes the long-format table as it is computed; each row's
// input_sha256 cell is empty (the hash covers every receptor: it comes in
// the trailer X-Input-SHA256).
type csvStream struct{}

func (csvStream) contentType() string { return mimeCSV + "; charset=utf-8; header=present" }
func (csvStream) sep() string         { return "" }

func (csvStream) begin(h plume.Result) ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(csvHeader(h.Units))
	w.Flush()
	return buf.Bytes(), w.Error()
}

func (csvStream) part(_ *plume.Layer, sc plume.Scenario, rs []plume.Receptor, _ int, part *plume.Result) ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	rw := newCSVRowWriter(w, sc, part, "")
	for i := range part.Receptors {
		rw.receptor(i, rs[i].X, rs[i].Y)
	}
	w.Flush()
	if !rw.finite {
		return nil, &plume.Error{Kind: plume.KindInternal, Detail: "the result could not be encoded"}
	}
	return buf.Bytes(), w.Error()
}

func (csvStream) end(plume.Result) ([]byte, error) { return nil, nil }
func (csvStream) fail(*Problem) []byte             { return nil }
