package plume

import "fmt"

// Caveat codes: stable snake_case identifiers of our own.
const (
	// Every result: a screening estimate, not a site assessment.
	CaveatScreeningEstimate = "screening_estimate_only"
	// Domenico differs from the exact solution by more than the tolerance at a receptor.
	CaveatDomenicoDeviation = "domenico_differs_from_exact"
	// The numeric cross-check differs from the exact solution beyond tolerance.
	CaveatNumericDisagreement = "numeric_differs_from_exact"
	// The numeric cross-check was requested but not run (workload or method limits).
	CaveatNumericNotRun = "numeric_not_run"
	// One or more dispersivities were estimated from the travel distance.
	CaveatDispersivityEstimated = "dispersivity_estimated"
	// The source concentration is above the compound's aqueous solubility.
	CaveatAboveSolubility = "source_above_solubility"
	// The receptor lies upgradient of the source (outside the model's domain).
	CaveatReceptorUpgradient = "receptor_upgradient_of_source"
	// The receptor lies within the source footprint.
	CaveatReceptorInsideSource = "receptor_inside_source"
	// The seepage velocity is outside the plausible range.
	CaveatImplausibleVelocity = "seepage_velocity_implausible"
	// The receptor or screen is deeper than the modelled plume reaches.
	CaveatBelowPlumeReach = "receptor_below_plume_reach"
	// Which mass the decay acts on (or that no decay was assumed).
	CaveatDecayConvention = "decay_convention"
	// No screening level was given or found, so no exceedance is computed.
	CaveatNoScreeningLevel = "no_screening_level"
	// A requested method does not apply to this source (e.g. Domenico for a spill).
	CaveatMethodNotApplicable = "method_not_applicable"
	// A 1D column ignores the receptors' transverse offset and depth.
	CaveatOneDimensional = "one_dimensional_column"
	// Values were taken from the contaminant reference table.
	CaveatReferenceValues = "reference_table_values_used"
	// Source width and depth are not used by an instantaneous release.
	CaveatGeometryIgnored = "source_geometry_ignored"
	// The compound name is not in the reference table but close to an entry.
	CaveatNameNotRecognized = "contaminant_name_not_recognized"
	// The steady state exceeds the level, but no requested time does.
	CaveatExceedsAfterTimes = "exceedance_after_requested_times"
	// How transect mass discharges and stream concentrations are computed.
	CaveatTransectAssumptions = "transect_discharge_assumptions"
	// How the methods treat the compounds formed by decay in a chain.
	CaveatChainMethods = "decay_chain_methods"
	// No closed form gives a compound formed by decay (3D, different
	// retardation factors): the numeric values are the answer.
	CaveatClosedFormUnavailable = "closed_form_unavailable"
	// A source's mass cannot sustain its concentration over the requested
	// times (exhausted, or below SourceSustainFraction of it, before the
	// last requested time).
	CaveatSourceMassInsufficient = "source_mass_insufficient"
	// A source with a mass has a concentration near its solubility (at or
	// above SeparatePhaseFraction of it): a separate phase is likely, and
	// the dissolvable mass given is a lower bound.
	CaveatSeparatePhaseLikely = "source_mass_separate_phase_likely"
	// With the source masses given, no source concentration brings the
	// receptor to the screening level within the requested times.
	CaveatAllowableNotReached = "allowable_not_reached_with_mass"
)

// ScreeningCaution is the message of the general caution on every result.
const ScreeningCaution = "This is a screening estimate computed from idealized models (uniform flow in a " +
	"homogeneous, isotropic aquifer of unlimited extent below a no-flux water table; linear " +
	"equilibrium sorption; first-order decay) and the stated inputs. It is not a substitute for a " +
	"site assessment by a licensed professional, and local regulations and codes govern any decision."

func (r *Result) caveat(code, severity, receptor, format string, args ...any) {
	r.Caveats = append(r.Caveats, Caveat{Code: code, Severity: severity, Message: fmt.Sprintf(format, args...), ReceptorID: receptor})
}

// CaveatCodes returns the codes of the caveats that apply to a receptor:
// the result-wide ones and the receptor's own, in order, each once.
func (r *Result) CaveatCodes(receptorID string) []string {
	seen := map[string]bool{}
	var codes []string
	for _, c := range r.Caveats {
		if (c.ReceptorID == "" || c.ReceptorID == receptorID) && !seen[c.Code] {
			seen[c.Code] = true
			codes = append(codes, c.Code)
		}
	}
	return codes
}
