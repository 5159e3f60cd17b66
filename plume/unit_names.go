package plume

import (
	"bytes"
	"encoding/json"
	"slices"
)

// UnitNames is the unit of each dimensional input by its JSON path
// (Derived.InputUnits), for example "aquifer.hydraulic_conductivity":
// "ft/d".
type UnitNames map[string]string

// MarshalJSON writes the object encoding/json would write for the map
// (keys sorted, the same escapes), in one buffer: encoding/json's map
// encoder copies every key and value through reflection, which was about
// a fifteenth of a demo answer's allocations.
func (u UnitNames) MarshalJSON() ([]byte, error) {
	if u == nil {
		return []byte("null"), nil
	}
	var stack [40]string
	keys := stack[:0]
	size := 2
	for k, v := range u {
		keys = append(keys, k)
		size += len(k) + len(v) + 6
	}
	slices.Sort(keys)
	b := make([]byte, 0, size)
	b = append(b, '{')
	for i, k := range keys {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendJSONString(b, k)
		b = append(b, ':')
		b = appendJSONString(b, u[k])
	}
	return append(b, '}'), nil
}

// appendJSONString appends s as a JSON string: printable ASCII other than
// '"' and '\\' as it is, anything else through encoding/json without HTML
// escapes (encoding/json adds those to a MarshalJSON output when its
// encoder asks for them).
func appendJSONString(b []byte, s string) []byte {
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c < 0x20 || c >= 0x7f || c == '"' || c == '\\' {
			var q bytes.Buffer
			enc := json.NewEncoder(&q)
			enc.SetEscapeHTML(false)
			_ = enc.Encode(s) // a string always encodes
			return append(b, bytes.TrimSuffix(q.Bytes(), []byte("\n"))...)
		}
	}
	b = append(b, '"')
	b = append(b, s...)
	return append(b, '"')
}
