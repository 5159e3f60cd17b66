package plume

import (
	"errors"
	"strings"
)

// Kind classifies a domain error. The api layer maps each kind to one
// problem type and HTTP status (one table); the domain never names a status.
type Kind int

// Kinds of Error.
const (
	// KindInvalid: values out of range, inconsistent or insufficient (the
	// request can be fixed by changing the named fields).
	KindInvalid Kind = iota + 1
	// KindOverLimit: a workload over a limit (fewer receptors, times,
	// realizations or cells fix it).
	KindOverLimit
	// KindInternal: a bug (for example a recovered panic); no input may cause one.
	KindInternal
)

// Error is the one error type of the domain: a kind, a summary and the bad
// fields by JSON path. Cancellation and deadlines are not Errors: the
// engine returns ctx.Err() for them.
type Error struct {
	Kind Kind
	// Detail says what went wrong when the fields alone do not.
	Detail string
	// Fields names each bad field (may be empty).
	Fields FieldErrors
	// Err is the underlying cause, if any.
	Err error
}

// Error joins the detail, the fields and their messages.
func (e *Error) Error() string {
	var b strings.Builder
	switch {
	case e.Detail != "":
		b.WriteString(e.Detail)
	case e.Kind == KindOverLimit:
		b.WriteString("over the limits")
	default:
		b.WriteString("invalid scenario")
	}
	for i, f := range e.Fields {
		if i == 0 {
			b.WriteString(": ")
		} else {
			b.WriteString("; ")
		}
		b.WriteString(f.Field)
		b.WriteString(": ")
		b.WriteString(f.Message)
	}
	return b.String()
}

// Unwrap returns the cause.
func (e *Error) Unwrap() error { return e.Err }

// AsError returns err as an *Error when it is one (or wraps one).
func AsError(err error) (*Error, bool) {
	var e *Error
	ok := errors.As(err, &e)
	return e, ok
}

// FieldsOf returns the bad fields of a domain error, nil for any other error.
func FieldsOf(err error) FieldErrors {
	if e, ok := AsError(err); ok {
		return e.Fields
	}
	return nil
}

// Invalid is an *Error of kind KindInvalid naming one field.
func Invalid(field, message string) *Error {
	return &Error{Kind: KindInvalid, Fields: FieldErrors{{Field: field, Message: message}}}
}

// FieldError names one bad request field by its JSON path (for example
// "aquifer.effective_porosity" or "receptors[3].x") and says what is allowed.
type FieldError struct {
	// JSON path of the field.
	Field string `json:"field"`
	// What is wrong and what is allowed.
	Message string `json:"message"`
}

// FieldErrors lists bad fields; Err turns it into an *Error.
type FieldErrors []FieldError

// Add appends one bad field.
func (fe *FieldErrors) Add(field, msg string) {
	*fe = append(*fe, FieldError{Field: field, Message: msg})
}

// Err returns nil for no errors, else an *Error of kind KindInvalid with one
// entry per field (the first message of a field repeated).
func (fe FieldErrors) Err() error { return fe.errOf(KindInvalid, "") }

// OverLimit returns nil for no errors, else an *Error of kind KindOverLimit
// with the given detail and every entry (a field may be over more than one
// limit).
func (fe FieldErrors) OverLimit(detail string) error {
	if len(fe) == 0 {
		return nil
	}
	return &Error{Kind: KindOverLimit, Detail: detail, Fields: fe}
}

func (fe FieldErrors) errOf(k Kind, detail string) error {
	if len(fe) == 0 {
		return nil
	}
	seen := make(map[string]bool, len(fe))
	out := fe[:0:0]
	for _, e := range fe {
		if !seen[e.Field] {
			seen[e.Field] = true
			out = append(out, e)
		}
	}
	return &Error{Kind: k, Detail: detail, Fields: out}
}

// Prefixed returns fe with every field prefixed (for example "scenario.").
func (fe FieldErrors) Prefixed(p string) FieldErrors {
	out := make(FieldErrors, len(fe))
	for i, e := range fe {
		out[i] = FieldError{Field: p + e.Field, Message: e.Message}
	}
	return out
}
