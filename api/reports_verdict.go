package api

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"downgradient/plume"
)

// maxVerdictTimes is the most requested times the verdict table shows as
// columns; more are thinned evenly (the last always kept).
const maxVerdictTimes = 8

// verdictTable is the report's table of results: one row per receptor
// (and, once a scenario can hold several, per compound), exceedances
// first, then by concentration.
type verdictTable struct {
	// Method of the values shown, and its name in words.
	Method, MethodName string
	// Headers of the time columns (in the request's time unit).
	Times []string
	// Says which times are shown when not all are; empty otherwise.
	TimesNote string
	// ShowPeak adds peak and peak-time columns (a source that is not
	// constant: the peak is not the steady state).
	ShowPeak bool
	// ShowCompound adds a compound column (several compounds).
	ShowCompound bool
	// ShowMethod adds a method column: the compounds' values come from
	// different methods (a daughter only the finite-volume chain gives).
	ShowMethod bool
	Rows       []verdictRow
}

// verdictRow is one receptor's line.
type verdictRow struct {
	ID, Compound, Method   string
	X, Y, Depth, AlongFlow string
	// One cell per shown time, then the steady state and the peak.
	Values           []valueCell
	Steady, Peak     valueCell
	PeakTime         string
	FirstExceedance  string
	Verdict, Class   string
	Caveats          string
	Exceeds, Compare bool
	// peak orders the rows: the peak concentration, 0 when not modelled.
	peak float64
}

// valueCell is a concentration as printed: Over when at or above the level.
type valueCell struct {
	Text string
	Over bool
}

// primaryMethod is the method whose values the tables show: exact when it
// ran, else Domenico, else numeric.
func primaryMethod(ran []string) string {
	for _, m := range []string{plume.MethodExact, plume.MethodDomenico, plume.MethodNumeric} {
		for _, r := range ran {
			if r == m {
				return m
			}
		}
	}
	return plume.MethodExact
}

// methodsRan lists the methods that produced values, in canonical order.
func methodsRan(res *plume.Result) []string {
	var out []string
	for _, m := range plume.AllMethods {
		ran := m == plume.MethodNumeric && res.Numeric != nil
		for _, rr := range res.Receptors {
			if plume.MethodValue(m, rr.SteadyState.Exact, rr.SteadyState.Domenico, rr.SteadyState.Numeric) != nil {
				ran = true
			}
			for _, sp := range rr.Series {
				if plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric) != nil {
					ran = true
				}
			}
		}
		if ran {
			out = append(out, m)
		}
	}
	return out
}

// shownTimes picks at most maxVerdictTimes of n time indices, evenly, the
// first and last included.
func shownTimes(n int) []int {
	idx := make([]int, 0, min(n, maxVerdictTimes))
	if n <= maxVerdictTimes {
		for i := range n {
			idx = append(idx, i)
		}
		return idx
	}
	for k := range maxVerdictTimes {
		idx = append(idx, k*(n-1)/(maxVerdictTimes-1))
	}
	return idx
}

// buildVerdict assembles the verdict table: a row per receptor, or per
// receptor and compound for a scenario of several (views); caveatNo gives
// the numbers of each receptor's own caveats in the caveat list.
func buildVerdict(sc plume.Scenario, views []memoView, caveatNo map[string][]int) verdictTable {
	var vt verdictTable
	methods := make([]string, len(views))
	for k, v := range views {
		methods[k] = primaryMethod(methodsRan(v.Res))
		vt.ShowMethod = vt.ShowMethod || methods[k] != methods[0]
	}
	vt.Method, vt.ShowCompound = methods[0], len(views) > 1
	vt.MethodName = methodNames[vt.Method]
	times := shownTimes(len(sc.Times))
	for _, i := range times {
		vt.Times = append(vt.Times, fmtReportNumber(sc.Times[i]))
	}
	if len(times) < len(sc.Times) {
		vt.TimesNote = fmt.Sprintf("%d of the %d requested times are shown; the JSON and CSV answers hold them all.", len(times), len(sc.Times))
	}
	xs, ys := make([]float64, len(sc.Receptors)), make([]float64, len(sc.Receptors))
	for i, r := range sc.Receptors {
		xs[i], ys[i] = *r.X, *r.Y
	}
	dx, dy := coordDecimals(xs), coordDecimals(ys)
	for k, v := range views {
		for i, rr := range v.Res.Receptors {
			if rr.Peak.Time != nil {
				vt.ShowPeak = true
			}
			row := verdictRowOf(rr, v.Res.Derived.ScreeningLevel, methods[k], times)
			row.Compound, row.Method = v.Name, methodNames[methods[k]]
			row.X, row.Y = fmtCoord(xs[i], dx), fmtCoord(ys[i], dy)
			nos := append(append([]int(nil), caveatNo[caveatKey(rr.ID, "")]...), caveatNo[caveatKey(rr.ID, v.Name)]...)
			if v.Name == "" {
				nos = caveatNo[caveatKey(rr.ID, "")]
			}
			sort.Ints(nos)
			row.Caveats = joinInts(nos)
			vt.Rows = append(vt.Rows, row)
		}
	}
	sortVerdict(vt.Rows)
	return vt
}

// verdictRowOf is one receptor's row without its site coordinates.
func verdictRowOf(rr plume.ReceptorResult, level *float64, method string, times []int) verdictRow {
	modelled := rr.Status != plume.StatusUpgradient
	cell := func(v *float64) valueCell {
		switch {
		case !modelled:
			return valueCell{Text: "—"}
		case v == nil:
			return valueCell{Text: "—"}
		}
		return valueCell{Text: fmtConcentration(*v), Over: level != nil && *v >= *level}
	}
	row := verdictRow{ID: rr.ID, Depth: depthText(rr), AlongFlow: fmtCoord(rr.PlumeX, 1), FirstExceedance: "—", PeakTime: "—"}
	for _, ti := range times {
		var v *float64
		if ti < len(rr.Series) {
			sp := rr.Series[ti]
			v = plume.MethodValue(method, sp.Exact, sp.Domenico, sp.Numeric)
		}
		row.Values = append(row.Values, cell(v))
	}
	row.Steady = cell(plume.MethodValue(method, rr.SteadyState.Exact, rr.SteadyState.Domenico, rr.SteadyState.Numeric))
	row.Peak = cell(&rr.Peak.Concentration)
	if rr.Peak.Time != nil && modelled {
		row.PeakTime = fmtReportNumber(*rr.Peak.Time)
	} else if modelled {
		row.PeakTime = "steady"
	}
	if t := rr.FirstExceedanceTime; t != nil {
		row.FirstExceedance = fmtReportNumber(*t)
	}
	row.Verdict, row.Class = verdictOf(rr)
	row.Exceeds = rr.ExceedsScreeningLevel != nil && *rr.ExceedsScreeningLevel
	row.Compare = rr.ExceedsScreeningLevel != nil
	if modelled {
		row.peak = rr.Peak.Concentration
	}
	return row
}

// verdictOf is the verdict in words and its style: "above level" or
// "below level" only for a modelled value compared with a known level;
// "not modelled" or "no level" otherwise, never "below".
func verdictOf(rr plume.ReceptorResult) (string, string) {
	switch {
	case rr.Status == plume.StatusUpgradient:
		return "not modelled", "none"
	case rr.ExceedsScreeningLevel == nil:
		return "no level", "none"
	case *rr.ExceedsScreeningLevel && rr.Status == plume.StatusInsideSource:
		return "above level (in source)", "over"
	case *rr.ExceedsScreeningLevel:
		return "above level", "over"
	}
	return "below level", "under"
}

// depthText is a receptor's depth, or its screen "2–8".
func depthText(rr plume.ReceptorResult) string {
	if rr.ScreenTop != nil && rr.ScreenBottom != nil {
		return fmtReportNumber(*rr.ScreenTop) + "–" + fmtReportNumber(*rr.ScreenBottom)
	}
	return fmtReportNumber(rr.Z)
}

// sortVerdict puts exceedances first, then higher peak concentrations,
// then the request's order.
func sortVerdict(rows []verdictRow) {
	sort.SliceStable(rows, func(a, b int) bool {
		if rows[a].Exceeds != rows[b].Exceeds {
			return rows[a].Exceeds
		}
		return rows[a].peak > rows[b].peak
	})
}

func joinInts(ns []int) string {
	s := make([]string, len(ns))
	for i, n := range ns {
		s[i] = strconv.Itoa(n)
	}
	return strings.Join(s, ", ")
}
