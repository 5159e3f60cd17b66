package fit

// Caveat codes of the attenuation and calibration results.
const (
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
