package plume

import (
	"bytes"
	"encoding/json"
	"testing"
)

// TestUnitNamesJSON: UnitNames writes the bytes encoding/json writes for
// the same map[string]string (the reference), with and without HTML
// escaping, for the engine's own table and for strings that need escapes.
func TestUnitNamesJSON(t *testing.T) {
	cases := map[string]UnitNames{
		"nil":     nil,
		"empty":   {},
		"engine":  inputUnits(Units{Length: "ft", Time: "yr", Concentration: "ug/L", Conductivity: "ft/d"}),
		"escapes": {"a\"b": "c\\d", "<tag>": "x & y", "tab\t": "µg/L", "ctl\x01": "\u2028", "bad\xff": "é"},
	}
	for name, u := range cases {
		for _, escapeHTML := range []bool{true, false} {
			want := encode(t, map[string]string(u), escapeHTML)
			if u == nil {
				want = encode(t, (map[string]string)(nil), escapeHTML)
			}
			if got := encode(t, u, escapeHTML); !bytes.Equal(got, want) {
				t.Errorf("%s (escape HTML %v):\n got %s\nwant %s", name, escapeHTML, got, want)
			}
		}
	}
}

func encode(t *testing.T, v any, escapeHTML bool) []byte {
	t.Helper()
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(escapeHTML)
	if err := enc.Encode(v); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}
