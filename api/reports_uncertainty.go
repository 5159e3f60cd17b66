package api

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"downgradient/plume"
	"downgradient/plume/uncertainty"
)

// maxDrivers is the number of drivers the report names per receptor.
const maxDrivers = 3

// uncertaintySection is the report's summary of an uncertainty run.
type uncertaintySection struct {
	Realizations int
	Seed         uint64
	Methods      string
	Sampling     string
	// Method of the peak summarised per receptor.
	PeakMethod string
	HasLevel   bool
	Parameters []uncertainParamRow
	Rows       []uncertainRow
}

// uncertainParamRow is one uncertain input: its distribution and the
// range its sample covered.
type uncertainParamRow struct {
	Name, Path, Distribution, Median, Range string
}

// uncertainRow is one receptor's line: the chance of reaching the level
// at any time, the percentiles of the peak and the drivers.
type uncertainRow struct {
	ID                    string
	Probability, Interval string
	P05, P50, P95         string
	Drivers               string
	Class                 string
	// order: the probability, then the 95th percentile.
	prob, p95 float64
}

// buildUncertainty summarises ur for the report; res is the screening at
// the medians (for each receptor's status), names the input names by path.
func buildUncertainty(ur *uncertainty.UncertaintyResult, res *plume.Result, names map[string]string) *uncertaintySection {
	us := &uncertaintySection{Realizations: ur.Realizations, Seed: ur.Seed, Methods: strings.Join(ur.Methods, ", "),
		Sampling: ur.Sampling, HasLevel: res.Derived.ScreeningLevel != nil}
	for _, ps := range ur.Parameters {
		us.Parameters = append(us.Parameters, uncertainParamRow{Name: nameOf(names, ps.Parameter), Path: ps.Parameter,
			Distribution: distributionText(ps.Distribution), Median: fmtReportNumber(ps.Median),
			Range: fmtReportNumber(ps.SampleMin) + " – " + fmtReportNumber(ps.SampleMax)})
	}
	for i, r := range ur.Receptors {
		us.PeakMethod = r.Peak.Method
		row := uncertainRow{ID: r.ID, Probability: "—", Interval: "", P05: "—", P50: "—", P95: "—", Class: "none", prob: -1}
		if i < len(res.Receptors) && res.Receptors[i].Status == plume.StatusUpgradient {
			row.Probability = "not modelled"
			us.Rows = append(us.Rows, row)
			continue
		}
		pc, floor := r.Peak.Percentiles, res.Derived.ConcentrationFloor
		row.P05, row.P50, row.P95 = fmtAboveFloor(pc.P05, floor), fmtAboveFloor(pc.P50, floor), fmtAboveFloor(pc.P95, floor)
		row.p95 = pc.P95
		if p := r.Peak.ExceedanceProbability; p != nil {
			row.prob = *p
			row.Probability = fmtPercent(*p)
			row.Class = "under"
			if *p > 0 {
				row.Class = "over"
			}
			if ci := r.Peak.ExceedanceProbabilityCI; len(ci) == 2 {
				row.Interval = fmtPercent(ci[0]) + " – " + fmtPercent(ci[1])
			}
		} else {
			row.Probability = "no level"
		}
		row.Drivers = driversText(r.Drivers, names)
		us.Rows = append(us.Rows, row)
	}
	sort.SliceStable(us.Rows, func(a, b int) bool {
		if us.Rows[a].prob != us.Rows[b].prob {
			return us.Rows[a].prob > us.Rows[b].prob
		}
		return us.Rows[a].p95 > us.Rows[b].p95
	})
	return us
}

// nameOf is an input's name in the input table, or its path.
func nameOf(names map[string]string, path string) string {
	if n, ok := names[path]; ok {
		return n
	}
	return path
}

// distributionText describes a distribution in a few words.
func distributionText(d uncertainty.Distribution) string {
	switch d.Kind {
	case uncertainty.DistLognormal:
		return fmt.Sprintf("lognormal, 5th–95th percentile %s – %s", fmtReportNumber(d.P05), fmtReportNumber(d.P95))
	case uncertainty.DistUniform:
		return fmt.Sprintf("uniform %s – %s", fmtReportNumber(d.Min), fmtReportNumber(d.Max))
	case uncertainty.DistLogUniform:
		return fmt.Sprintf("log-uniform %s – %s", fmtReportNumber(d.Min), fmtReportNumber(d.Max))
	case uncertainty.DistTriangular:
		return fmt.Sprintf("triangular %s – %s, mode %s", fmtReportNumber(d.Min), fmtReportNumber(d.Max), fmtReportNumber(d.Mode))
	case uncertainty.DistEmpirical:
		return fmt.Sprintf("empirical, %d values", len(d.Values))
	}
	return d.Kind
}

// driversText names the strongest drivers with their rank correlations.
func driversText(ds []uncertainty.Driver, names map[string]string) string {
	var parts []string
	for _, d := range ds {
		if len(parts) == maxDrivers {
			break
		}
		if math.Abs(d.RankCorrelation) < 0.05 {
			continue
		}
		parts = append(parts, fmt.Sprintf("%s %+.2f", nameOf(names, d.Parameter), d.RankCorrelation))
	}
	if len(parts) == 0 {
		return "none marked"
	}
	return strings.Join(parts, "; ")
}

// inputNames maps the JSON path of every input of the table to its name.
func inputNames(groups []inputGroup) map[string]string {
	out := map[string]string{}
	for _, g := range groups {
		for _, r := range g.Rows {
			out[r.key] = r.Name
		}
	}
	return out
}
