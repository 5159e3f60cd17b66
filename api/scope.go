package api

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"net/http"
	"sync"
	"time"

	"github.com/labstack/echo/v4"
)

// ErrShuttingDown is the cause with which the server's base context is
// cancelled when it shuts down (see main): the computations in flight end
// at once and answer 503 with a short Retry-After rather than losing their
// connection at the end of the grace period.
var ErrShuttingDown = errors.New("the server is shutting down")

// Defaults of the per-request time limits besides the deadline.
const (
	// DefaultBodyTimeout is the default time a request body may take to
	// arrive; past it the request is answered 408.
	DefaultBodyTimeout = 10 * time.Second
	// DefaultWriteTimeout is the default time a client may go without
	// reading while an answer is written; past it the connection, and with
	// it the computation slot, is dropped.
	DefaultWriteTimeout = 10 * time.Second
	// DefaultMaxHeaderBytes is the default limit of the request line and
	// headers; past it the request is answered 431 problem+json.
	DefaultMaxHeaderBytes = 64 << 10
	// minWriteRate is the slowest average rate, bytes per second, at which
	// a client may read a large answer: writing one may take at most the
	// write timeout plus its size at this rate.
	minWriteRate = 1 << 20
	// writeChunk is how much of an answer is written under one write deadline.
	writeChunk = 256 << 10
)

// Headers on every response, and the Content-Security-Policy of the
// pictures and the printable report (nothing loads, nothing runs, inline
// styles and data: images only).
const (
	headerNoSniff    = "X-Content-Type-Options"
	contentPolicy    = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'; frame-ancestors 'none'"
	headerCSP        = "Content-Security-Policy"
	headerRetryAfter = "Retry-After"
)

type scopeKey struct{}

// requestScope is what one request holds beyond its context: its
// computation slot, once compute has taken it.
type requestScope struct {
	mu       sync.Mutex
	release  func()       // frees the computation slot
	decoded  func()       // gives back the decoding token
	deadline *deadlineCtx // a streamed request's context, whose deadline grows; nil otherwise
}

// scopeOf returns the scope of the request of ctx (nil outside one).
func scopeOf(ctx context.Context) *requestScope {
	sc, _ := ctx.Value(scopeKey{}).(*requestScope)
	return sc
}

func (sc *requestScope) holdsSlot() bool {
	sc.mu.Lock()
	defer sc.mu.Unlock()
	return sc.release != nil
}

func (sc *requestScope) holdSlot(release func()) {
	sc.mu.Lock()
	defer sc.mu.Unlock()
	sc.release = release
}

func (sc *requestScope) holdDecode(giveBack func()) {
	sc.mu.Lock()
	defer sc.mu.Unlock()
	sc.decoded = giveBack
}

// endDecode gives back the decoding token, if the request holds one.
func (sc *requestScope) endDecode() {
	sc.mu.Lock()
	defer sc.mu.Unlock()
	if sc.decoded != nil {
		sc.decoded()
		sc.decoded = nil
	}
}

// end frees the slot and the decoding token the request holds.
func (sc *requestScope) end() {
	sc.endDecode()
	sc.mu.Lock()
	defer sc.mu.Unlock()
	if sc.release != nil {
		sc.release()
		sc.release = nil
	}
}

// scope runs every request within its limits: the request line and
// headers within MaxHeaderBytes (431), the body within MaxBodyBytes (413,
// whatever route reads it, chunked or not), and one deadline,
// RequestTimeout from its arrival, for everything it does (reading its
// body, waiting for a slot, computing, encoding). Its answer, errors
// included, is written before the computation slot it took is freed. Every
// response says X-Content-Type-Options: nosniff.
func (s *server) scope(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		c.Response().Header().Set(headerNoSniff, "nosniff")
		req := c.Request()
		if p := s.checkHeaderSize(req); p != nil {
			return p
		}
		sc := &requestScope{}
		limit := s.cfg.MaxBodyBytes
		var ctx context.Context
		if isStream(c) {
			// The streaming path: a larger body, and a deadline that grows
			// with the work received (see stream.go).
			limit = s.cfg.MaxStreamBodyBytes
			sc.deadline = newDeadlineCtx(req.Context(), s.cfg.RequestTimeout)
			ctx = sc.deadline
			defer sc.deadline.stop()
		} else {
			var cancel context.CancelFunc
			ctx, cancel = context.WithTimeout(req.Context(), s.cfg.RequestTimeout)
			defer cancel()
		}
		defer sc.end()
		req = req.WithContext(context.WithValue(ctx, scopeKey{}, sc))
		if req.Body != nil && req.Body != http.NoBody {
			req.Body = http.MaxBytesReader(c.Response(), req.Body, limit)
		} else {
			// No body to read: lift the server's read timeout, whose expiry
			// on the connection's background read would end the request's
			// context in mid-computation (the deadline bounds the request).
			_ = http.NewResponseController(c.Response()).SetReadDeadline(time.Time{})
		}
		c.SetRequest(req)
		if err := next(c); err != nil {
			c.Error(err)
		}
		return nil
	}
}

// checkHeaderSize answers 431 when the request line and headers are over
// MaxHeaderBytes, naming the query when it alone is over.
func (s *server) checkHeaderSize(req *http.Request) *Problem {
	n := len(req.Method) + len(req.RequestURI) + len(req.Proto) + 4
	for k, vs := range req.Header {
		for _, v := range vs {
			n += len(k) + len(v) + 4
		}
	}
	if n <= s.cfg.MaxHeaderBytes {
		return nil
	}
	field, what := "headers", "the request line and headers"
	if len(req.URL.RawQuery) > s.cfg.MaxHeaderBytes/2 {
		field, what = "query", "the query string"
	}
	return newProblem(kindHeaderTooLarge, fmt.Sprintf("the request line and headers are %d bytes; at most %d allowed", n, s.cfg.MaxHeaderBytes),
		FieldProblem{Field: field, Message: fmt.Sprintf("%s is too long: send the scenario as a JSON body (POST /v1/screenings) instead", what)})
}

// reply is an encoded answer: built inside compute (under the request's
// deadline), written by send.
type reply struct {
	contentType string
	body        []byte
	header      [][2]string
	// pooled, when set, is the buffer body lives in (encodeJSON); send
	// gives it back once body is written, and body must not be used after.
	pooled *bytes.Buffer
}

// send writes r with status 200 in chunks, each under a write deadline of
// WriteTimeout and the whole within WriteTimeout plus its size at
// minWriteRate: a client that stops reading loses the connection, and with
// it the request's computation slot, after WriteTimeout.
func (s *server) send(c echo.Context, r *reply) error {
	if r.pooled != nil {
		defer freeAnswer(r.pooled)
	}
	res := c.Response()
	h := res.Header()
	for _, kv := range r.header {
		h.Set(kv[0], kv[1])
	}
	h.Set(echo.HeaderContentType, r.contentType)
	h.Set(echo.HeaderContentLength, fmt.Sprint(len(r.body)))
	rc := http.NewResponseController(res)
	start := time.Now()
	whole := start.Add(s.cfg.WriteTimeout + time.Duration(float64(len(r.body))/minWriteRate*float64(time.Second)))
	res.WriteHeader(http.StatusOK)
	for off := 0; off < len(r.body); off += writeChunk {
		_ = rc.SetWriteDeadline(minTime(time.Now().Add(s.cfg.WriteTimeout), whole))
		if _, err := res.Write(r.body[off:min(off+writeChunk, len(r.body))]); err != nil {
			return nil // the client stopped reading or went away; the status is sent
		}
	}
	if err := rc.Flush(); err == nil {
		_ = rc.SetWriteDeadline(time.Time{}) // a kept-alive connection's next answer has its own
	}
	return nil
}

func minTime(a, b time.Time) time.Time {
	if a.Before(b) {
		return a
	}
	return b
}
