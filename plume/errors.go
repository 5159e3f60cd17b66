package plume

import "strings"

// FieldError names one bad request field by its JSON path (for example
// "aquifer.effective_porosity" or "receptors[3].x") and says what is allowed.
type FieldError struct {
	// JSON path of the field.
	Field string `json:"field"`
	// What is wrong and what is allowed.
	Message string `json:"message"`
}

// FieldErrors is every bad field of a request at once; it implements error.
// The api layer answers 422 with one entry per element.
type FieldErrors []FieldError

// Error joins the fields and messages.
func (fe FieldErrors) Error() string {
	var b strings.Builder
	b.WriteString("invalid scenario: ")
	for i, e := range fe {
		if i > 0 {
			b.WriteString("; ")
		}
		b.WriteString(e.Field)
		b.WriteString(": ")
		b.WriteString(e.Message)
	}
	return b.String()
}

func (fe *FieldErrors) add(field, msg string) {
	*fe = append(*fe, FieldError{Field: field, Message: msg})
}

// orNil returns nil for no errors, else fe with one entry per field (the first).
func (fe FieldErrors) orNil() error {
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
	return out
}
