package plume

import "testing"

// Issue 12, item 7: control characters in ids and names are refused,
// naming the field; printable text of any script is not.
func TestCheckText(t *testing.T) {
	cases := []struct {
		s          string
		lineBreaks bool
		ok         bool
	}{
		{"MW-1", false, true},
		{"Brunnen Süd 3 / 井戸 ★", false, true},
		{"", false, true},
		{"MW\x00-1", false, false},
		{"MW\b1", false, false},
		{"\x1b[31mMW", false, false},
		{"MW\x7f", false, false},
		{"MW\u0085", false, false}, // C1 next line
		{"MW\uffff", false, false},
		{"line one\nline two\ttab\r\n", true, true},
		{"line one\nline two", false, false},
		{"text\x00", true, false},
	}
	for _, tc := range cases {
		var fe FieldErrors
		fe.CheckText("receptors[0].id", tc.s, tc.lineBreaks)
		if ok := len(fe) == 0; ok != tc.ok {
			t.Errorf("%q (line breaks %v): errors %v, want ok %v", tc.s, tc.lineBreaks, fe, tc.ok)
		}
		if len(fe) > 0 && fe[0].Field != "receptors[0].id" {
			t.Errorf("%q: field %q", tc.s, fe[0].Field)
		}
	}
}

// Validate refuses control characters in receptor ids and the
// contaminant's name.
func TestValidateControlCharacters(t *testing.T) {
	sc := demoScenario()
	sc.Receptors[0].ID = "MW\x001"
	sc.Contaminant.Name = "benz\x1bene"
	fe := FieldsOf(Validate(sc))
	want := map[string]bool{"receptors[0].id": true, "contaminant.name": true}
	for _, f := range fe {
		delete(want, f.Field)
	}
	if len(want) > 0 {
		t.Errorf("not named: %v (errors %v)", want, fe)
	}
}
