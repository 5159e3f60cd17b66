package plume

import (
	"fmt"
	"math"
)

// fmtr formats canonical quantities in the request's units for messages.
type fmtr struct {
	u Units
	f unitFactors
}

func (x fmtr) length(m float64) string { return fmt.Sprintf("%.4g %s", m/x.f.L, x.u.Length) }
func (x fmtr) timeOf(d float64) string { return fmt.Sprintf("%.4g %s", d/x.f.T, x.u.Time) }
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
	one := compoundInfo{decayAppliesTo: res.Derived.DecayAppliesTo}
	if len(m.compounds) == 0 {
		decayCaveat(res, &m.compoundParams, one, fm)
	}
	if res.Derived.DispersivityEstimated {
		res.caveat(CaveatDispersivityEstimated, SeverityCaution, "", "%s", m.dispersivityMessage(fm))
	}
	if m.v < PlausibleVelocityMin || m.v > PlausibleVelocityMax {
		res.caveat(CaveatImplausibleVelocity, SeverityCaution, "",
			"The seepage velocity %s is outside the range usually met in aquifers (%s to %s, common practice); check the units and inputs.",
			fm.velocity(m.v), fm.velocity(PlausibleVelocityMin), fm.velocity(PlausibleVelocityMax))
	}
	if len(m.compounds) == 0 {
		m.levelCaveats(res, &m.compoundParams, one, fm)
	}
	if len(res.Transects) > 0 {
		res.caveat(CaveatTransectAssumptions, SeverityNote, "",
			"Transect mass discharges are advective only (the Darcy flux n_e v across the line times the concentration, integrated over the line and its depth interval; dispersive flux is not counted). A stream concentration assumes all of the discharge enters the stream and mixes fully in the given stream flow, with no dilution by the stream's own groundwater inflow beyond that flow.")
	}
	if len(m.compounds) == 0 {
		referenceCaveats(res, res.Derived, &m.compoundParams, "")
	} else {
		m.chainCaveats(res, run, fm)
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
				res.caveat(CaveatOneDimensional, SeverityNote, "", "%s", oneDimensionalMessage)
				break
			}
		}
	}

}

// oneDimensionalMessage is the message of CaveatOneDimensional.
const oneDimensionalMessage = "The source has no width and depth, so it is a 1D column (no transverse or vertical spreading): receptors' transverse offsets and depths are ignored, which overstates concentrations off the axis."

// receptorCaveats are the caveats of one receptor.
func (m *model) receptorCaveats(res *Result, rr *ReceptorResult, p Point, opt Options, fm fmtr) {
	switch {
	case p.upgradient():
		res.caveat(CaveatReceptorUpgradient, SeverityWarning, p.ID,
			"The receptor is upgradient of the source (%s along the flow from the source's downgradient face): the model covers only the downgradient side. Its values are reported as 0 but are not a model result (status not_modelled_upgradient; nothing is compared with the screening level).",
			fm.length(p.X))
	case p.inside():
		res.caveat(CaveatReceptorInsideSource, SeverityWarning, p.ID,
			"The receptor lies within the source zone (%s along the flow from the source's downgradient face; the zone is taken as the source footprint reaching one source width upgradient of that face): values reported are the source concentration.",
			fm.length(p.X))
	}
	m.lateExceedance(res, rr, p, fm)
	if rr.DomenicoDeviation != nil && *rr.DomenicoDeviation > opt.DomenicoTolerance {
		res.caveat(CaveatDomenicoDeviation, SeverityWarning, p.ID,
			"The Domenico approximation differs from the exact solution by %s here (tolerance %.3g %%); use the exact value. The approximation is known to fail where the longitudinal dispersivity is large relative to the distance.",
			deviationText(*rr.DomenicoDeviation), 100*opt.DomenicoTolerance)
	}
	if !p.upgradient() && !p.inside() && m.kind != SourceKind1D {
		srcDepth := m.depth
		dist := math.Max(p.X, 0)
		if m.kind == SourceKindInstantaneous {
			srcDepth = m.relDepth
			dist = math.Hypot(p.X, p.Y)
		}
		alpha := m.aquiferFor(p).alpha
		reach := srcDepth + 3*math.Sqrt(2*alpha[2]*math.Max(dist, alpha[0]))
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

// dispersivityMessage explains an estimated dispersivity and its basis.
func (m *model) dispersivityMessage(fm fmtr) string {
	const scatter = " Field dispersivities scatter by an order of magnitude around such relations."
	switch m.basis {
	case BasisReceptorDistance:
		return fmt.Sprintf("Dispersivities not given were estimated (%s) for each receptor at its own travel distance from the source (at least %s; see receptors[].dispersivity), so that no receptor's answer depends on which other receptors were sent. Give aquifer.dispersivity, or aquifer.dispersivity_scale for one plume-scale estimate, to use one value everywhere.%s",
			DispersivityRelation, fm.length(MinTravelDistance), scatter)
	case BasisScale:
		msg := fmt.Sprintf("Dispersivities not given were estimated (%s) at the plume scale aquifer.dispersivity_scale = %s: alpha_L = %s, alpha_T = %s, alpha_V = %s.%s",
			DispersivityRelation, fm.length(m.travelRaw), fm.length(m.alpha[0]), fm.length(m.alpha[1]), fm.length(m.alpha[2]), scatter)
		if m.travelRaw < MinTravelDistance {
			msg += fmt.Sprintf(" The scale is below %s, so the relation was evaluated at %s.", fm.length(MinTravelDistance), fm.length(MinTravelDistance))
		}
		return msg
	}
	return fmt.Sprintf("The longitudinal dispersivity was given (%s); the transverse and vertical dispersivities not given were taken as alpha_L/10 and alpha_L/100 (common practice): alpha_T = %s, alpha_V = %s.%s",
		fm.length(m.alpha[0]), fm.length(m.alpha[1]), fm.length(m.alpha[2]), scatter)
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
			if math.Max(*e, v) >= floor {
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
			if math.Max(*e, v) >= floor {
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

// lateExceedance warns when a receptor's steady state reaches the screening
// level but no requested time does: the times may be too short, or in the
// wrong unit (days given where years were meant).
func (m *model) lateExceedance(res *Result, rr *ReceptorResult, p Point, fm fmtr) {
	if m.screening == nil || len(rr.Series) == 0 || rr.FirstExceedanceTime == nil || p.Status != StatusModelled {
		return
	}
	for _, sp := range rr.Series {
		for _, v := range []*float64{sp.Exact, sp.Domenico, sp.Numeric} {
			if v != nil && *v >= *m.screening {
				return
			}
		}
	}
	last := rr.Series[len(rr.Series)-1].Time
	res.caveat(CaveatExceedsAfterTimes, SeverityWarning, p.ID,
		"The screening level is reached here at %s, after every requested time (the last is %g %s): the values at the requested times are all below the level, but the receptor exceeds later. Check that the times are long enough and in the unit intended (units.time is %q).",
		fm.timeOf(*rr.FirstExceedanceTime), last, fm.u.Time, fm.u.Time)
}

// nameMessage explains a contaminant name the reference table does not
// hold ("" when the table matched it or no name was given): a likely
// misspelling names the entry meant.
func nameMessage(matched, name, path string) string {
	if matched != "" || name == "" {
		return ""
	}
	if s, ok := SuggestContaminant(name); ok {
		return fmt.Sprintf("%s.name %q is not in the reference table; did you mean %q? Nothing was taken from the table (no default Koc, screening level or solubility): correct the name to use the table's values, or give them all.", path, name, s)
	}
	return ""
}

// sourceLabel names one of several sources in a message ("" for a lone one).
func sourceLabel(s *sourceParams) string {
	if s.id == "" {
		return ""
	}
	return fmt.Sprintf(" of source %q", s.id)
}

// deviationText words a relative deviation for a caveat: "up to 12.5 %",
// or beyond a factor of a million (where a percentage would be unreadable,
// or past the float64 range) "more than a factor of a million".
func deviationText(dev float64) string {
	if dev > 1e6 {
		return "more than a factor of a million"
	}
	return fmt.Sprintf("up to %.3g %%", 100*dev)
}
