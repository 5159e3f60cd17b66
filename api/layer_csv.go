package api

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"downgradient/plume"
)

// A receptor layer given as CSV (the receptors part of a multipart
// request): a header row naming the columns, then one row per receptor.
// The columns are id (or the column receptor_id_property names), x and y
// (site coordinates) or lon and lat (WGS 84, with the scenario's crs), and
// optionally z, screen_top and screen_bottom; names are matched without
// regard to case or surrounding spaces, in any order, and other columns are
// ignored. An empty cell is a value not given (null), except the id, which
// every row needs. Numbers are decimal, with a point ("1449.4"). The
// separator is the comma, or the semicolon or tab when the header row holds
// more of those than commas (as spreadsheets in locales with a decimal
// comma write). A UTF-8 byte-order mark is skipped. Rows are named by their
// line in the file, the header being row 1.

// csvColumns are the receptor columns, by field name.
var csvColumns = []string{"id", "x", "y", "lon", "lat", "z", "screen_top", "screen_bottom"}

// csvReader reads a CSV layer's receptors one row at a time.
type csvReader struct {
	r     *csv.Reader
	names *layerNames
	ids   *idSet
	col   map[string]int // field name -> column index
	width int            // number of columns of the header
}

// openCSV reads the header of a CSV layer. The issues concern the table as
// a whole (a missing column); the error is the body's.
func openCSV(body io.Reader, names *layerNames, ids *idSet) (*csvReader, []issue, error) {
	br := bufio.NewReaderSize(body, 64<<10)
	peek, err := br.Peek(64 << 10)
	if err != nil && !errors.Is(err, io.EOF) && !errors.Is(err, bufio.ErrBufferFull) {
		return nil, nil, err
	}
	r := csv.NewReader(br)
	r.Comma = csvSeparator(peek)
	r.ReuseRecord = true
	r.TrimLeadingSpace = true
	names.form = formCSV
	at := func(col string) string { return names.csvName(0, col) }
	header, err := r.Read()
	if errors.Is(err, io.EOF) {
		return nil, []issue{{names.prefix, "the CSV is empty: it needs a header row (id,x,y,z,screen_top,screen_bottom) and a row per receptor", kindMissing}}, nil
	}
	if err != nil {
		return nil, csvIssues(names, err), nil
	}
	c := &csvReader{r: r, names: names, ids: ids, col: map[string]int{}, width: len(header)}
	want := map[string]string{}
	for _, f := range csvColumns {
		want[f] = f
	}
	delete(want, "id")
	want[strings.ToLower(names.idProp)] = "id"
	for k, h := range header {
		name := strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		f, ok := want[name]
		if !ok {
			continue
		}
		if j, dup := c.col[f]; dup {
			return nil, []issue{{at(name), fmt.Sprintf("given twice (columns %d and %d): name each column once", j+1, k+1), kindInvalid}}, nil
		}
		c.col[f] = k
	}
	var issues []issue
	if _, ok := c.col["id"]; !ok {
		issues = append(issues, issue{at(names.idProp), fmt.Sprintf("required: a column %s holding each receptor's id (receptor_id_property names another column)", names.idProp), kindMissing})
	}
	_, hasX := c.col["x"]
	_, hasLon := c.col["lon"]
	for _, pair := range [][2]string{{"x", "y"}, {"lon", "lat"}} {
		_, a := c.col[pair[0]]
		_, b := c.col[pair[1]]
		switch {
		case a && !b:
			issues = append(issues, issue{at(pair[1]), fmt.Sprintf("required: a column %s beside the column %s", pair[1], pair[0]), kindMissing})
		case b && !a:
			issues = append(issues, issue{at(pair[0]), fmt.Sprintf("required: a column %s beside the column %s", pair[0], pair[1]), kindMissing})
		}
	}
	if !hasX && !hasLon {
		issues = append(issues, issue{at("x"), "required: columns x and y (site coordinates), or lon and lat (WGS 84, with the scenario's crs)", kindMissing})
	}
	return c, issues, nil
}

// csvSeparator picks the separator from the first line of the table: a
// semicolon or a tab when the line holds more of them than commas.
func csvSeparator(peek []byte) rune {
	line := peek
	if i := bytes.IndexByte(peek, '\n'); i >= 0 {
		line = peek[:i]
	}
	commas, semis, tabs := bytes.Count(line, []byte{','}), bytes.Count(line, []byte{';'}), bytes.Count(line, []byte{'\t'})
	switch {
	case semis > commas && semis >= tabs:
		return ';'
	case tabs > commas:
		return '\t'
	}
	return ','
}

// csvIssues names a CSV syntax error (a bare quote, a row with a wrong
// number of fields) by its row.
func csvIssues(names *layerNames, err error) []issue {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		msg := pe.Err.Error()
		if errors.Is(pe.Err, csv.ErrFieldCount) {
			msg = "has a different number of fields than the header row"
		}
		return []issue{{names.csvName(pe.StartLine, ""), "malformed CSV: " + msg, kindMalformed}}
	}
	return []issue{{names.prefix, "malformed CSV: " + err.Error(), kindMalformed}}
}

// next returns the next row as a receptor with its issues; io.EOF after the
// last. Any other error is the body's.
func (c *csvReader) next() (plume.Receptor, []issue, error) {
	rec, err := c.r.Read()
	if errors.Is(err, io.EOF) {
		return plume.Receptor{}, nil, io.EOF
	}
	var pe *csv.ParseError
	if err != nil && !errors.As(err, &pe) {
		return plume.Receptor{}, nil, err
	}
	var line int
	if err != nil {
		line = pe.StartLine // no record: FieldPos would panic
	} else {
		line, _ = c.r.FieldPos(0)
	}
	c.names.line = line
	if c.names.lines != nil {
		c.names.lines = append(c.names.lines, line)
	}
	if err != nil {
		return plume.Receptor{}, csvIssues(c.names, err), nil
	}
	var r plume.Receptor
	var issues []issue
	cell := func(f string) (string, bool) {
		k, ok := c.col[f]
		if !ok || k >= len(rec) {
			return "", false
		}
		return strings.TrimSpace(rec[k]), true
	}
	at := func(f string) string { return c.names.csvName(line, f) }
	id, _ := cell("id")
	id = strings.ToValidUTF8(id, string(utf8.RuneError))
	switch {
	case id == "":
		issues = append(issues, issue{at("id"), fmt.Sprintf("required: the receptor's id (the column %s is empty)", c.names.idProp), kindMissing})
	default:
		if is := checkLayerID(c.ids, id, line, at("id"), func(row int) string { return c.names.csvName(row, "") }); is != nil {
			issues = append(issues, *is)
		}
	}
	r.ID = id
	for _, f := range []struct {
		name string
		dst  **float64
	}{{"x", &r.X}, {"y", &r.Y}, {"lon", &r.Lon}, {"lat", &r.Lat}, {"z", &r.Z}, {"screen_top", &r.ScreenTop}, {"screen_bottom", &r.ScreenBottom}} {
		s, ok := cell(f.name)
		if !ok || s == "" {
			continue
		}
		v, msg := parseDecimal(s)
		if msg != "" {
			issues = append(issues, issue{at(f.name), msg, kindMalformed})
			continue
		}
		*f.dst = &v
	}
	return r, issues, nil
}

// parseDecimal reads a decimal number as JSON writes one (an optional sign,
// digits with an optional point, an optional exponent); the message says
// what is wrong otherwise.
func parseDecimal(s string) (float64, string) {
	if !isDecimal(s) {
		hint := ""
		if strings.Count(s, ",") == 1 && isDecimal(strings.Replace(s, ",", ".", 1)) {
			hint = " (write the decimal separator as a point)"
		}
		return 0, fmt.Sprintf("not a number: %q%s", shorten(s, 40), hint)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, "out of range: not a finite 64-bit floating-point number"
	}
	return v, ""
}

// isDecimal reports whether s is [+-]digits[.digits][(e|E)[+-]digits] with
// at least one digit before the exponent.
func isDecimal(s string) bool {
	i, n := 0, len(s)
	if i < n && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
		digits++
	}
	if i < n && s[i] == '.' {
		for i++; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			digits++
		}
	}
	if digits == 0 {
		return false
	}
	if i < n && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < n && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for ; i < n && s[i] >= '0' && s[i] <= '9'; i++ {
			exp++
		}
		if exp == 0 {
			return false
		}
	}
	return i == n
}

// shorten cuts s to at most n bytes for a message.
func shorten(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return strings.ToValidUTF8(s[:n], "") + "..."
}
