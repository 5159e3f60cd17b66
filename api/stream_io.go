package api

import (
	"errors"
	"fmt"
	"io"
	"net/http"
	"time"
)

// The transfer rules of the streaming path. A streamed request holds a
// computation slot while its body arrives and its answer leaves, so the
// client is kept to minimum average rates, as a client reading an answer
// is on every route (minWriteRate): its body must arrive at least at
// minReadRate on average after the body timeout's grace, and it must read
// the answer at least at minWriteRate after the write timeout's; no single
// read or write may wait longer than the body or write timeout. The time
// these rates allow for the bytes moved is added to the request's deadline
// (see stream.go), so that a client within the rates never meets the
// deadline for its transfer's sake.
const (
	// minReadRate is the slowest average rate, bytes per second, at which
	// a streamed body may arrive: 256 KiB/s, a 2 Mbit/s uplink.
	minReadRate = 256 << 10
)

// bodyReader reads a streamed request body: it counts the bytes, keeps the
// client to the minimum rate, holds the limit of the current part of the
// body (the scenario before its receptors is limited as a whole body is),
// reports the bytes read (to extend the deadline) and keeps the error that
// ended the reading.
type bodyReader struct {
	r       io.Reader
	rc      *http.ResponseController
	timeout time.Duration // the body timeout: the longest wait of one read, and the rate's grace
	n       int64         // bytes read
	limit   int64         // bytes the current part may reach
	waited  time.Duration // time spent waiting for the client
	err     error         // the read error that ended the body (not io.EOF)
	eof     bool
	onRead  func(n int)
}

// errPartLimit is the error of a body part over its limit.
var errPartLimit = errors.New("the body part is over its limit")

// Read reads under a deadline: at most the body timeout, and no later than
// the rate allows for the bytes read so far.
func (b *bodyReader) Read(p []byte) (int, error) {
	if b.err != nil {
		return 0, b.err
	}
	if b.eof {
		return 0, io.EOF
	}
	if b.n >= b.limit {
		b.err = errPartLimit
		return 0, b.err
	}
	if int64(len(p)) > b.limit-b.n {
		p = p[:b.limit-b.n]
	}
	allowed := b.timeout + time.Duration(float64(b.n)/minReadRate*float64(time.Second)) - b.waited
	_ = b.rc.SetReadDeadline(time.Now().Add(min(b.timeout, max(allowed, 0))))
	t0 := time.Now()
	n, err := b.r.Read(p)
	b.waited += time.Since(t0)
	b.n += int64(n)
	if n > 0 && b.onRead != nil {
		b.onRead(n)
	}
	switch {
	case errors.Is(err, io.EOF):
		// The body is read: no deadline is left on the connection, whose
		// background read would otherwise end the request's context.
		b.eof = true
		_ = b.rc.SetReadDeadline(time.Time{})
	case err != nil:
		b.err = err
	}
	return n, err
}

// setLimit lets the current part of the body reach n more bytes.
func (b *bodyReader) setLimit(n int64) { b.limit = b.n + n }

// drain reads what is left of the body (an epilogue after the last
// multipart boundary, trailing white space), so that the connection can
// be reused; at most n bytes.
func (b *bodyReader) drain(n int64) {
	b.setLimit(n)
	_, _ = io.Copy(io.Discard, b)
}

// streamWriter writes a streamed answer: each write under a deadline of at
// most the write timeout, and no later than the minimum rate allows for
// the bytes written so far; it reports the bytes written (to extend the
// deadline).
type streamWriter struct {
	w       io.Writer
	rc      *http.ResponseController
	timeout time.Duration
	n       int64
	waited  time.Duration
	err     error
	onWrite func(n int)
}

func (s *streamWriter) Write(p []byte) (int, error) {
	if s.err != nil {
		return 0, s.err
	}
	allowed := s.timeout + time.Duration(float64(s.n)/minWriteRate*float64(time.Second)) - s.waited
	_ = s.rc.SetWriteDeadline(time.Now().Add(min(s.timeout, max(allowed, 0))))
	t0 := time.Now()
	n, err := s.w.Write(p)
	s.waited += time.Since(t0)
	s.n += int64(n)
	if n > 0 && s.onWrite != nil {
		s.onWrite(n)
	}
	if err != nil {
		s.err = err
	}
	return n, err
}

// flush sends what is buffered to the client.
func (s *streamWriter) flush() {
	if s.err != nil {
		return
	}
	t0 := time.Now()
	if err := s.rc.Flush(); err != nil && !errors.Is(err, http.ErrNotSupported) {
		s.err = err
	}
	s.waited += time.Since(t0)
}

// done lifts the write deadline (a kept-alive connection's next answer has
// its own).
func (s *streamWriter) done() {
	if s.err == nil {
		_ = s.rc.SetWriteDeadline(time.Time{})
	}
}

// abort cuts the connection without ending the chunked answer, so that
// every HTTP client reports the transfer as incomplete: what was written
// is not a whole answer. Under a test recorder, which cannot be cut, it
// does nothing.
func abort(rc *http.ResponseController) {
	_ = rc.Flush()
	conn, _, err := rc.Hijack()
	if err != nil {
		return
	}
	_ = conn.Close()
}

// rateDuration is the time the rate allows for n bytes.
func rateDuration(n int, rate float64) time.Duration {
	return time.Duration(float64(n) / rate * float64(time.Second))
}

// fmtCount writes a count with thousands separators for messages.
func fmtCount(n int) string {
	s := fmt.Sprint(n)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}
