package plume

import (
	"fmt"
	"unicode/utf8"
)

// CheckText adds an error when the text s at path holds a character that
// no answer may carry: a C0 or C1 control character or DEL (NUL, backspace,
// ESC...; tab, line feed and carriage return only where lineBreaks allows
// them), or a Unicode noncharacter U+FFFE or U+FFFF. Such characters make
// the SVG pictures ill-formed XML (XML 1.0 forbids them even escaped), put
// NUL bytes into the HTML report and garble logs and spreadsheets. Ids and
// names take lineBreaks false; free text true.
func (fe *FieldErrors) CheckText(path, s string, lineBreaks bool) {
	if msg := textMessage(s, lineBreaks); msg != "" {
		fe.Add(path, msg)
	}
}

// textMessage is what CheckText refuses in s, "" when s is fine.
func textMessage(s string, lineBreaks bool) string {
	for i, r := range s {
		if r == utf8.RuneError {
			continue // the JSON decoder already replaced invalid UTF-8
		}
		if lineBreaks && (r == '\t' || r == '\n' || r == '\r') {
			continue
		}
		if r < 0x20 || (r >= 0x7f && r <= 0x9f) || r == 0xfffe || r == 0xffff {
			return fmt.Sprintf("must not contain control characters; found %U at byte %d", r, i)
		}
	}
	return ""
}
