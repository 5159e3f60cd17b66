package fit

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"downgradient/plume"
)

// CentrelineCone is the slope of the cone around the plume axis within
// which a well counts as near the centreline: |plume_y| <= W/2 +
// CentrelineCone * plume_x, W the source width (0 for a 1D column). Our
// choice: about 5.7 degrees either side of the axis beyond the source's edges.
const CentrelineCone = 0.1

// PoorFitRSquared is the coefficient of determination below which the
// attenuation regression is flagged as a poor fit (our choice).
const PoorFitRSquared = 0.8

// AttenuationConfidence is the level of the regression intervals.
const AttenuationConfidence = 0.95

// AttenuationRequest asks for the attenuation rates implied by monitoring data.
type AttenuationRequest struct {
	// The scenario: source position, flow direction, width, seepage
	// velocity (or K, i, n_e), retardation and longitudinal dispersivity.
	Scenario plume.Scenario
	// The monitoring results.
	Observations []Observation
	// The sampling round to use, T; nil uses every observation as one
	// steady-state data set.
	Time *float64
}

// AttenuationResult holds the rates, in the request's units.
type AttenuationResult struct {
	Units plume.Units `json:"units"`
	// First-order bulk attenuation rate along the centreline, per L: the
	// negative slope of ln C against distance along the flow.
	BulkAttenuationRate float64 `json:"bulk_attenuation_rate"`
	// 95 % confidence interval of the bulk rate (Student t, n-2 degrees of
	// freedom); null with fewer than three points.
	BulkAttenuationRateCI []float64 `json:"bulk_attenuation_rate_ci"`
	// Biodegradation rate by Buscheck & Alcantar (1995), per T; null when
	// concentrations do not fall with distance.
	BiodegradationRate *float64 `json:"biodegradation_rate"`
	// The bulk rate's interval mapped through the same relation, per T.
	BiodegradationRateCI []float64 `json:"biodegradation_rate_ci"`
	// ln 2 / biodegradation_rate, T; null when the rate is null.
	HalfLife *float64 `json:"half_life"`
	// Wells whose detects entered the regression.
	WellsUsed []string `json:"wells_used"`
	// Coefficient of determination of the regression; null with two points.
	RSquared *float64 `json:"r_squared"`
	// Concentration of the fitted line at the source face (plume_x = 0), C.
	InterceptConcentration float64 `json:"intercept_concentration"`
	// Parameters of the relation: seepage velocity (L/T), retardation,
	// contaminant velocity v/R (L/T), longitudinal dispersivity (L).
	SeepageVelocity          float64 `json:"seepage_velocity"`
	Retardation              float64 `json:"retardation"`
	ContaminantVelocity      float64 `json:"contaminant_velocity"`
	LongitudinalDispersivity float64 `json:"longitudinal_dispersivity"`
	// Every observation of the round, with its plume-frame position and
	// how it was used.
	Points []AttenuationPoint `json:"points"`
	// Cautions and notes.
	Caveats []plume.Caveat `json:"caveats"`
}

// AttenuationPoint reports one observation.
type AttenuationPoint struct {
	WellID string  `json:"well_id"`
	PlumeX float64 `json:"plume_x"`
	PlumeY float64 `json:"plume_y"`
	// Concentration (detect) or detection limit (non-detect), C.
	Concentration float64 `json:"concentration"`
	Detected      bool    `json:"detected"`
	// "regression", "non_detect_check" (a censored value checked against the
	// fitted line), "off_centreline", "upgradient" or "other_round".
	Use string `json:"use"`
}

// BuscheckAlcantar is the first-order biodegradation rate, 1/T, from the
// bulk attenuation rate along distance kx (1/L, the negative slope of ln C
// against distance, i.e. k/v_x of the original), the contaminant velocity
// vc = v/R (L/T) and the longitudinal dispersivity alphaX (L), by Buscheck
// & Alcantar (1995):
//
//	lambda = vc/(4 alphaX) * ((1 + 2 alphaX kx)^2 - 1).
//
// It inverts the steady-state 1D advection-dispersion-decay solution
// C = C0 exp(-kx x): substituting into (alphaX v) C” - v C' - R lambda C = 0
// gives lambda = vc (kx + alphaX kx^2), the same expression expanded. The
// rate acts on dissolved and sorbed mass alike (decay_applies_to "total").
// It is evaluated in the expanded form vc kx (1 + alphaX kx), which avoids
// the cancellation in (1 + 2 alphaX kx)^2 - 1 when alphaX kx is small.
func BuscheckAlcantar(kx, vc, alphaX float64) float64 {
	return vc * kx * (1 + alphaX*kx)
}

// Attenuation fits ln C against distance along the plume axis for the
// detects near the centreline and converts the slope to a biodegradation
// rate. Non-detects are censored: they are not put into the regression (not
// as zero, not as the limit); each one near the centreline downgradient of
// the source is checked against the fitted line, and a caveat says when the
// line predicts more than its detection limit there (the true rate is then
// likely larger). Fewer than two detects at distinct distances is a
// FieldErrors on "observations" saying what data would fix it.
func Attenuation(ctx context.Context, req AttenuationRequest) (*AttenuationResult, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	sc := req.Scenario
	if err := ValidateObservations(req.Observations, req.Time != nil); err != nil {
		return nil, err
	}
	if req.Time != nil && (!plume.Finite(*req.Time) || *req.Time < 0) {
		return nil, plume.Invalid("time", fmt.Sprintf("must be a finite number >= 0, got %g", *req.Time))
	}
	md, err := plume.Prepare(sc)
	if err != nil {
		return nil, err
	}
	uf := md.Factors()
	pts := observationPoints(md, req.Observations)

	halfW := 0.0
	if src := md.SourceTerm(); src.Kind == plume.SourceKind3D {
		halfW = src.Width / 2
	}
	res := &AttenuationResult{Units: md.Units(), WellsUsed: []string{}, Points: make([]AttenuationPoint, len(pts)), Caveats: []plume.Caveat{
		{Code: plume.CaveatScreeningEstimate, Severity: plume.SeverityCaution, Message: plume.ScreeningCaution}}}
	sel := res.classify(req, pts, uf, halfW)
	xs, ys, rounds, nonDetects := sel.xs, sel.ys, sel.rounds, sel.nonDetects
	distinct := map[float64]bool{}
	for _, x := range xs {
		distinct[x] = true
	}
	if len(distinct) < 2 {
		msg := fmt.Sprintf("%d detect(s) at %d distinct distance(s) lie near the plume centreline (|plume_y| <= %g + %g plume_x, downgradient of the source face)",
			len(xs), len(distinct), halfW/uf.L, CentrelineCone)
		if req.Time != nil {
			msg += fmt.Sprintf(" in the round at time %g", *req.Time)
		}
		msg += "; the rate needs detected concentrations at two or more distances along the axis, three or more for a confidence interval: add samples from wells along the plume axis"
		if req.Time != nil {
			msg += " or pick another round (rounds present: " + listRounds(rounds) + ")"
		}
		return nil, plume.Invalid("observations", msg)
	}

	intercept, slope := res.regress(xs, ys)
	res.rates(md, farthestRegressionWell(md, pts, res.Points))
	res.attenuationCaveats(md, len(xs), len(res.WellsUsed), nonDetects, pts, intercept, slope)
	return res, nil
}

// selection is the observations sorted by use: the detects near the
// centreline (xs: distance, L; ys: ln C), the non-detects to check against
// the line, and the sampling rounds present.
type selection struct {
	xs, ys, rounds []float64
	nonDetects     []int
}

// classify decides how each observation is used and fills res.Points and
// res.WellsUsed.
func (res *AttenuationResult) classify(req AttenuationRequest, pts []obsPoint, uf plume.UnitFactors, halfW float64) selection {
	var sel selection
	wells := map[string]bool{}
	for i, o := range pts {
		ap := AttenuationPoint{WellID: o.well, PlumeX: o.pt.X / uf.L, PlumeY: o.pt.Y / uf.L, Concentration: o.c / uf.C, Detected: o.detected}
		t := req.Observations[i].Time
		if t != nil {
			sel.rounds = append(sel.rounds, *t)
		}
		switch {
		case req.Time != nil && math.Abs(*t-*req.Time) > 1e-9*math.Max(1, math.Abs(*req.Time)):
			ap.Use = "other_round"
		case o.pt.X < 0:
			ap.Use = "upgradient"
		case math.Abs(o.pt.Y) > halfW+CentrelineCone*o.pt.X:
			ap.Use = "off_centreline"
		case !o.detected:
			ap.Use = "non_detect_check"
			sel.nonDetects = append(sel.nonDetects, i)
		default:
			ap.Use = "regression"
			sel.xs = append(sel.xs, o.pt.X/uf.L)
			sel.ys = append(sel.ys, math.Log(o.c/uf.C))
			if !wells[o.well] {
				wells[o.well] = true
				res.WellsUsed = append(res.WellsUsed, o.well)
			}
		}
		res.Points[i] = ap
	}
	return sel
}

// regress fits ln C = intercept + slope x and sets the bulk rate, its
// interval and r^2 (with three points or more).
func (res *AttenuationResult) regress(xs, ys []float64) (intercept, slope float64) {
	intercept, slope = stat.LinearRegression(xs, ys, nil, false)
	n := len(xs)
	res.BulkAttenuationRate = plume.Clean(-slope)
	res.InterceptConcentration = plume.Clean(math.Exp(math.Min(intercept, 700)))
	if n >= 3 {
		r2 := stat.RSquared(xs, ys, nil, intercept, slope)
		r2 = plume.Clean(math.Max(0, math.Min(1, r2)))
		res.RSquared = &r2
		mx := stat.Mean(xs, nil)
		sxx, ssr := 0.0, 0.0
		for i := range xs {
			sxx += (xs[i] - mx) * (xs[i] - mx)
			e := ys[i] - (intercept + slope*xs[i])
			ssr += e * e
		}
		se := math.Sqrt(ssr / float64(n-2) / sxx)
		tq := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 2)}.Quantile(0.5 + AttenuationConfidence/2)
		res.BulkAttenuationRateCI = []float64{plume.Clean(-slope - tq*se), plume.Clean(-slope + tq*se)}
	}
	return intercept, slope
}

// farthestRegressionWell is the regression well farthest along the axis:
// with dispersivities estimated at each point's own distance, the
// Buscheck & Alcantar relation uses the one estimated there (the plume
// scale the data span).
func farthestRegressionWell(md *plume.Model, pts []obsPoint, use []AttenuationPoint) plume.Point {
	far := pts[0].pt
	for i, o := range pts {
		if use[i].Use == "regression" && o.pt.X > far.X {
			far = o.pt
		}
	}
	return far
}

// rates converts the bulk rate into the Buscheck & Alcantar biodegradation
// rate with md's velocity, retardation and dispersivity (at the point far
// when each point has its own).
func (res *AttenuationResult) rates(md *plume.Model, far plume.Point) {
	uf := md.Factors()

	tr := md.TransportAt(far)
	v := tr.V / (uf.L / uf.T)
	R := tr.R
	vc := v / R
	alpha := tr.Alpha[0] / uf.L
	res.SeepageVelocity, res.Retardation, res.ContaminantVelocity, res.LongitudinalDispersivity = plume.Clean(v), plume.Clean(R), plume.Clean(vc), plume.Clean(alpha)
	k := res.BulkAttenuationRate
	if k > 0 {
		lam := plume.Clean(BuscheckAlcantar(k, vc, alpha))
		res.BiodegradationRate = &lam
		hl := plume.Clean(math.Ln2 / lam)
		res.HalfLife = &hl
		if ci := res.BulkAttenuationRateCI; ci != nil {
			lo := 0.0
			if ci[0] > 0 {
				lo = plume.Clean(BuscheckAlcantar(ci[0], vc, alpha))
			}
			res.BiodegradationRateCI = []float64{lo, plume.Clean(BuscheckAlcantar(math.Max(ci[1], 0), vc, alpha))}
		}
	}
}

func listRounds(ts []float64) string {
	sort.Float64s(ts)
	var out []string
	for i, t := range ts {
		if i == 0 || t != ts[i-1] {
			out = append(out, fmt.Sprintf("%g", t))
		}
		if len(out) == 20 {
			out = append(out, "...")
			break
		}
	}
	return strings.Join(out, ", ")
}

// attenuationCaveats adds the caveats of an attenuation result.
func (res *AttenuationResult) attenuationCaveats(md *plume.Model, n, nWells int, nonDetects []int, pts []obsPoint, intercept, slope float64) {
	add := func(code, sev, format string, args ...any) {
		res.Caveats = append(res.Caveats, plume.Caveat{Code: code, Severity: sev, Message: fmt.Sprintf(format, args...)})
	}
	u, uf := md.Units(), md.Factors()
	if nWells < 3 || n < 3 {
		add(CaveatFewCentrelineWells, plume.SeverityWarning,
			"Only %d well(s) (%d detect(s)) near the plume centreline entered the regression; with fewer than three the rate has no confidence interval and rests on too few points. Sample more wells along the plume axis.", nWells, n)
	}
	if res.RSquared != nil && *res.RSquared < PoorFitRSquared {
		add(CaveatPoorFit, plume.SeverityWarning,
			"The regression of ln C on distance explains %.0f %% of the variance (r^2 = %.3f < %.1f): the data do not follow one exponential decline along the axis; the rates are poorly determined.", 100**res.RSquared, *res.RSquared, PoorFitRSquared)
	}
	if res.BiodegradationRate == nil {
		add(CaveatNoAttenuation, plume.SeverityWarning,
			"Concentrations near the centreline do not fall with distance (bulk rate %.4g per %s): no biodegradation rate can be derived. The plume may still be expanding, or the wells may not lie on its axis.", res.BulkAttenuationRate, u.Length)
	}
	add(CaveatNonDetects, plume.SeverityNote,
		"Non-detects are censored values: they are not entered in the regression (neither as zero nor at the detection limit). Each one near the centreline downgradient of the source is checked against the fitted line instead.")
	for _, i := range nonDetects {
		o := pts[i]
		pred := math.Exp(intercept + slope*o.pt.X/uf.L)
		if pred > o.c/uf.C {
			res.Caveats = append(res.Caveats, plume.Caveat{Code: CaveatNonDetectAboveFit, Severity: plume.SeverityCaution, ReceptorID: o.well, Message: fmt.Sprintf(
				"The fitted line predicts %.4g %s at %s (plume_x %.4g %s), above its detection limit of %.4g %s: concentrations fall faster there than the fit says, so the rates reported are likely low (conservative).",
				pred, u.Concentration, o.well, o.pt.X/uf.L, u.Length, o.c/uf.C, u.Concentration)})
		}
	}
	add(CaveatSteadyPlumeAssumed, plume.SeverityCaution,
		"The biodegradation rate follows Buscheck & Alcantar (1995): it assumes a plume at steady state, one-dimensional transport along the axis (transverse dilution is counted as biodegradation, so the rate is an upper estimate), and this scenario's seepage velocity (%.4g %s/%s), retardation (%.4g) and longitudinal dispersivity (%.4g %s), to which it is sensitive. The rate acts on dissolved and sorbed mass alike: use it as contaminant.half_life with decay_applies_to \"total\" (for \"dissolved\" the equivalent rate is R times larger).",
		res.SeepageVelocity, u.Length, u.Time, res.Retardation, res.LongitudinalDispersivity, u.Length)
	if md.Derived().DispersivityEstimated {
		add(plume.CaveatDispersivityEstimated, plume.SeverityCaution,
			"The longitudinal dispersivity (%.4g %s) was estimated (%s), not measured: at aquifer.dispersivity_scale when given, else at the distance of the farthest well in the regression.", res.LongitudinalDispersivity, u.Length, plume.DispersivityRelation)
	}
}
