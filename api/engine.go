package api

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"runtime/debug"

	"downgradient/plume"
)

// compute is the one path of every engine call: f runs under the
// per-request deadline in its own goroutine (so that the answer leaves at
// the deadline even if the engine notices the cancelled context late; the
// engine stops at its next check of ctx), a panic in it is recovered and
// logged, and its error becomes a problem through problemFromError (rename
// maps the domain's field paths to the caller's; nil leaves them).
func compute[T any](ctx context.Context, s *server, rename func(string) string, f func(context.Context) (T, error)) (T, *Problem) {
	ctx, cancel := context.WithTimeout(ctx, s.cfg.RequestTimeout)
	defer cancel()
	type outcome struct {
		v   T
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				slog.Error("panic in the engine", "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
				done <- outcome{err: errEnginePanic}
			}
		}()
		v, err := f(ctx)
		done <- outcome{v, err}
	}()
	var zero T
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
// one), a domain error -> its kind's problem with its fields, a passed
// deadline -> 503, anything else -> 422 with the engine's message.
func (s *server) problemFromError(ctx context.Context, err error, rename func(string) string) *Problem {
	if rename == nil {
		rename = func(f string) string { return f }
	}
	e, isDomain := plume.AsError(err)
	switch {
	case errors.Is(err, errEnginePanic) || isDomain && e.Kind == plume.KindInternal:
		if isDomain {
			slog.Error("engine error", "error", err.Error())
		}
		return newProblem(kindInternal, "the server could not complete the request")
	case isDomain:
	case errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) || ctx.Err() != nil:
		return newProblem(kindTimeout, fmt.Sprintf(
			"the computation did not finish within the per-request deadline of %s; ask for fewer receptors, times or methods (numeric is the slowest)",
			s.cfg.RequestTimeout))
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
