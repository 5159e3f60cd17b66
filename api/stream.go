package api

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash"
	"io"
	"log/slog"
	"math"
	"mime"
	"net"
	"net/http"
	"runtime"
	"runtime/debug"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// The streaming path of POST /v1/screenings: layers of any size, read,
// screened and written in one pass with memory that does not grow with
// the layer.
//
//	body -> reader (one goroutine: parses and checks each receptor, in
//	        parts of streamChunk; a read-ahead queue of streamReadAhead parts)
//	     -> dispatcher (at most streamWindow parts in flight, in order)
//	     -> workers (one per core: screen a part through plume.Layer and
//	        encode it)
//	     -> writer (the handler's goroutine: writes the parts in input order)
//
// Memory: the read-ahead queue (receptors not yet screened, some 100 bytes
// each), the window (parts screened and encoded, not yet written), the
// JSON decoder's buffer, and a 64-bit hash per receptor id for the
// duplicate check (see idSet); no whole body or answer is ever held.
const (
	// streamChunk is the number of receptors screened and written as one part.
	streamChunk = 64
	// streamReadAhead is the number of parts the reader may run ahead of
	// the screening (65,536 receptors): a client that sends its whole
	// body before it reads the answer can send this many more receptors
	// than the buffers between it and the server hold.
	streamReadAhead = 1024
	// MaxStreamReceptors is the most receptors of one streamed request.
	MaxStreamReceptors = 1_000_000
	// StreamWorkFactor is how many times the workload limit of a request
	// that is not streamed (Config.MaxEvaluations) a streamed one may do.
	StreamWorkFactor = 100
)

// streamWindow is the number of parts screened or being screened but not
// yet written: enough to keep every worker busy while the writer waits for
// the oldest.
func streamWindow(workers int) int { return 4 * workers }

// streamJob is one part of a streamed layer: receptors first, first+1, ...
// (or an input problem found at that point of the body, which ends it).
type streamJob struct {
	first int
	rs    []plume.Receptor
	fail  *Problem // the reader's: the body is bad here (nothing else is set)
	out   []byte   // encoded, set by a worker
	part  *plume.Result
	err   error // the worker's
	done  chan struct{}
}

// stream is one streamed screening in progress.
type stream struct {
	s       *server
	c       echo.Context
	ctx     context.Context // the request's
	sctx    context.Context // ends when the stream ends, for any reason
	stop    context.CancelCauseFunc
	body    *bodyReader
	in      *receptorInput
	sc      plume.Scenario
	layer   *plume.Layer
	enc     streamEncoder
	hash    hash.Hash
	suffix  []byte // the input hash's text after the receptors
	queue   chan *streamJob
	pending chan *streamJob
	work    chan *streamJob
	wg      sync.WaitGroup
	// counts for tests: receptors screened
	screened  atomic.Int64
	readerEnd atomic.Bool
}

// testHookStream, set by tests, is told of each stream as it starts.
var testHookStream atomic.Pointer[func(*stream)]

// streamScreenings is POST /v1/screenings on the streaming path.
func (s *server) streamScreenings(c echo.Context) error {
	enc, p := s.streamEncoder(c)
	if p != nil {
		return p
	}
	req := c.Request()
	ctx := req.Context()
	rc := http.NewResponseController(c.Response())
	_ = rc.EnableFullDuplex() // read the body while the answer is written
	br := &bodyReader{r: req.Body, rc: rc, timeout: s.cfg.BodyTimeout, limit: 2 * s.cfg.MaxBodyBytes}
	if sc := scopeOf(ctx); sc != nil && sc.deadline != nil {
		br.onRead = func(n int) { sc.deadline.extend(rateDuration(n, minReadRate)) }
	}
	st := &stream{s: s, c: c, ctx: ctx, body: br, enc: enc}
	st.sctx, st.stop = context.WithCancelCause(ctx)
	defer st.stop(context.Canceled)
	// A read blocked on the body wakes when the request or the stream ends.
	defer wakeReader(st, rc)()
	in, p := s.openStream(c, br)
	if p != nil {
		return p
	}
	br.limit = math.MaxInt64 // the receptors: up to MaxStreamBodyBytes (the scope's limit)
	sb, layer, p := s.prepareStreamHead(in.head)
	if p != nil {
		return lastMemberHint(p, in)
	}
	if err := s.limiter.take(ctx); err != nil {
		if errors.Is(err, errBusy) {
			return newProblem(kindBusy, "every computation slot is busy and the waiting line is full; retry after the number of seconds in Retry-After")
		}
		return s.problemFromError(ctx, err, nil)
	}
	st.in, st.sc, st.layer = in, sb.Scenario, layer
	if err := st.startHash(); err != nil {
		return newProblem(kindInternal, "the input hash could not be started")
	}
	if h := testHookStream.Load(); h != nil {
		(*h)(st)
	}
	return st.run(rc)
}

// wakeReader arranges that a read of st's body blocked on the client
// wakes when the stream ends (its read deadline set to now), and returns
// the function that disarms it. The handler calls that before it returns:
// it waits for a wake already under way, so that nothing touches the
// response (which echo reuses for its next request) or the connection
// after the handler returned.
func wakeReader(st *stream, rc *http.ResponseController) (disarm func()) {
	var mu sync.Mutex
	over := false
	stop := context.AfterFunc(st.sctx, func() {
		mu.Lock()
		defer mu.Unlock()
		if !over && !st.readerEnd.Load() {
			_ = rc.SetReadDeadline(time.Now())
		}
	})
	return func() {
		if !stop() {
			mu.Lock()
			over = true
			mu.Unlock()
		}
	}
}

// streamEncoder picks the format and checks the body's media type.
func (s *server) streamEncoder(c echo.Context) (streamEncoder, *Problem) {
	f, p := negotiateStream(c)
	if p != nil {
		return nil, p
	}
	if p := checkContentEncoding(c.Request()); p != nil {
		return nil, p
	}
	return newStreamEncoder(f), nil
}

// openStream reads a streamed body up to its receptors: a JSON scenario
// whose last member is receptors, or a multipart body (scenario part,
// receptors part).
func (s *server) openStream(c echo.Context, br *bodyReader) (*receptorInput, *Problem) {
	ct := c.Request().Header.Get(echo.HeaderContentType)
	mt, params, err := mime.ParseMediaType(ct)
	var in *receptorInput
	var issues []issue
	switch {
	case err == nil && mt == "multipart/form-data":
		in, issues, err = openMultipart(br, params["boundary"], s.cfg.MaxBodyBytes)
	case ct == "" || err == nil && (mt == "application/json" || strings.HasSuffix(mt, "+json") || mt == "application/x-www-form-urlencoded"):
		dec := json.NewDecoder(br)
		in, issues, err = openJSONScenario(dec, "receptors")
	default:
		return nil, newProblem(kindMediaType, fmt.Sprintf("the body must be application/json or multipart/form-data, got %q", ct))
	}
	if err != nil {
		return nil, s.streamBodyProblem(c.Request().Context(), br, err)
	}
	if len(issues) > 0 {
		return nil, problemFromIssues(issues, "the streamed scenario cannot be read")
	}
	return in, nil
}

// prepareStreamHead checks a streamed scenario's members other than its
// receptors against the schema (Scenario without receptors) and the
// domain's rules, every bad field at once, and prepares its layer.
func (s *server) prepareStreamHead(head map[string]json.RawMessage) (scenarioBody, *plume.Layer, *Problem) {
	var sb scenarioBody
	b, err := json.Marshal(head)
	if err != nil {
		return sb, nil, newProblem(kindInternal, "the scenario could not be re-encoded")
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.UseNumber()
	var v any
	if err := dec.Decode(&v); err != nil {
		return sb, nil, bodyDecodeProblem(err, b)
	}
	if err := s.head.VisitJSON(v, openapi3.MultiErrors(), openapi3.VisitAsRequest()); err != nil {
		p := problemFromValidation(err)
		if p.Status == http.StatusUnprocessableEntity {
			var sc plume.Scenario
			_ = json.Unmarshal(b, &sc)
			_, derr := plume.PrepareLayer(sc, s.engineOptions())
			p = mergeDomainIssues(p, plume.FieldsOf(derr))
		}
		return sb, nil, p
	}
	delete(head, "receptor_id_property")
	if b, err = json.Marshal(head); err != nil {
		return sb, nil, newProblem(kindInternal, "the scenario could not be re-encoded")
	}
	sb, p := decodeScenarioBody(b)
	if p != nil {
		return sb, nil, p
	}
	l, err := plume.PrepareLayer(sb.Scenario, s.engineOptions())
	if err != nil {
		return sb, nil, s.problemFromError(context.Background(), err, nil)
	}
	return sb, l, nil
}

// lastMemberHint adds to the problem of a streamed JSON scenario that
// lacks a required member the likely cause: the member comes after the
// receptors (a writer that sorts members puts "receptors" before
// "source", "times" and "units"), where a body read in one pass cannot
// see it before the scenario is checked.
func lastMemberHint(p *Problem, in *receptorInput) *Problem {
	if in.names == nil || in.names.form == formCSV || in.multipart {
		return p
	}
	for _, e := range p.Errors {
		if strings.HasPrefix(e.Message, "required") {
			p.Detail += `; a streamed scenario is read in one pass, so its receptors must be its last member: a member written after them (as a writer that sorts members writes "source", "times" and "units") is not seen`
			return p
		}
	}
	return p
}

// startHash starts engine.input_sha256: the hash of the scenario's
// canonical JSON (plume.InputSHA256), whose receptors are written as they
// arrive.
func (st *stream) startHash() error {
	sc := st.sc
	sc.Receptors = []plume.Receptor{}
	b, err := json.Marshal(sc)
	if err != nil {
		return err
	}
	const mark = `"receptors":[]`
	i := bytes.LastIndex(b, []byte(mark))
	if i < 0 {
		return errors.New("no receptors in the canonical scenario")
	}
	st.hash = sha256.New()
	st.hash.Write(b[:i+len(mark)-1])
	st.suffix = b[i+len(mark)-1:]
	return nil
}

// run starts the reader, the dispatcher and the workers and writes the
// answer; it returns once every goroutine of the stream has ended.
func (st *stream) run(rc *http.ResponseController) error {
	workers := max(1, runtime.GOMAXPROCS(0))
	st.queue = make(chan *streamJob, streamReadAhead)
	st.pending = make(chan *streamJob, streamWindow(workers))
	st.work = make(chan *streamJob, streamWindow(workers))
	st.wg.Add(2 + workers)
	go st.read()
	go st.dispatch()
	for range workers {
		go st.screen()
	}
	defer st.wg.Wait()
	defer st.stop(context.Canceled)
	return st.write(rc)
}

// read parses and checks the receptors, in parts, and queues them; a
// problem of the body ends the queue with a job that names it (alone when
// it is in the first part, so that the answer can still be a 4xx).
func (st *stream) read() {
	defer st.wg.Done()
	defer close(st.queue)
	defer st.readerEnd.Store(true)
	i, perReceptor := 0, st.layer.EvaluationsPerReceptor()
	maxEvals := st.s.cfg.MaxEvaluations * StreamWorkFactor
	sent := false
	send := func(j *streamJob) bool {
		select {
		case st.queue <- j:
			sent = true
			return true
		case <-st.sctx.Done():
			return false
		}
	}
	for {
		j := &streamJob{first: i, rs: make([]plume.Receptor, 0, streamChunk), done: make(chan struct{})}
		fail, eof := st.safeReadPart(j, &i, perReceptor, maxEvals)
		if len(j.rs) > 0 && (fail == nil || sent) {
			if sc := scopeOf(st.ctx); sc != nil && sc.deadline != nil {
				evals := float64(len(j.rs) * perReceptor)
				sc.deadline.extend(time.Duration(evals / float64(st.s.cfg.MaxEvaluations) * float64(st.s.cfg.RequestTimeout)))
			}
			if !send(j) {
				return
			}
		}
		if fail != nil {
			f := &streamJob{first: i, fail: fail, done: make(chan struct{})}
			close(f.done)
			send(f)
			return
		}
		if eof {
			return
		}
	}
}

// safeReadPart is readPart with a panic (a bug) recovered and logged as
// the engine's are: it ends the stream with a 500, not the process.
func (st *stream) safeReadPart(j *streamJob, i *int, perReceptor, maxEvals int) (p *Problem, eof bool) {
	defer func() {
		if r := recover(); r != nil {
			slog.Error("panic reading a streamed layer", "panic", fmt.Sprint(r), "stack", string(debug.Stack()), "request_id", RequestID(st.ctx))
			p, eof = newProblem(kindInternal, "the server could not complete the request"), false
		}
	}()
	return st.readPart(j, i, perReceptor, maxEvals)
}

// readPart reads up to streamChunk receptors into j, counting them in i;
// it returns the problem that ends the body, or eof at its end.
func (st *stream) readPart(j *streamJob, i *int, perReceptor, maxEvals int) (*Problem, bool) {
	names := st.in.names
	for len(j.rs) < streamChunk {
		r, issues, err := st.in.next()
		if errors.Is(err, io.EOF) {
			return st.finishBody(*i), true
		}
		if err != nil {
			return st.s.streamBodyProblem(st.ctx, st.body, err), false
		}
		if len(issues) > 0 {
			return problemFromIssues(issues, "a receptor of the layer is bad"), false
		}
		if p := st.checkCounts(*i, perReceptor, maxEvals); p != nil {
			return p, false
		}
		if err := st.layer.CheckReceptor(*i, r); err != nil {
			p := st.s.problemFromError(st.ctx, err, names.rename)
			return p, false
		}
		b, err := json.Marshal(r)
		if err != nil {
			return newProblem(kindInternal, "a receptor could not be hashed"), false
		}
		if *i > 0 {
			st.hash.Write([]byte{','})
		}
		st.hash.Write(b)
		j.rs = append(j.rs, r)
		*i++
	}
	return nil, false
}

// checkCounts refuses receptor i beyond the streaming path's limits.
func (st *stream) checkCounts(i, perReceptor, maxEvals int) *Problem {
	switch {
	case i >= MaxStreamReceptors:
		return newProblem(kindTooLarge, "the layer is over the streaming path's limits",
			FieldProblem{Field: "receptors", Message: fmt.Sprintf("more than %s receptors; at most %s in one request: split the layer", fmtCount(MaxStreamReceptors), fmtCount(MaxStreamReceptors))})
	case (i+1)*perReceptor > maxEvals:
		return newProblem(kindTooLarge, "the layer is over the streaming path's limits",
			FieldProblem{Field: "receptors", Message: fmt.Sprintf("receptors x (times + 1) x closed-form methods is over %s evaluations at receptor %s: split the layer, or ask for fewer times or methods",
				fmtCount(maxEvals), fmtCount(i+1))})
	}
	return nil
}

// finishBody reads what follows the last receptor; it names a body that
// is bad there, or one without receptors.
func (st *stream) finishBody(n int) *Problem {
	st.body.setLimit(2 * st.s.cfg.MaxBodyBytes)
	issues, err := st.in.finish()
	switch {
	case err != nil:
		return st.s.streamBodyProblem(st.ctx, st.body, err)
	case len(issues) > 0:
		return problemFromIssues(issues, "the end of the streamed body is bad")
	case n == 0:
		return newProblem(kindInvalid, "the layer has no receptors", FieldProblem{Field: "receptors", Message: "at least one receptor is required"})
	}
	st.body.drain(64 << 10)
	return nil
}

// dispatch moves the read parts into the window, in order, and to the
// workers.
func (st *stream) dispatch() {
	defer st.wg.Done()
	defer close(st.work)
	defer close(st.pending)
	for j := range st.queue {
		select {
		case st.pending <- j:
		case <-st.sctx.Done():
			return
		}
		if j.fail != nil {
			return
		}
		select {
		case st.work <- j:
		case <-st.sctx.Done():
			return
		}
	}
}

// screen is one worker: it screens and encodes parts until there are none.
func (st *stream) screen() {
	defer st.wg.Done()
	for j := range st.work {
		st.screenPart(j)
		close(j.done)
	}
}

// screenPart screens and encodes one part; a panic is recovered (a bug).
func (st *stream) screenPart(j *streamJob) {
	defer func() {
		if r := recover(); r != nil {
			slog.Error("panic in the engine", "panic", fmt.Sprint(r), "stack", string(debug.Stack()), "request_id", RequestID(st.ctx))
			j.err = errEnginePanic
		}
	}()
	runHook(&testHookCompute, st.sctx)
	part, err := st.layer.Screen(st.sctx, j.first, j.rs)
	if err != nil {
		j.err = err
		return
	}
	st.screened.Add(int64(len(part.Receptors)))
	out, err := st.enc.part(st.layer, st.sc, j.rs, j.first, part)
	if err != nil {
		j.err = &plume.Error{Kind: plume.KindInternal, Detail: "the result could not be encoded", Err: err}
		return
	}
	j.part, j.out = part, out
	j.rs = nil
}

// write writes the answer in input order: a problem found in the first
// part of the body is answered with its status; once the first byte is
// written, a failure ends the stream in band and cuts the response.
func (st *stream) write(rc *http.ResponseController) error {
	var first *streamJob
	select {
	case first = <-st.pending:
	case <-st.sctx.Done():
		return st.s.endedProblem(st.ctx)
	}
	if first == nil {
		return st.s.endedProblem(st.ctx)
	}
	if first.fail != nil {
		return first.fail
	}
	res := st.c.Response()
	h := res.Header()
	h.Set(echo.HeaderContentType, st.enc.contentType())
	h.Set("Trailer", headerInputHash)
	w := &streamWriter{w: res, rc: rc, timeout: st.s.cfg.WriteTimeout}
	if sc := scopeOf(st.ctx); sc != nil && sc.deadline != nil {
		w.onWrite = func(n int) { sc.deadline.extend(rateDuration(n, minWriteRate)) }
	}
	res.WriteHeader(http.StatusOK)
	head, err := st.enc.begin(st.layer.Head())
	if err != nil {
		return st.failInBand(w, rc, newProblem(kindInternal, "the answer could not be encoded"))
	}
	_, _ = w.Write(head)
	w.flush()
	tally := plume.NewTally(100)
	for j, n := first, 0; ; n++ {
		if p := st.await(j, w); p != nil {
			return st.failInBand(w, rc, p)
		}
		if n > 0 {
			_, _ = w.Write([]byte(st.enc.sep()))
		}
		_, _ = w.Write(j.out)
		tally.Add(j.part)
		st.s.metrics.observeCaveats(st.layer.OwnCaveats(j.part))
		j.out, j.part = nil, nil
		if w.err != nil {
			st.stop(w.err)
			return nil // the client went away or stopped reading: nothing more can reach it
		}
		next, ok := <-st.pending
		if !ok {
			if st.sctx.Err() != nil {
				return st.failInBand(w, rc, st.s.endedProblem(st.ctx))
			}
			break
		}
		j = next
	}
	return st.end(w, tally)
}

// await waits for a part to be screened, flushing what was written while
// it waits; it returns the problem that ends the stream there, if any.
func (st *stream) await(j *streamJob, w *streamWriter) *Problem {
	if j.fail != nil {
		return j.fail
	}
	select {
	case <-j.done:
	default:
		w.flush()
		select {
		case <-j.done:
		case <-st.sctx.Done():
			return st.s.endedProblem(st.ctx)
		}
	}
	if j.err != nil {
		return st.s.problemFromError(st.ctx, j.err, nil)
	}
	return nil
}

// end writes what follows the receptors and the input hash as a trailer.
func (st *stream) end(w *streamWriter, tally *plume.Tally) error {
	tail := st.layer.Tail(tally)
	st.hash.Write(st.suffix)
	tail.Engine.InputSHA256 = hex.EncodeToString(st.hash.Sum(nil))
	b, err := st.enc.end(tail)
	if err != nil {
		slog.Error("stream tail", "error", err.Error(), "request_id", RequestID(st.ctx))
	}
	_, _ = w.Write(b)
	st.c.Response().Header().Set(headerInputHash, tail.Engine.InputSHA256)
	st.s.metrics.observeCaveats(tail.Caveats)
	w.flush()
	w.done()
	return nil
}

// headerInputHash is the trailer of a streamed answer that holds
// engine.input_sha256.
const headerInputHash = "X-Input-SHA256"

// failInBand ends a stream whose first byte is written: the in-band error
// (NDJSON, GeoJSON), then the connection is cut without the answer's last
// chunk, so that no client takes what it received for a whole answer.
func (st *stream) failInBand(w *streamWriter, rc *http.ResponseController, p *Problem) error {
	st.stop(errors.New(p.Detail))
	if names := st.in.names; names != nil {
		for i := range p.Errors {
			p.Errors[i].Field = names.rename(p.Errors[i].Field)
		}
	}
	p.Instance = st.c.Request().URL.Path
	lvl := slog.LevelWarn
	if p.Status == statusClientClosed {
		lvl = slog.LevelInfo
	}
	slog.Log(st.ctx, lvl, "stream ended early", "status", p.Status, "detail", p.Detail, "request_id", RequestID(st.ctx))
	if p.Status != statusClientClosed {
		_, _ = w.Write(st.enc.fail(p))
	}
	abort(rc)
	return nil
}

// streamBodyProblem says why a streamed body could not be read: over a
// limit (413), too slow (408), cut short (400), the request ended (see
// endedProblem), or not parseable (400).
func (s *server) streamBodyProblem(ctx context.Context, br *bodyReader, err error) *Problem {
	if ctx.Err() != nil {
		return s.endedProblem(ctx)
	}
	var mbe *http.MaxBytesError
	var ne net.Error
	rerr := br.err
	if rerr == nil {
		rerr = err
	}
	switch {
	case errors.As(rerr, &mbe):
		return newProblem(kindTooLarge, fmt.Sprintf("the body is over the streaming path's limit of %d bytes", s.cfg.MaxStreamBodyBytes))
	case errors.Is(rerr, errPartLimit):
		return newProblem(kindTooLarge, fmt.Sprintf("the scenario's members other than its receptors are over %d bytes", 2*s.cfg.MaxBodyBytes),
			FieldProblem{Field: "", Message: "a streamed scenario's members before and after its receptors are limited as a body that is not streamed is"})
	case errors.As(rerr, &ne) && ne.Timeout():
		return newProblem(kindBodyTimeout, fmt.Sprintf(
			"the body did not arrive in time: at least %d KiB/s on average after the first %s, and no pause longer than %s", minReadRate>>10, s.cfg.BodyTimeout, s.cfg.BodyTimeout))
	case br.err != nil:
		return newProblem(kindMalformed, "the body could not be read: the connection ended before the body did",
			FieldProblem{Field: "", Message: "body cut short"})
	}
	var se *json.SyntaxError
	switch {
	case errors.As(err, &se):
		return newProblem(kindMalformed, "malformed JSON: "+se.Error(),
			FieldProblem{Field: "", Message: fmt.Sprintf("syntax error at byte %d: %s", se.Offset, se.Error())})
	case errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF):
		return newProblem(kindMalformed, "malformed body: it ends early", FieldProblem{Field: "", Message: "unexpected end of the body"})
	}
	return newProblem(kindMalformed, "malformed body: "+err.Error(), FieldProblem{Field: "", Message: err.Error()})
}
