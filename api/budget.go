package api

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"sync"

	"downgradient/plume"
	"downgradient/plume/maps"
)

// DefaultMaxOutputBytes is the default largest answer, 32 MiB: with the
// default slots this keeps the memory of the computing requests (result,
// encoded answer and collector slack) within a few hundred MiB. Larger
// layers will stream (see the GIS issue); until then split the request.
const DefaultMaxOutputBytes = 32 << 20

// The output budget: every computing handler estimates the size of its
// answer from the decoded request, before any work, as an upper bound
// (receptors x times x methods x bytes per value, per format), and answers
// 413 naming what to reduce when it is over Config.MaxOutputBytes. The
// encoders then hold the same limit as a hard cap, so that an estimate
// that is ever short still cannot make an answer larger than the budget.
//
// The bounds below count every number at its longest shortest-round-trip
// form (numBytes), every receptor id as if it needed escaping throughout
// and an allowance per receptor for its caveats; times are counted at
// their actual printed length. TestOutputEstimatesBound checks them
// against encoded answers.
const (
	numBytes      = 24       // "-1.2345678901234567e-100"
	fixedBytes    = 16 << 10 // engine, units, derived parameters, general caveats, grid report
	receptorBytes = 2500     // one receptor's fixed members, steady state, peak and caveats (JSON)
	summaryBytes  = 150 + 9*numBytes
	csvCodeBytes  = 300 // the caveat codes of a CSV row
)

// shape counts what a screening-like answer holds.
type shape struct {
	receptors int
	idBytes   int // sum of the receptor ids' lengths
	xyBytes   int // sum of the printed receptor x and y
	times     int
	timeBytes int // sum of the printed times' lengths
	methods   int
}

func shapeOf(sc plume.Scenario, methods int) shape {
	sh := shape{receptors: len(sc.Receptors), times: len(sc.Times), methods: methods}
	for i, r := range sc.Receptors {
		sh.idBytes += max(len(r.ID), len(fmt.Sprintf("R%d", i+1)))
		for _, v := range []*float64{r.X, r.Y} {
			if v != nil {
				sh.xyBytes += len(formatNumber(*v))
			}
		}
	}
	for _, t := range sc.Times {
		sh.timeBytes += len(formatNumber(t))
	}
	return sh
}

// scenarioMethods is the number of methods a screening of sc reports.
func scenarioMethods(sc plume.Scenario) int {
	if len(sc.Methods) == 0 {
		return len(plume.AllMethods)
	}
	return len(sc.Methods)
}

// compoundCount is the number of compounds of sc (contaminants[], else one).
func compoundCount(sc plume.Scenario) float64 { return float64(max(len(sc.Contaminants), 1)) }

// screeningSize bounds the size of a screening's answer in format, bytes.
func screeningSize(sc plume.Scenario, format outputFormat) float64 {
	sh := shapeOf(sc, scenarioMethods(sc))
	r, t, m := float64(sh.receptors), float64(sh.times), float64(sh.methods)
	ids, tb := float64(sh.idBytes), float64(sh.timeBytes)
	if format == formatCSV {
		// One row per receptor, time (and steady) and method: the id (quoted
		// and escaped), x and y as given, z, plume_x, plume_y, the time,
		// the method, the value, the status, the level, the flag, six
		// source bounds, the caveat codes, the engine version and the
		// input hash.
		perRow := float64(11*(numBytes+1) + 10 + 24 + 6 + csvCodeBytes + 64 + 64 + 10 + 40)
		rowsPerReceptor := (t + 1) * m * compoundCount(sc) // a row per compound too (its name in a column)
		return fixedBytes + rowsPerReceptor*(2*ids+3*r+float64(sh.xyBytes)+perRow*r) + m*r*tb
	}
	// JSON: per receptor its members and caveats; per time a point of
	// {"time": t} plus one "method": value per method.
	size := fixedBytes + r*receptorBytes + 8*ids + r*(t*(12+(12+numBytes)*m)+tb)
	if format == formatGeoJSON {
		// Geometry, site and flattened properties, and one attribute per
		// method and time (and steady) named with the time and the units.
		k := compoundCount(sc) // per-compound attribute columns
		size += r*(1000+4*numBytes)*k + r*(t+1)*m*k*(60+numBytes) + r*m*k*tb
	}
	return size
}

// uncertaintySize bounds the size of an uncertainty answer, bytes: per
// receptor one summary per time and method, per method at steady state
// and one for the peak, and the drivers.
func uncertaintySize(sc plume.Scenario, methods, params int, format outputFormat) float64 {
	sh := shapeOf(sc, methods)
	r, t, m := float64(sh.receptors), float64(sh.times), float64(sh.methods)
	ids, tb, p := float64(sh.idBytes), float64(sh.timeBytes), float64(params)
	summaries := r * (t*m + m + 1)
	if format == formatCSV {
		perRow := float64(14*(numBytes+1) + 10 + 10)
		return fixedBytes + (t*m+m+1)*(2*ids+3*r+float64(sh.xyBytes)) + summaries*perRow + m*r*tb
	}
	size := fixedBytes + p*600 + r*receptorBytes + 8*ids + summaries*summaryBytes + m*r*tb + r*p*(100+numBytes)
	if format == formatGeoJSON {
		size += r * (800 + 12*numBytes)
	}
	return size
}

// mapSize bounds the size of a plume map's answer, bytes. The node count
// is at most the budget asked for (MaxMapCells with a spacing); the
// outlines are bounded by a plume's shape (each level crosses a row or a
// column of nodes a few times), the hard cap covering anything stranger.
func mapSize(mo maps.MapOptions, format string) float64 {
	nodes := float64(maps.DefaultMapCells)
	switch {
	case mo.Spacing != nil:
		nodes = maps.MaxMapCells
	case mo.Cells != nil:
		nodes = float64(*mo.Cells)
	}
	levels := float64(max(len(mo.Levels), 3))
	switch format {
	case "csv":
		return fixedBytes + nodes*(3*(numBytes+1))
	case "grid":
		return fixedBytes + nodes*(numBytes+1)
	}
	side := 2 * (math.Sqrt(nodes) + 1)
	return fixedBytes + levels*(800+16*side*(2*numBytes+4))
}

// fitSize bounds an attenuation or calibration answer: per observation its
// point or residual; a calibration also echoes the fitted scenario (at
// most the body's size, twice for escaping) and its screening.
func fitSize(observations int, body []byte, fitted *plume.Scenario) float64 {
	size := fixedBytes + float64(observations)*(400+8*numBytes)
	if fitted != nil {
		size += 2*float64(len(body)) + screeningSize(*fitted, formatJSON)
	}
	return size
}

// formatName is the media type of a screening format, for messages.
var formatName = map[outputFormat]string{formatJSON: "application/json", formatCSV: "text/csv", formatGeoJSON: "application/geo+json"}

// checkOutput answers 413 when an answer estimated at size bytes is over
// the output budget, naming the fields (JSON paths) whose counts make it.
func (s *server) checkOutput(size float64, media string, fields ...string) *Problem {
	limit := float64(s.cfg.MaxOutputBytes)
	if size <= limit {
		return nil
	}
	msg := fmt.Sprintf("the answer as %s would be up to %s; at most %s per response: ask for fewer %s (split the request)",
		media, fmtBytes(size), fmtBytes(limit), strings.Join(fields, ", "))
	fps := make([]FieldProblem, len(fields))
	for i, f := range fields {
		fps[i] = FieldProblem{Field: f, Message: msg}
	}
	return newProblem(kindTooLarge, "the answer would be over the output budget: "+msg, fps...)
}

// fmtBytes writes a size in MB or MiB for a message.
func fmtBytes(b float64) string {
	if b >= 1<<20 {
		return fmt.Sprintf("%.1f MiB", b/(1<<20))
	}
	return fmt.Sprintf("%.0f KiB", b/(1<<10))
}

// errOutputOver is the error of an encoder whose answer passed the hard cap.
var errOutputOver = errors.New("the answer is over the output budget")

// cappedBuffer is a buffer that refuses to grow past limit bytes.
type cappedBuffer struct {
	*bytes.Buffer
	limit int
}

// Write appends p, or fails with errOutputOver past the limit.
func (b *cappedBuffer) Write(p []byte) (int, error) {
	if b.Len()+len(p) > b.limit {
		return 0, errOutputOver
	}
	return b.Buffer.Write(p)
}

// answerBuffers holds the buffers of JSON answers between requests: an
// answer is encoded into one, written to the client by send, and the
// buffer is given back (free) once the last byte is written, so that a
// steady stream of requests reuses a few buffers instead of growing a new
// one (about 30 kB of garbage per demo answer) each time.
var answerBuffers = sync.Pool{New: func() any { return new(bytes.Buffer) }}

// maxPooledAnswer is the largest buffer kept for reuse; larger ones (rare,
// large layers and maps) are left to the garbage collector.
const maxPooledAnswer = 1 << 20

// freeAnswer gives buf back to answerBuffers.
func freeAnswer(buf *bytes.Buffer) {
	if buf.Cap() <= maxPooledAnswer {
		buf.Reset()
		answerBuffers.Put(buf)
	}
}

// overBudget is the domain error (413) of an answer past the hard cap.
func (s *server) overBudget(fields ...string) error {
	var fe plume.FieldErrors
	msg := fmt.Sprintf("the answer is over the output budget of %s per response: ask for fewer %s (split the request)",
		fmtBytes(float64(s.cfg.MaxOutputBytes)), strings.Join(fields, ", "))
	for _, f := range fields {
		fe.Add(f, msg)
	}
	return fe.OverLimit("the answer is over the output budget")
}

// encodeJSON encodes v as one JSON document (no HTML escaping, final
// newline) within the output budget; fields name what to reduce when the
// answer is over it. A non-finite number (which the engine never
// produces) is an internal error.
func (s *server) encodeJSON(v any, contentType string, fields ...string) (*reply, error) {
	// The encoder writes its whole answer once, so the buffer is sized by
	// that write (the output estimates are upper bounds, several times the
	// typical answer: sizing the buffer by them cost 40 kB per demo request).
	buf := &cappedBuffer{Buffer: answerBuffers.Get().(*bytes.Buffer), limit: s.cfg.MaxOutputBytes}
	enc := json.NewEncoder(buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		freeAnswer(buf.Buffer)
		if errors.Is(err, errOutputOver) {
			return nil, s.overBudget(fields...)
		}
		return nil, &plume.Error{Kind: plume.KindInternal, Detail: "the result could not be encoded", Err: err}
	}
	return &reply{contentType: contentType, body: buf.Bytes(), pooled: buf.Buffer}, nil
}

// capBytes holds an encoded answer to the hard cap.
func (s *server) capBytes(r *reply, fields ...string) (*reply, error) {
	if len(r.body) > s.cfg.MaxOutputBytes {
		return nil, s.overBudget(fields...)
	}
	return r, nil
}
