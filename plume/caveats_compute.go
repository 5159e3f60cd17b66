package plume

import (
	"fmt"
	"math"
	"strings"
)

// fmtr formats canonical quantities in the request's units for messages.
type fmtr struct {
	u Units
	f unitFactors
}

func (x fmtr) length(m float64) string { return fmt.Sprintf("%.4g %s", m/x.f.L, x.u.Length) }
func (x fmtr) conc(c float64) string   { return fmt.Sprintf("%.4g %s", c/x.f.C, x.u.Concentration) }
func (x fmtr) rate(r float64) string   { return fmt.Sprintf("%.4g per %s", r*x.f.T, x.u.Time) }
func (x fmtr) velocity(v float64) string {
	return fmt.Sprintf("%.4g %s/%s", v/(x.f.L/x.f.T), x.u.Length, x.u.Time)
}

// addCaveats attaches the general caution and the computed caveats; values in
// res are still canonical.
func (m *model) addCaveats(res *Result, pts []Point, run methods, opt Options, u Units, uf unitFactors) {
	fm := fmtr{u: u, f: uf}
	computed := res.Caveats
	res.Caveats = []Caveat{{Code: CaveatScreeningEstimate, Severity: SeverityCaution, Message: ScreeningCaution}}
	m.modelCaveats(res, pts, run, fm)
	for i, p := range pts {
		m.receptorCaveats(res, &res.Receptors[i], p, opt, fm)
	}
	res.Caveats = append(res.Caveats, computed...)
}

// modelCaveats are the caveats of the model as a whole.
func (m *model) modelCaveats(res *Result, pts []Point, run methods, fm fmtr) {
	// Decay convention.
	switch {
	case m.lambda == 0:
		res.caveat(CaveatDecayConvention, SeverityNote, "",
			"No decay assumed (half-life null): conservative for a compound that degrades.")
	case res.Derived.DecayAppliesTo == DecayDissolved:
		res.caveat(CaveatDecayConvention, SeverityNote, "",
			"The half-life acts on the dissolved phase only (decay_applies_to = dissolved): the decay rate ln2/half-life = %s is divided by R = %.4g, giving %s in the retarded equation.",
			fm.rate(m.lambda), m.r, fm.rate(m.mu))
	default:
		res.caveat(CaveatDecayConvention, SeverityNote, "",
			"The half-life acts on dissolved and sorbed mass alike (decay_applies_to = total): the decay rate ln2/half-life = %s is used as is in the retarded equation.",
			fm.rate(m.lambda))
	}
	if res.Derived.DispersivityEstimated {
		msg := fmt.Sprintf("Dispersivities not given were estimated (%s) for a travel distance of %s: alpha_L = %s, alpha_T = %s, alpha_V = %s. Field dispersivities scatter by an order of magnitude around such relations.",
			DispersivityRelation, fm.length(derefOr(m.travel, 0)), fm.length(m.alpha[0]), fm.length(m.alpha[1]), fm.length(m.alpha[2]))
		if m.travel != nil && m.travelRaw < MinTravelDistance {
			msg += fmt.Sprintf(" The farthest receptor is less than %s downgradient, so the relation was evaluated at %s.", fm.length(MinTravelDistance), fm.length(MinTravelDistance))
		}
		res.caveat(CaveatDispersivityEstimated, SeverityCaution, "", "%s", msg)
	}
	if m.v < PlausibleVelocityMin || m.v > PlausibleVelocityMax {
		res.caveat(CaveatImplausibleVelocity, SeverityCaution, "",
			"The seepage velocity %s is outside the range usually met in aquifers (%s to %s, common practice); check the units and inputs.",
			fm.velocity(m.v), fm.velocity(PlausibleVelocityMin), fm.velocity(PlausibleVelocityMax))
	}
	if m.solubility != nil && m.kind != SourceKindInstantaneous && m.c0 > *m.solubility {
		res.caveat(CaveatAboveSolubility, SeverityWarning, "",
			"The source concentration %s is above the aqueous solubility %s: a separate (non-aqueous) phase is likely, and the source may last much longer than a dissolved-only model assumes.",
			fm.conc(m.c0), fm.conc(*m.solubility))
	}
	if m.screening == nil {
		res.caveat(CaveatNoScreeningLevel, SeverityNote, "",
			"No screening level was given or found in the reference table, so no exceedance is reported.")
	}
	if len(res.Derived.FromReferenceTable) > 0 {
		res.caveat(CaveatReferenceValues, SeverityNote, "",
			"Values taken from the contaminant reference table (%s): %s. Site-specific values are preferable.",
			res.Derived.ReferenceCompound, strings.Join(res.Derived.FromReferenceTable, ", "))
	}
	if run.domenicoSkipped {
		res.caveat(CaveatMethodNotApplicable, SeverityNote, "",
			"The Domenico approximation describes a continuous source; it is not computed for an instantaneous release.")
	}
	if m.geomUnused {
		res.caveat(CaveatGeometryIgnored, SeverityNote, "",
			"Source width and depth are not used for an instantaneous release, which is treated as a point mass.")
	}
	if m.kind == SourceKind1D {
		for _, p := range pts {
			if p.Y != 0 || p.Bottom != 0 {
				res.caveat(CaveatOneDimensional, SeverityNote, "",
					"The source has no width and depth, so it is a 1D column (no transverse or vertical spreading): receptors' transverse offsets and depths are ignored, which overstates concentrations off the axis.")
				break
			}
		}
	}

}

// receptorCaveats are the caveats of one receptor.
func (m *model) receptorCaveats(res *Result, rr *ReceptorResult, p Point, opt Options, fm fmtr) {
	switch {
	case p.upgradient():
		res.caveat(CaveatReceptorUpgradient, SeverityWarning, p.ID,
			"The receptor is upgradient of the source (%s along the flow from the source's downgradient face): the model covers only the downgradient side, and values are reported as 0.",
			fm.length(p.X))
	case p.inside():
		res.caveat(CaveatReceptorInsideSource, SeverityWarning, p.ID,
			"The receptor lies within the source zone (%s along the flow from the source's downgradient face; the zone is taken as the source footprint reaching one source width upgradient of that face): values reported are the source concentration.",
			fm.length(p.X))
	}
	if rr.DomenicoDeviation != nil && *rr.DomenicoDeviation > opt.DomenicoTolerance {
		res.caveat(CaveatDomenicoDeviation, SeverityWarning, p.ID,
			"The Domenico approximation differs from the exact solution by up to %.3g %% here (tolerance %.3g %%); use the exact value. The approximation is known to fail where the longitudinal dispersivity is large relative to the distance.",
			100**rr.DomenicoDeviation, 100*opt.DomenicoTolerance)
	}
	if !p.upgradient() && !p.inside() && m.kind != SourceKind1D {
		srcDepth := m.depth
		dist := math.Max(p.X, 0)
		if m.kind == SourceKindInstantaneous {
			srcDepth = m.relDepth
			dist = math.Hypot(p.X, p.Y)
		}
		reach := srcDepth + 3*math.Sqrt(2*m.alpha[2]*math.Max(dist, m.alpha[0]))
		switch {
		case p.Top > reach:
			res.caveat(CaveatBelowPlumeReach, SeverityCaution, p.ID,
				"The receptor (top at %s) is deeper than the modelled plume reaches at this distance (about %s: source depth plus three vertical spreads sqrt(2 alpha_V x)); the model predicts little there, but a plume pushed down by recharge or vertical gradients is not represented.",
				fm.length(p.Top), fm.length(reach))
		case p.Screen && p.Bottom > reach:
			res.caveat(CaveatBelowPlumeReach, SeverityNote, p.ID,
				"The well screen extends to %s, below the modelled plume's reach of about %s: the depth average dilutes the value with clean water, as pumping would.",
				fm.length(p.Bottom), fm.length(reach))
		}
	}
}

func derefOr(p *float64, d float64) float64 {
	if p == nil {
		return d
	}
	return *p
}

// attachNumeric stores the numeric values and their agreement with the exact
// solution (values still canonical).
// times are the request's (for reporting), taus the elapsed days.
func (m *model) attachNumeric(res *Result, nr *numericRun, pts []Point, times, taus []float64, floor, tol float64) {
	for i := range res.Receptors {
		rr := &res.Receptors[i]
		ag := Agreement{Tolerance: tol, Floor: floor}
		compared := false
		for j := range rr.Series {
			v := nr.values[i][j]
			if math.IsNaN(v) {
				continue // receptor outside the numeric domain
			}
			rr.Series[j].Numeric = Ptr(v)
			e := rr.Series[j].Exact
			if e == nil {
				ev := m.closedForm(true, pts[i], taus[j])
				e = &ev
			}
			if math.Max(*e, v) >= floor && *e > 0 {
				d := math.Abs(v-*e) / math.Max(*e, floor)
				if !compared || d > ag.MaxRelativeDifference {
					ag.MaxRelativeDifference, ag.Time, ag.AtSteadyState = d, times[j], false
				}
				compared = true
			}
		}
		if nr.steady != nil && !math.IsNaN(nr.steady[i]) {
			v := nr.steady[i]
			rr.SteadyState.Numeric = Ptr(v)
			e := rr.SteadyState.Exact
			if e == nil {
				ev := m.closedForm(true, pts[i], math.Inf(1))
				e = &ev
			}
			if math.Max(*e, v) >= floor && *e > 0 {
				d := math.Abs(v-*e) / math.Max(*e, floor)
				ag.SteadyStateRelativeDifference = Ptr(d)
				if !compared || d > ag.MaxRelativeDifference {
					ag.MaxRelativeDifference, ag.Time, ag.AtSteadyState = d, 0, true
				}
				compared = true
			}
		}
		if !compared {
			continue
		}
		ag.WithinTolerance = ag.MaxRelativeDifference <= tol
		rr.NumericAgreement = &ag
		if !ag.WithinTolerance {
			res.caveat(CaveatNumericDisagreement, SeverityCaution, rr.ID,
				"The numeric cross-check differs from the exact solution by %.3g %% %s (tolerance %.3g %%); the grid may be too coarse here, or the inputs are at the edge of the closed forms' assumptions.",
				100*ag.MaxRelativeDifference, ag.where(res.Units.Time), 100*tol)
		}
	}
}

// where says at which time the largest difference occurs, in words.
func (ag Agreement) where(timeUnit string) string {
	if ag.AtSteadyState {
		return "at steady state"
	}
	return fmt.Sprintf("at time %g %s", ag.Time, timeUnit)
}
