package api

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"runtime/debug"
	"sync/atomic"

	"downgradient/plume"
)

// Test hooks, unset in production: testHookCompute runs at the start of
// every engine call, in its goroutine, with the context the engine gets;
// testHookEncode runs just before an answer is encoded.
var testHookCompute, testHookEncode atomic.Pointer[func(context.Context)]

// runHook runs a test hook when one is set.
func runHook(h *atomic.Pointer[func(context.Context)], ctx context.Context) {
	if f := h.Load(); f != nil {
		(*f)(ctx)
	}
}

// compute is the one path of every engine call. It takes the request's
// computation slot (once per request: the slot is held until the answer is
// written, see scope), then runs f under the request's one deadline (set
// by scope when the request arrived) in its own goroutine, so that the
// answer leaves at the deadline even if the engine notices the cancelled
// context late (the engine stops at its next check of ctx). f computes and
// encodes the answer, so that encoding runs under the same deadline. A
// panic in f is recovered and logged; its error becomes a problem through
// problemFromError (rename maps the domain's field paths to the caller's;
// nil leaves them).
func compute[T any](ctx context.Context, s *server, rename func(string) string, f func(context.Context) (T, error)) (T, *Problem) {
	var zero T
	if err := s.limiter.take(ctx); err != nil {
		if errors.Is(err, errBusy) {
			return zero, newProblem(kindBusy, "every computation slot is busy and the waiting line is full; retry after the number of seconds in Retry-After")
		}
		return zero, s.problemFromError(ctx, err, rename)
	}
	type outcome struct {
		v   T
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				slog.Error("panic in the engine", "panic", fmt.Sprint(r), "stack", string(debug.Stack()),
					"request_id", RequestID(ctx))
				done <- outcome{err: errEnginePanic}
			}
		}()
		runHook(&testHookCompute, ctx)
		v, err := f(ctx)
		done <- outcome{v, err}
	}()
	select {
	case o := <-done:
		if o.err != nil {
			return zero, s.problemFromError(ctx, o.err, rename)
		}
		return o.v, nil
	case <-ctx.Done():
		return zero, s.problemFromError(ctx, ctx.Err(), rename)
	}
}

// errEnginePanic marks a panic recovered from the engine (a bug).
var errEnginePanic = errors.New("api: engine panicked")

// problemKinds is the one table from a domain error's kind to its problem
// type and status.
var problemKinds = map[plume.Kind]problemKind{
	plume.KindInvalid:   kindInvalid,
	plume.KindOverLimit: kindTooLarge,
	plume.KindInternal:  kindInternal,
}

// problemFromError maps an engine error to a problem: a recovered panic or
// a domain error of kind KindInternal -> 500 (a bug: no input may cause
// one), a domain error -> its kind's problem with its fields, an ended
// request context -> the problem of why it ended (see endedProblem),
// anything else -> 422 with the engine's message.
func (s *server) problemFromError(ctx context.Context, err error, rename func(string) string) *Problem {
	if rename == nil {
		rename = func(f string) string { return f }
	}
	e, isDomain := plume.AsError(err)
	switch {
	case errors.Is(err, errEnginePanic) || isDomain && e.Kind == plume.KindInternal:
		if isDomain {
			slog.Error("engine error", "error", err.Error(), "request_id", RequestID(ctx))
		}
		return newProblem(kindInternal, "the server could not complete the request")
	case isDomain:
	case errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) || ctx.Err() != nil:
		return s.endedProblem(ctx)
	default:
		return newProblem(kindInvalid, "the scenario could not be screened: "+err.Error())
	}
	fps := make([]FieldProblem, len(e.Fields))
	for i, f := range e.Fields {
		fps[i] = FieldProblem{Field: rename(f.Field), Message: f.Message}
	}
	detail := e.Detail
	if detail == "" {
		detail = fmt.Sprintf("%d field(s) out of range or inconsistent", len(fps))
	}
	k, ok := problemKinds[e.Kind]
	if !ok {
		k = kindInternal
	}
	if k == kindInvalid {
		k = invalidKind(fps)
	}
	return newProblem(k, detail, fps...)
}

// endedProblem says why the request's context ended: the server is
// shutting down (503, short Retry-After: another replica can answer), the
// client went away (499: nobody reads it, it is for the log and the
// metrics), or the per-request deadline passed (503).
func (s *server) endedProblem(ctx context.Context) *Problem {
	cause := context.Cause(ctx)
	switch {
	case errors.Is(cause, ErrShuttingDown):
		return newProblem(kindShuttingDown, "the server is shutting down and cancelled this computation; retry, another instance will answer")
	case errors.Is(cause, context.Canceled):
		return newProblem(kindClientGone, "the client closed the connection before the answer was ready")
	}
	return newProblem(kindTimeout, fmt.Sprintf(
		"the request did not finish within the per-request deadline of %s; ask for fewer receptors, times or methods (numeric is the slowest)",
		s.cfg.RequestTimeout))
}
