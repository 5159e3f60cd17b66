package api

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"strings"

	"downgradient/plume"
)

// unitToken spells a unit for a CSV column name.
func unitToken(u string) string {
	switch u {
	case "mg/L":
		return "mg_per_L"
	case "ug/L":
		return "ug_per_L"
	}
	return strings.NewReplacer("/", "_per_", " ", "_").Replace(u)
}

// csvHeader is the header row for the result's units.
func csvHeader(u plume.Units) []string {
	L, T, C := unitToken(u.Length), unitToken(u.Time), unitToken(u.Concentration)
	return []string{"receptor_id", "x_" + L, "y_" + L, "z_" + L, "plume_x_" + L, "plume_y_" + L,
		"time_" + T, "method", "compound", "concentration_" + C, "status", "screening_level_" + C, "above_screening_level",
		"allowable_source_concentration_steady_" + C, "allowable_source_concentration_within_times_" + C,
		"dilution_attenuation_factor_steady", "dilution_attenuation_factor_within_times",
		"allowable_scale_factor_steady", "allowable_scale_factor_within_times",
		"caveat_codes", "engine_version", "input_sha256"}
}

// formatNumber writes a finite number in the shortest form that reads back
// exactly: in plain decimals from 1e6 up to 1e21 as the JSON answers do (a
// projected coordinate such as a northing of 4180970.25 m stays readable,
// not 4.18097025e+06), in the shortest of the two forms elsewhere.
func formatNumber(v float64) string {
	if a := math.Abs(v); a >= 1e6 && a < 1e21 {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// csvSafe keeps a text cell from being read as a formula by a spreadsheet
// (OWASP CSV injection advice: prefix a quote).
func csvSafe(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

// encodeCSV writes the long-format table: one row per receptor, compound,
// time and method, then the steady-state rows with time "steady" (the
// compound column holds the contaminant's name, or with contaminants each
// compound's). Site coordinates x
// and y are the request's; the rest comes from the result. Each row carries
// what it needs to be read alone: the receptor's status, the screening
// level, the comparison (empty when nothing was compared), the caveat codes
// that apply, and the engine version and input hash (as columns, so that
// every RFC 4180 parser reads the file).
func encodeCSV(sc plume.Scenario, res *plume.Result) ([]byte, bool) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(csvHeader(res.Units))
	rw := newCSVRowWriter(w, sc, res, res.Engine.InputSHA256)
	for i := range res.Receptors {
		var x, y *float64
		if i < len(sc.Receptors) {
			x, y = sc.Receptors[i].X, sc.Receptors[i].Y
		}
		rw.receptor(i, x, y)
	}
	w.Flush()
	return buf.Bytes(), rw.finite
}

// csvRowWriter writes the rows of a result's receptors (a whole result, or one
// part of a streamed layer) to w.
type csvRowWriter struct {
	w      *csv.Writer
	res    *plume.Result
	views  []compoundView
	hash   string // the input_sha256 column
	finite bool   // false once a value was not finite (none should be)
}

func newCSVRowWriter(w *csv.Writer, sc plume.Scenario, res *plume.Result, hash string) *csvRowWriter {
	return &csvRowWriter{w: w, res: res, views: compoundViews(sc, res), hash: hash, finite: true}
}

func (c *csvRowWriter) num(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		c.finite = false
		return ""
	}
	return formatNumber(v)
}

func (c *csvRowWriter) optNum(p *float64) string {
	if p == nil {
		return ""
	}
	return c.num(*p)
}

// receptor writes receptor i's rows; x and y are its site coordinates as
// the request gave them (nil: given by lon/lat, written empty).
func (c *csvRowWriter) receptor(i int, x, y *float64) {
	res := c.res
	for _, cv := range c.views {
		rr := cv.res.Receptors[i]
		level := cv.res.Derived.ScreeningLevel
		prefix := []string{csvSafe(rr.ID), c.optNum(x), c.optNum(y), c.num(rr.Z), c.num(rr.PlumeX), c.num(rr.PlumeY)}
		codes := strings.Join(cv.res.CaveatCodes(rr.ID), ";")
		allow := func(a *plume.Allowance) []string {
			if a == nil {
				return []string{"", ""}
			}
			return []string{c.optNum(a.SteadyState), c.optNum(a.WithinTimes)}
		}
		bounds := append(append(allow(rr.AllowableSourceConcentration), allow(rr.DilutionAttenuationFactor)...), allow(rr.AllowableScaleFactor)...)
		row := func(t, method string, v float64) {
			rec := append(append([]string(nil), prefix...), t, method, csvSafe(cv.name), c.num(v), string(rr.Status), c.optNum(level),
				comparison(rr.Status, level, v))
			rec = append(append(rec, bounds...), codes, csvSafe(res.Engine.Version), c.hash)
			_ = c.w.Write(rec)
		}
		for _, sp := range rr.Series {
			for _, m := range plume.AllMethods {
				if v := plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric); v != nil {
					row(c.num(sp.Time), m, *v)
				}
			}
		}
		ss := rr.SteadyState
		for _, m := range plume.AllMethods {
			if v := plume.MethodValue(m, ss.Exact, ss.Domenico, ss.Numeric); v != nil {
				row("steady", m, *v)
			}
		}
	}
}

// comparison is a value's comparison with the screening level as text:
// "true" or "false", or "" when nothing is compared (no level known, or
// the receptor is not modelled).
func comparison(status plume.Status, level *float64, c float64) string {
	if level == nil || status == plume.StatusUpgradient {
		return ""
	}
	return strconv.FormatBool(c >= *level && c > 0)
}
