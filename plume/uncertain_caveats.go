package plume

import (
	"context"
	"fmt"
)

// Caveat codes of the uncertainty, attenuation and calibration results.
const (
	// How the realizations were drawn and what the intervals mean.
	CaveatUncertaintySampling = "uncertainty_sampling"
	// Few realizations: the outer percentiles are imprecise.
	CaveatFewRealizations = "few_realizations"
	// No parameter was given as a distribution.
	CaveatNoUncertainParameters = "no_uncertain_parameters"
	// Fewer than three wells near the centreline, or a poor fit.
	CaveatFewCentrelineWells = "few_centreline_wells"
	// The attenuation regression explains little of the data.
	CaveatPoorFit = "poor_fit"
	// How non-detects were treated.
	CaveatNonDetects = "non_detects_censored"
	// A non-detect contradicts the fitted line (the rate may be larger).
	CaveatNonDetectAboveFit = "non_detect_above_fit"
	// Concentrations do not fall with distance: no attenuation rate.
	CaveatNoAttenuation = "no_attenuation_measured"
	// The Buscheck & Alcantar relation's assumptions.
	CaveatSteadyPlumeAssumed = "steady_plume_assumed"
	// A fitted value sits at its bound.
	CaveatAtBound = "fitted_value_at_bound"
	// Approximate (linearised) confidence intervals.
	CaveatLinearisedIntervals = "linearised_intervals"
)

// addUncertaintyCaveats adds the general caution and the caveats of a
// deterministic screening at the median inputs (closed forms only), then
// the notes on the sampling.
func (r *UncertaintyResult) addUncertaintyCaveats(ctx context.Context, tmpl Scenario, base *prepared, levels []float64, opt Options) {
	med := tmpl
	var closed []string
	for _, m := range tmpl.Methods {
		if m != MethodNumeric {
			closed = append(closed, m)
		}
	}
	if len(closed) == 0 {
		closed = []string{MethodExact}
	}
	med.Methods = closed
	if res, err := Screen(ctx, med, opt); err == nil {
		for _, c := range res.Caveats {
			if c.Code != CaveatScreeningEstimate {
				c.Message = "At the median inputs: " + c.Message
			}
			r.Caveats = append(r.Caveats, c)
		}
	} else {
		r.Caveats = append(r.Caveats, Caveat{Code: CaveatScreeningEstimate, Severity: SeverityCaution, Message: ScreeningCaution})
	}
	r.Caveats = append(r.Caveats, Caveat{Code: CaveatUncertaintySampling, Severity: SeverityNote, Message: fmt.Sprintf(
		"%d realizations by Latin hypercube sampling of %d uncertain parameter(s), treated as independent (no correlation between inputs). "+
			"Percentiles and means describe the spread of the model's answer for these input distributions only; "+
			"the exceedance probability is the fraction of realizations at or above the screening level, and its interval "+
			"(Clopper-Pearson, 95 %%) covers the sampling error of that fraction, not the adequacy of the model or of the distributions. "+
			"Drivers are Spearman rank correlations of each parameter with the receptor's peak concentration.",
		r.Realizations, len(r.Parameters))})
	if r.Realizations < 100 {
		r.Caveats = append(r.Caveats, Caveat{Code: CaveatFewRealizations, Severity: SeverityCaution, Message: fmt.Sprintf(
			"Only %d realizations: the 5th and 95th percentiles and small exceedance probabilities are imprecise; use 1,000 or more with the closed forms.", r.Realizations)})
	}
	if len(r.Parameters) == 0 {
		r.Caveats = append(r.Caveats, Caveat{Code: CaveatNoUncertainParameters, Severity: SeverityNote, Message: "No scenario number was given as a distribution, so every realization is the same deterministic screening."})
	}
}
