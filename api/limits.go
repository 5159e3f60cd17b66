package api

import (
	"net/http"
	"runtime"
	"sync/atomic"
	"time"

	"github.com/labstack/echo/v4"
)

// Defaults of the bound on concurrent computing requests.
const (
	// DefaultMaxWaiting is the default number of computing requests that may
	// wait for a slot; beyond it requests are refused at once with 503.
	DefaultMaxWaiting = 64
	// DefaultWaitTimeout is the default longest wait for a slot before 503.
	DefaultWaitTimeout = 5 * time.Second
	// retryAfterBusy is the Retry-After, seconds, of a 503 for a full server.
	retryAfterBusy = "1"
)

// DefaultMaxHeavy is the default number of computing requests run at once:
// the number of usable cores, at least 2 (the work is CPU-bound, so more
// slots add memory but no throughput).
func DefaultMaxHeavy() int { return max(2, runtime.GOMAXPROCS(0)) }

// lightRoutes are the routes that compute nothing and are never queued.
var lightRoutes = map[string]bool{
	"/healthz": true, "/metrics": true, "/openapi.yaml": true, "/openapi.json": true, "/v1/contaminants": true,
}

// kindBusy is the problem of a request refused because every computation
// slot is taken and the waiting line is full (or the wait too long).
var kindBusy = problemKind{"server-busy", "Server busy", http.StatusServiceUnavailable}

// limiter bounds the computing requests: at most cap(slots) run at once and
// at most maxWaiting wait, each for at most wait. Memory therefore stays
// bounded whatever the load: a request's body is read only once it holds a
// slot, and each slot's work is bounded by the body and workload limits.
type limiter struct {
	slots      chan struct{}
	waiting    atomic.Int64
	maxWaiting int64
	wait       time.Duration
	maxBody    int64
	m          *metrics
}

func newLimiter(cfg Config, m *metrics) *limiter {
	return &limiter{
		slots:      make(chan struct{}, cfg.MaxHeavy),
		maxWaiting: int64(cfg.MaxWaiting),
		wait:       cfg.WaitTimeout,
		maxBody:    cfg.MaxBodyBytes,
		m:          m,
	}
}

// middleware caps every request body at MaxBodyBytes (whatever route reads
// it) and makes computing requests hold a slot while they run.
func (l *limiter) middleware(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		req := c.Request()
		if req.Body != nil && req.Body != http.NoBody {
			req.Body = http.MaxBytesReader(c.Response(), req.Body, l.maxBody)
		}
		route := c.Path()
		if lightRoutes[route] || !l.m.routes[route] {
			return next(c)
		}
		if !l.acquire(req) {
			l.m.heavyReject.Inc()
			return l.busy(c)
		}
		l.m.heavyActive.Inc()
		defer func() {
			l.m.heavyActive.Dec()
			<-l.slots
		}()
		return next(c)
	}
}

// acquire takes a slot at once if one is free, else waits in line (when
// the line is not full) until one frees, the wait times out or the client
// goes away.
func (l *limiter) acquire(req *http.Request) bool {
	select {
	case l.slots <- struct{}{}:
		return true
	default:
	}
	if l.waiting.Add(1) > l.maxWaiting {
		l.waiting.Add(-1)
		return false
	}
	l.m.heavyWaiting.Inc()
	defer func() {
		l.waiting.Add(-1)
		l.m.heavyWaiting.Dec()
	}()
	t := time.NewTimer(l.wait)
	defer t.Stop()
	select {
	case l.slots <- struct{}{}:
		return true
	case <-t.C:
		return false
	case <-req.Context().Done():
		return false
	}
}

// busy answers 503 problem+json with a short Retry-After.
func (l *limiter) busy(c echo.Context) error {
	p := newProblem(kindBusy, "every computation slot is busy and the waiting line is full; retry after the number of seconds in Retry-After")
	p.Instance = c.Request().URL.Path
	body, err := marshalJSON(p)
	if err != nil {
		return p
	}
	c.Response().Header().Set("Retry-After", retryAfterBusy)
	return c.Blob(p.Status, "application/problem+json", body)
}
