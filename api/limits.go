package api

import (
	"context"
	"errors"
	"net/http"
	"runtime"
	"sync/atomic"
	"time"
)

// Defaults of the bound on concurrent computing requests.
const (
	// DefaultMaxWaiting is the default number of computing requests that may
	// wait for a slot; beyond it requests are refused at once with 503.
	DefaultMaxWaiting = 64
	// DefaultWaitTimeout is the default longest wait for a slot before 503.
	DefaultWaitTimeout = 5 * time.Second
)

// DefaultMaxHeavy is the default number of computing requests run at once:
// the number of usable cores, at least 2 (the work is CPU-bound, so more
// slots add memory but no throughput). It is GOMAXPROCS as the process
// started with, read when the package loads, so that it does not count the
// spare processor that internal/runtimetune adds later.
func DefaultMaxHeavy() int { return defaultMaxHeavy }

var defaultMaxHeavy = max(2, runtime.GOMAXPROCS(0))

// Slots is the number of computation slots for a configured maxHeavy:
// maxHeavy itself, or DefaultMaxHeavy() when it is 0 or less (the meaning
// of Config.MaxHeavy, the -max-heavy flag and cmd/loadtest's).
func Slots(maxHeavy int) int {
	if maxHeavy <= 0 {
		return DefaultMaxHeavy()
	}
	return maxHeavy
}

// kindBusy is the problem of a request refused because every computation
// slot is taken and the waiting line is full (or the wait too long).
var kindBusy = problemKind{"server-busy", "Server busy", http.StatusServiceUnavailable}

// limiter bounds the computing requests: at most cap(slots) run at once and
// at most maxWaiting wait, each for at most wait. A request takes its slot
// in compute, after its body has been read and decoded (so a slow client
// holds no slot), and keeps it until its answer is written (bounded by the
// write timeout, so a client that stops reading loses it). Memory
// therefore stays bounded whatever the load: each slot's work and output
// are bounded by the body, workload and output limits.
type limiter struct {
	slots      chan struct{}
	decoding   chan struct{} // requests decoding a body read in full (see takeDecode)
	waiting    atomic.Int64
	maxWaiting int64
	wait       time.Duration
	m          *metrics
}

func newLimiter(cfg Config, m *metrics) *limiter {
	return &limiter{
		slots:      make(chan struct{}, cfg.MaxHeavy),
		decoding:   make(chan struct{}, max(4, 2*cfg.MaxHeavy)),
		maxWaiting: int64(cfg.MaxWaiting),
		wait:       cfg.WaitTimeout,
		m:          m,
	}
}

// take gives the request of ctx a computation slot unless it holds one
// already; the request's scope frees it once the answer is written. The
// error is errBusy (every slot busy, the line full or the wait too long)
// or the context's when the request ended while it waited.
func (l *limiter) take(ctx context.Context) error {
	sc := scopeOf(ctx)
	if sc != nil && sc.holdsSlot() {
		return nil
	}
	if sc != nil {
		sc.endDecode() // decoded: the next request may decode while this one waits
	}
	if err := l.acquire(ctx); err != nil {
		if errors.Is(err, errBusy) {
			l.m.heavyReject.Inc()
		}
		return err
	}
	l.m.heavyActive.Inc()
	release := func() {
		l.m.heavyActive.Dec()
		<-l.slots
	}
	if sc == nil { // no scope (cannot happen behind the middleware): never leak the slot
		context.AfterFunc(ctx, release)
		return nil
	}
	sc.holdSlot(release)
	return nil
}

// errBusy is the refusal of a request when every slot is busy and the
// waiting line is full or the wait too long.
var errBusy = errors.New("every computation slot is busy")

// acquire takes a slot at once if one is free, else waits in line (when
// the line is not full) until one frees, the wait times out or ctx ends.
func (l *limiter) acquire(ctx context.Context) error {
	select {
	case l.slots <- struct{}{}:
		return nil
	default:
	}
	if l.waiting.Add(1) > l.maxWaiting {
		l.waiting.Add(-1)
		return errBusy
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
		return nil
	case <-t.C:
		return errBusy
	case <-ctx.Done():
		return ctx.Err()
	}
}

// takeDecode makes a request whose body has been read in full wait for
// one of a few decoding tokens (2 per computation slot, at least 4) before
// it validates and decodes the body, which takes several times the body's
// size in memory: a body is read without any token (a slow client holds
// none), but no more than a few are expanded at once whatever the number
// of connections. The token is given back when the request asks for a
// computation slot, or ends. The error is the context's.
func (l *limiter) takeDecode(ctx context.Context) error {
	sc := scopeOf(ctx)
	if sc == nil {
		return nil
	}
	select {
	case l.decoding <- struct{}{}:
	case <-ctx.Done():
		return ctx.Err()
	}
	sc.holdDecode(func() { <-l.decoding })
	return nil
}
