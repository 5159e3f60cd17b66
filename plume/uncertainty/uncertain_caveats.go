package uncertainty

import (
	"context"
	"fmt"

	"downgradient/plume"
)

// Caveat codes of the uncertainty results.
const (
	// How the realizations were drawn and what the intervals mean.
	CaveatUncertaintySampling = "uncertainty_sampling"
	// Few realizations: the outer percentiles are imprecise.
	CaveatFewRealizations = "few_realizations"
	// No parameter was given as a distribution.
	CaveatNoUncertainParameters = "no_uncertain_parameters"
)

// addUncertaintyCaveats adds the general caution and the caveats of a
// deterministic screening at the median inputs (closed forms only), then
// the notes on the sampling.
func (r *UncertaintyResult) addUncertaintyCaveats(ctx context.Context, tmpl plume.Scenario, base *plume.Model, opt plume.Options) {
	var closed []string
	for _, m := range tmpl.Methods {
		if m != plume.MethodNumeric {
			closed = append(closed, m)
		}
	}
	if len(closed) == 0 {
		closed = []string{plume.MethodExact}
	}
	if res, err := base.With(closed, tmpl.Times).Screen(ctx, opt); err == nil {
		for _, c := range res.Caveats {
			if c.Code != plume.CaveatScreeningEstimate {
				c.Message = "At the median inputs: " + c.Message
			}
			r.Caveats = append(r.Caveats, c)
		}
	} else {
		r.Caveats = append(r.Caveats, plume.Caveat{Code: plume.CaveatScreeningEstimate, Severity: plume.SeverityCaution, Message: plume.ScreeningCaution})
	}
	r.Caveats = append(r.Caveats, plume.Caveat{Code: CaveatUncertaintySampling, Severity: plume.SeverityNote, Message: fmt.Sprintf(
		"%d realizations by Latin hypercube sampling of %d uncertain parameter(s), treated as independent (no correlation between inputs). "+
			"Percentiles and means describe the spread of the model's answer for these input distributions only; "+
			"the exceedance probability is the fraction of realizations at or above the screening level, and its interval "+
			"(Clopper-Pearson, 95 %%) covers the sampling error of that fraction, not the adequacy of the model or of the distributions. "+
			"Drivers are Spearman rank correlations of each parameter with the receptor's peak concentration.",
		r.Realizations, len(r.Parameters))})
	if r.Realizations < 100 {
		r.Caveats = append(r.Caveats, plume.Caveat{Code: CaveatFewRealizations, Severity: plume.SeverityCaution, Message: fmt.Sprintf(
			"Only %d realizations: the 5th and 95th percentiles and small exceedance probabilities are imprecise; use 1,000 or more with the closed forms.", r.Realizations)})
	}
	if len(r.Parameters) == 0 {
		r.Caveats = append(r.Caveats, plume.Caveat{Code: CaveatNoUncertainParameters, Severity: plume.SeverityNote, Message: "No scenario number was given as a distribution, so every realization is the same deterministic screening."})
	}
}
