package api

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"net"
	"net/http"
	"strings"
	"time"

	"github.com/labstack/echo/v4"
)

// checkContentEncoding refuses a compressed body (415): the service reads
// plain JSON only, so a gzip or deflate body is named for what it is
// rather than reported as malformed JSON (or, for deflate over a plain
// body, silently read as plain).
func checkContentEncoding(req *http.Request) *Problem {
	ce := strings.TrimSpace(req.Header.Get("Content-Encoding"))
	if ce == "" || strings.EqualFold(ce, "identity") {
		return nil
	}
	return newProblem(kindMediaType, fmt.Sprintf("the body must not be compressed; got Content-Encoding %q: send plain application/json", ce),
		FieldProblem{Field: "Content-Encoding", Message: "only identity (no compression) is accepted"})
}

// readBody reads the request body, already capped at MaxBodyBytes by
// scope, within BodyTimeout (and within the request's deadline: a
// shutdown also ends the read), before the request takes any computation
// slot; once it is read in full the request takes a decoding token
// (limiter.takeDecode). Problems: 413 over the cap; 408 when the body does not arrive in
// time; 503 when the deadline passed or the server is shutting down; 400
// when the connection ends before the body does. No message carries a
// network address.
func (s *server) readBody(c echo.Context) ([]byte, *Problem) {
	req := c.Request()
	ctx := req.Context()
	rc := http.NewResponseController(c.Response())
	_ = rc.SetReadDeadline(time.Now().Add(s.cfg.BodyTimeout)) // unsupported by test recorders: no limit there
	ended := make(chan struct{})
	stop := context.AfterFunc(ctx, func() {
		_ = rc.SetReadDeadline(time.Now()) // wake the read
		close(ended)
	})
	var buf bytes.Buffer
	if n := req.ContentLength; n > 0 {
		buf.Grow(int(min(n, s.cfg.MaxBodyBytes) + 1)) // one allocation, not a doubling series
	}
	_, err := buf.ReadFrom(req.Body)
	body := buf.Bytes()
	if !stop() {
		<-ended
	}
	if err == nil {
		// The body is read: no deadline is left on the connection, whose
		// background read would otherwise end the request's context when
		// it expired in mid-computation.
		_ = rc.SetReadDeadline(time.Time{})
		if err := s.limiter.takeDecode(ctx); err != nil {
			return nil, s.endedProblem(ctx)
		}
		return body, nil
	}
	// On failure the deadline stays passed, so that net/http does not wait
	// for the rest of the body before it answers (it closes the connection).
	_ = rc.SetReadDeadline(time.Now())
	var mbe *http.MaxBytesError
	var ne net.Error
	cause := context.Cause(ctx)
	switch {
	case errors.As(err, &mbe):
		return nil, newProblem(kindTooLarge, fmt.Sprintf("the body is over the limit of %d bytes", s.cfg.MaxBodyBytes))
	case errors.Is(cause, ErrShuttingDown) || errors.Is(cause, context.DeadlineExceeded):
		return nil, s.endedProblem(ctx)
	case errors.As(err, &ne) && ne.Timeout():
		return nil, newProblem(kindBodyTimeout, fmt.Sprintf(
			"the body did not arrive within %s; send the whole body at once", s.cfg.BodyTimeout))
	}
	return nil, newProblem(kindMalformed, "the body could not be read: the connection ended before the body did",
		FieldProblem{Field: "", Message: "body cut short"})
}
