package api

import (
	"context"
	"sync"
	"time"
)

// deadlineCtx is a request context whose deadline may be moved later while
// the request runs: the streaming path's, which grows with the receptors
// received and the bytes sent and received (see stream.go). It behaves as
// context.WithTimeout's context does: when the deadline passes it is
// cancelled, Err is context.DeadlineExceeded and so is its Cause; the
// server's shutdown or the client's leaving cancel it as they cancel any
// request context.
type deadlineCtx struct {
	context.Context // a cancel-cause context under the request's
	cancel          context.CancelCauseFunc
	mu              sync.Mutex
	at              time.Time
	timer           *time.Timer
}

// newDeadlineCtx is a context under parent whose deadline is d from now.
func newDeadlineCtx(parent context.Context, d time.Duration) *deadlineCtx {
	ctx, cancel := context.WithCancelCause(parent)
	dc := &deadlineCtx{Context: ctx, cancel: cancel, at: time.Now().Add(d)}
	dc.timer = time.AfterFunc(d, func() { cancel(context.DeadlineExceeded) })
	return dc
}

// Deadline is the current deadline.
func (dc *deadlineCtx) Deadline() (time.Time, bool) {
	dc.mu.Lock()
	defer dc.mu.Unlock()
	return dc.at, true
}

// Err is context.DeadlineExceeded once the deadline passed, as for a
// context of context.WithTimeout.
func (dc *deadlineCtx) Err() error {
	err := dc.Context.Err()
	if err != nil && context.Cause(dc.Context) == context.DeadlineExceeded {
		return context.DeadlineExceeded
	}
	return err
}

// extend moves the deadline later by d (nothing once it has passed).
func (dc *deadlineCtx) extend(d time.Duration) {
	if d <= 0 {
		return
	}
	dc.mu.Lock()
	defer dc.mu.Unlock()
	if dc.Context.Err() != nil {
		return
	}
	dc.at = dc.at.Add(d)
	dc.timer.Reset(time.Until(dc.at))
}

// stop releases the timer and cancels the context (the request is over).
func (dc *deadlineCtx) stop() {
	dc.timer.Stop()
	dc.cancel(context.Canceled)
}
