package fit

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distuv"

	"downgradient/plume"
)

// Parameters a calibration may fit (JSON paths of the scenario).
var CalibrationParameters = []string{
	"source.concentration",
	"contaminant.half_life",
	"source.half_life",
	"aquifer.dispersivity.longitudinal",
	"aquifer.seepage_velocity",
	"contaminants[].half_life",
	"contaminants[].source_concentration",
}

// calibrationPattern is a fit path with any index replaced by [] (the
// form of CalibrationParameters), and the index (-1 without one).
func calibrationPattern(path string) (string, int) {
	open, end := strings.IndexByte(path, '['), strings.IndexByte(path, ']')
	if open < 0 || end < open {
		return path, -1
	}
	i, err := strconv.Atoi(path[open+1 : end])
	if err != nil || i < 0 {
		return path, -1
	}
	return path[:open+1] + path[end:], i
}

// CalibrationConfidence is the level of the fitted values' intervals.
const CalibrationConfidence = 0.95

// CalibrationRequest asks for the parameter values that best reproduce the
// observations.
type CalibrationRequest struct {
	// The scenario; its values of the fitted parameters are the starting
	// point (a missing one starts from a default, see Calibrate).
	Scenario plume.Scenario
	// The monitoring results; each needs a time.
	Observations []Observation
	// The JSON paths to fit, from CalibrationParameters, each once.
	Fit []string
	// Optional bounds per fitted path, [low, high], 0 < low < high, in the
	// field's unit; default [start/1000, start*1000].
	Bounds map[string][2]float64
	// The compound observed, for a scenario of several (contaminants[]);
	// "" for a scenario of one. See plume.Model.Focus.
	Compound string
}

// CalibrationResult is a fit, in the request's units.
type CalibrationResult struct {
	Units plume.Units `json:"units"`
	// Fitted values by JSON path.
	Fitted map[string]FittedValue `json:"fitted"`
	// One residual per observation, in request order.
	Residuals []Residual `json:"residuals"`
	// Root mean square of the residuals, log10 units (detects and
	// non-detects above their limit).
	RMSELog10 float64 `json:"rmse_log10"`
	// Detects, non-detects, fitted parameters and residual degrees of freedom.
	Detects          int `json:"detects"`
	NonDetects       int `json:"non_detects"`
	DegreesOfFreedom int `json:"degrees_of_freedom"`
	// Model evaluations the optimizer used.
	Evaluations int `json:"evaluations"`
	// The scenario with the fitted values (and the dispersivities the fit
	// used); the caller may describe it.
	FittedScenario FittedScenario `json:"fitted_scenario"`
	// The screening recomputed with the fitted values (filled by the caller).
	Screening *plume.Result `json:"screening"`
	// Cautions and notes.
	Caveats []plume.Caveat `json:"caveats"`
}

// FittedScenario is a scenario as a request would send it (with an
// optional free-text description), so it can be posted back as is.
type FittedScenario struct {
	plume.Scenario
	// Free text; says the values were fitted.
	Description *string `json:"description,omitempty"`
}

// FittedValue is one fitted parameter.
type FittedValue struct {
	Value float64 `json:"value"`
	// Approximate 95 % confidence interval from the Jacobian (linearised, in ln of the value).
	CI []float64 `json:"ci"`
	// The starting value and the bounds searched.
	Initial float64   `json:"initial"`
	Bounds  []float64 `json:"bounds"`
	// True when the value sits within 0.1 % (in ln) of a bound.
	AtBound bool `json:"at_bound"`
}

// Residual compares one observation with the fitted model.
type Residual struct {
	WellID string  `json:"well_id"`
	Time   float64 `json:"time"`
	// Concentration (detect) or detection limit (non-detect), C.
	Observed float64 `json:"observed"`
	Detected bool    `json:"detected"`
	// Fitted model concentration, C.
	Modelled float64 `json:"modelled"`
	// log10(modelled) - log10(observed) for a detect; for a non-detect
	// max(0, log10(modelled) - log10(detection limit)): a censored value
	// costs nothing while the model stays below its limit.
	ResidualLog10 float64 `json:"residual_log10"`
}

// calibrationFloorFactor sets the smallest model concentration used in a
// logarithm: this factor times the smallest observed value or detection
// limit (a model value of 0 then costs a bounded residual, about 8 in log10).
const calibrationFloorFactor = 1e-8

// Calibrate fits the chosen parameters by least squares on log10
// concentrations with the exact closed form, with bounds: each parameter is
// searched in ln space through a logistic map onto its bounds, by gonum's
// Nelder-Mead (restarted once from its answer). Non-detects enter as
// one-sided (censored) residuals: zero while the model is below the
// detection limit, the log10 excess above it otherwise. Intervals are
// linearised: the Jacobian J of the residuals with respect to ln p at the
// optimum gives cov(ln p) = s^2 (J^T J)^-1 with s^2 = SSE / (detects - p), and
// ln p +- t(0.975, detects - p) sd. An under-determined fit (fewer detects
// than parameters + 1, a parameter the data do not touch, or parameters the
// data cannot tell apart) is an *plume.Error saying what data would fix it.
func Calibrate(ctx context.Context, req CalibrationRequest) (*CalibrationResult, error) {
	params, err := checkCalibration(req)
	if err != nil {
		return nil, err
	}
	pb, err := newFitProblem(req, params)
	if err != nil {
		return nil, err
	}
	z, err := pb.minimize(ctx)
	if err != nil {
		return nil, err
	}
	best := make([]float64, pb.np)
	pb.toP(z, best)
	model := make([]float64, len(pb.obs))
	r := make([]float64, len(pb.obs))
	pb.residuals(best, r, model)
	cov, err := pb.covariance(best)
	if err != nil {
		return nil, err
	}
	return pb.result(best, r, model, cov), nil
}

// checkCalibration validates the request's own fields and returns the
// parameters to fit.
func checkCalibration(req CalibrationRequest) ([]plume.Param, error) {
	var fe plume.FieldErrors
	seen := map[string]bool{}
	if len(req.Fit) == 0 {
		fe.Add("fit", "name at least one parameter to fit, from "+strings.Join(CalibrationParameters, ", "))
	}
	params := make([]plume.Param, 0, len(req.Fit))
	for i, p := range req.Fit {
		pat, idx := calibrationPattern(p)
		ok := false
		for _, c := range CalibrationParameters {
			ok = ok || c == pat
		}
		switch {
		case ok && idx >= len(req.Scenario.Contaminants):
			fe.Add(fmt.Sprintf("fit[%d]", i), fmt.Sprintf("%q: the scenario has %d compound(s) in contaminants", p, len(req.Scenario.Contaminants)))
		case !ok:
			fe.Add(fmt.Sprintf("fit[%d]", i), fmt.Sprintf("must be one of %s, got %q", strings.Join(CalibrationParameters, ", "), p))
		case seen[p]:
			fe.Add(fmt.Sprintf("fit[%d]", i), fmt.Sprintf("%q is listed twice", p))
		default:
			prm, err := plume.ParseParam(p)
			if err != nil {
				fe.Add(fmt.Sprintf("fit[%d]", i), err.Error())
			}
			params = append(params, prm)
		}
		seen[p] = true
	}
	paths := make([]string, 0, len(req.Bounds))
	for p := range req.Bounds {
		paths = append(paths, p)
	}
	sort.Strings(paths)
	for _, p := range paths {
		b := req.Bounds[p]
		field := "bounds." + p
		switch {
		case !seen[p]:
			fe.Add(field, "bounds given for a parameter not in fit")
		case !(plume.Finite(b[0]) && plume.Finite(b[1]) && b[0] > 0 && b[1] > b[0]):
			fe.Add(field, fmt.Sprintf("must be [low, high] with 0 < low < high, finite; got [%g, %g]", b[0], b[1]))
		}
	}
	if err := ValidateObservations(req.Observations, true); err != nil {
		fe = append(fe, plume.FieldsOf(err)...)
	}
	if len(fe) > 0 {
		return nil, fe.Err()
	}
	if src := req.Scenario.Source; src.Mass != nil && src.Concentration == nil && seen["source.concentration"] {
		return nil, plume.Invalid("fit", "source.concentration cannot be fitted for an instantaneous release (source.mass); fit the other parameters")
	}
	return params, nil
}

// fitProblem is a calibration ready to run: the observations in the plume
// frame, the evaluation scenario, the starting values and the bounds.
type fitProblem struct {
	req     CalibrationRequest
	params  []plume.Param
	base    *plume.Model
	obs     []obsPoint
	np      int
	detects int
	floor   float64        // smallest model concentration in a logarithm, mg/L
	evalSc  plume.Scenario // the scenario evaluated at each step
	init    []float64      // starting values, request units
	lo, hi  []float64      // bounds, request units
	evals   int            // model evaluations so far
}

// newFitProblem prepares the scenario, places the observations and picks
// the starting values and bounds.
func newFitProblem(req CalibrationRequest, params []plume.Param) (*fitProblem, error) {
	sc := req.Scenario
	base, err := plume.Prepare(sc)
	if err == nil {
		base, err = base.Focus(req.Compound)
	}
	if err != nil {
		return nil, err
	}
	pb := &fitProblem{req: req, params: params, base: base, obs: observationPoints(base, req.Observations), np: len(req.Fit)}
	minObs := math.Inf(1)
	for _, o := range pb.obs {
		if o.detected {
			pb.detects++
		}
		minObs = math.Min(minObs, o.c)
	}
	if pb.detects < pb.np+1 {
		return nil, plume.Invalid("observations", fmt.Sprintf(
			"fitting %d parameter(s) needs at least %d detected concentrations (one more than the parameters, to estimate the scatter); got %d detect(s) and %d non-detect(s): add detected samples, at several distances for dispersivity and velocity and at several times for half-lives, or fit fewer parameters",
			pb.np, pb.np+1, pb.detects, len(pb.obs)-pb.detects))
	}
	pb.floor = calibrationFloorFactor * minObs

	// The evaluation scenario: the request's, with the dispersivities the
	// fit uses fixed (an estimate depends on the travel distance) and one
	// receptor (Validate needs one; receptors do not enter the fit).
	pb.evalSc = sc
	if alpha, fixed := pb.fixedDispersivity(); fixed {
		uf := base.Factors()
		pb.evalSc.Aquifer.Dispersivity = &plume.Dispersivity{Longitudinal: plume.Ptr(alpha[0] / uf.L), Transverse: plume.Ptr(alpha[1] / uf.L), Vertical: plume.Ptr(alpha[2] / uf.L)}
	}
	pb.evalSc.Receptors = []plume.Receptor{{ID: "fit", X: plume.Ptr(0), Y: plume.Ptr(0)}}
	if sc.Source.X != nil {
		pb.evalSc.Receptors[0].X = sc.Source.X
	}
	if sc.Source.Y != nil {
		pb.evalSc.Receptors[0].Y = sc.Source.Y
	}
	pb.startingValues()
	return pb, nil
}

// fixedDispersivity is the dispersivities, m, the fit holds fixed (or
// starts alpha_L from): the model's own when it has one for the whole
// plume (given, or estimated at aquifer.dispersivity_scale); with
// dispersivities estimated at each receptor's own distance, those of the
// farthest observation when alpha_L is fitted (fixed false otherwise: each
// observation is then evaluated at its own distance).
func (pb *fitProblem) fixedDispersivity() (alpha [3]float64, fixed bool) {
	if pb.base.Derived().DispersivityBasis != plume.BasisReceptorDistance {
		return pb.base.Transport().Alpha, true
	}
	far := pb.obs[0].pt
	for _, o := range pb.obs {
		if o.pt.X > far.X {
			far = o.pt
		}
	}
	fitsAlpha := false
	for _, p := range pb.req.Fit {
		fitsAlpha = fitsAlpha || p == "aquifer.dispersivity.longitudinal"
	}
	return pb.base.TransportAt(far).Alpha, fitsAlpha
}

// startingValues sets init, lo and hi in the request's units: the
// scenario's values (a missing half-life starts at the latest observation
// time), bounds [start/1000, start*1000] unless given.
func (pb *fitProblem) startingValues() {
	uf, tr, src := pb.base.Factors(), pb.base.Transport(), pb.base.SourceTerm()
	maxTau := 0.0
	for _, o := range pb.obs {
		maxTau = math.Max(maxTau, o.tau)
	}
	pb.init, pb.lo, pb.hi = make([]float64, pb.np), make([]float64, pb.np), make([]float64, pb.np)
	for j, p := range pb.req.Fit {
		var v float64
		pat, idx := calibrationPattern(p)
		switch pat {
		case "contaminants[].half_life":
			v = math.Max(maxTau, 1) / uf.T
			if hl := pb.req.Scenario.Contaminants[idx].HalfLife; hl != nil && *hl > 0 {
				v = *hl
			}
		case "contaminants[].source_concentration":
			v = 1
			if c := pb.req.Scenario.Contaminants[idx].SourceConcentration; c != nil && *c > 0 {
				v = *c
			}
		case "source.concentration":
			v = src.Concentration / uf.C
		case "contaminant.half_life":
			v = math.Max(maxTau, 1) / uf.T
			if tr.Lambda > 0 {
				v = math.Ln2 / tr.Lambda / uf.T
			}
		case "source.half_life":
			v = math.Max(maxTau, 1) / uf.T
			if src.Depletion > 0 {
				v = math.Ln2 / src.Depletion / uf.T
			}
		case "aquifer.dispersivity.longitudinal":
			alpha, _ := pb.fixedDispersivity()
			v = alpha[0] / uf.L
		case "aquifer.seepage_velocity":
			v = tr.V / (uf.L / uf.T)
		}
		pb.lo[j], pb.hi[j] = v/1000, v*1000
		if b, ok := pb.req.Bounds[p]; ok {
			pb.lo[j], pb.hi[j] = b[0], b[1]
			v = math.Min(math.Max(v, pb.lo[j]), pb.hi[j])
		}
		pb.init[j] = v
	}
}

// toP maps the unbounded search variables z to parameter values p within
// the bounds (logistic map onto [ln lo, ln hi]).
func (pb *fitProblem) toP(z []float64, p []float64) {
	lo, hi := pb.lo, pb.hi
	for j := range z {
		s := 1 / (1 + math.Exp(-z[j]))
		p[j] = math.Exp(math.Log(lo[j]) + (math.Log(hi[j])-math.Log(lo[j]))*s)
		p[j] = math.Min(math.Max(p[j], lo[j]), hi[j])
	}
}

// toZ is the inverse of toP for parameter j.
func (pb *fitProblem) toZ(p float64, j int) float64 {
	lo, hi := pb.lo, pb.hi
	s := (math.Log(p) - math.Log(lo[j])) / (math.Log(hi[j]) - math.Log(lo[j]))
	s = math.Min(math.Max(s, 1e-6), 1-1e-6)
	return math.Log(s / (1 - s))
}

// residuals fills r (and model, when not nil) at parameter values p
// (request units); ok false when the scenario is invalid there (it cannot
// be: bounds keep values > 0).
func (pb *fitProblem) residuals(p []float64, r, model []float64) bool {
	pb.evals++
	s := pb.evalSc
	for j, prm := range pb.params {
		if prm.Set(&s, p[j]) != nil {
			return false
		}
	}
	md, err := plume.Prepare(s)
	if err == nil {
		md, err = md.Focus(pb.req.Compound)
	}
	if err != nil {
		return false
	}
	for i, o := range pb.obs {
		c := md.Value(plume.MethodExact, o.pt, o.tau)
		if model != nil {
			model[i] = c
		}
		d := math.Log10(math.Max(c, pb.floor)) - math.Log10(o.c)
		if !o.detected {
			d = math.Max(0, d)
		}
		r[i] = d
	}
	return true
}

// minimize runs Nelder-Mead from the starting values and returns the best
// search variables z.
func (pb *fitProblem) minimize(ctx context.Context) ([]float64, error) {
	r := make([]float64, len(pb.obs))
	pbuf := make([]float64, pb.np)
	var cancelled error
	sse := func(z []float64) float64 {
		if cancelled != nil {
			return math.MaxFloat64
		}
		if err := ctx.Err(); err != nil {
			cancelled = err
			return math.MaxFloat64
		}
		pb.toP(z, pbuf)
		if !pb.residuals(pbuf, r, nil) {
			return math.MaxFloat64
		}
		s := 0.0
		for _, d := range r {
			s += d * d
		}
		return s
	}
	z := make([]float64, pb.np)
	for j := range z {
		z[j] = pb.toZ(pb.init[j], j)
	}
	settings := &optimize.Settings{FuncEvaluations: 4000, Converger: &optimize.FunctionConverge{Absolute: 1e-12, Relative: 1e-10, Iterations: 60}}
	for range 2 { // one restart from the first answer (common practice with Nelder-Mead)
		res, err := optimize.Minimize(optimize.Problem{Func: sse}, z, settings, &optimize.NelderMead{})
		if cancelled != nil {
			return nil, cancelled
		}
		if res != nil && res.F <= sse(z) {
			copy(z, res.X)
		} else if err != nil && res == nil {
			return nil, fmt.Errorf("calibration: %w", err)
		}
	}
	if cancelled != nil {
		return nil, cancelled
	}
	return z, nil
}

// covariance is (J^T J)^-1 at the optimum, J the Jacobian of the residuals
// with respect to ln p by central differences; a parameter the data do not
// touch, or parameters the data cannot tell apart, is an error saying so.
func (pb *fitProblem) covariance(best []float64) (*mat.Dense, error) {
	const h = 1e-4
	np, nobs := pb.np, len(pb.obs)
	J := mat.NewDense(nobs, np, nil)
	rp, rm := make([]float64, nobs), make([]float64, nobs)
	for j := range np {
		pp := append([]float64(nil), best...)
		pm := append([]float64(nil), best...)
		pp[j] *= math.Exp(h)
		pm[j] *= math.Exp(-h)
		pb.residuals(pp, rp, nil)
		pb.residuals(pm, rm, nil)
		nonzero := false
		for i := range nobs {
			d := (rp[i] - rm[i]) / (2 * h)
			J.Set(i, j, d)
			nonzero = nonzero || math.Abs(d) > 1e-9
		}
		if !nonzero {
			return nil, plume.Invalid("fit", fmt.Sprintf(
				"the observations do not depend on %s at the fitted values (every detect is insensitive to it): add samples where it matters (for half-lives, later times or farther wells; for the source concentration, detects near the source) or leave it out of fit", pb.req.Fit[j]))
		}
	}
	var jtj mat.SymDense
	jtj.SymOuterK(1, J.T())
	var eig mat.EigenSym
	if !eig.Factorize(&jtj, true) {
		return nil, fmt.Errorf("calibration: eigen decomposition failed")
	}
	ev := eig.Values(nil)
	if ev[0] <= 1e-10*ev[np-1] {
		var vecs mat.Dense
		eig.VectorsTo(&vecs)
		var names []string
		for j := range np {
			if math.Abs(vecs.At(j, 0)) > 0.3 {
				names = append(names, pb.req.Fit[j])
			}
		}
		return nil, plume.Invalid("fit", fmt.Sprintf(
			"the observations cannot tell %s apart (only a combination of them is determined): add observations at other distances and times (a time series at one well separates decay from travel time; wells at several distances separate dispersion from decay), or fix one of them",
			strings.Join(names, " and ")))
	}
	var cov mat.Dense
	if err := cov.Inverse(&jtj); err != nil {
		return nil, plume.Invalid("fit", "the fitted parameters are not determined by these observations: add observations at other distances and times or fit fewer parameters")
	}
	return &cov, nil
}

// result assembles the answer at the optimum best with residuals r, model
// values and covariance cov.
func (pb *fitProblem) result(best, r, model []float64, cov *mat.Dense) *CalibrationResult {
	np, obs, uf := pb.np, pb.obs, pb.base.Factors()
	dof := pb.detects - np
	sum, cnt := 0.0, 0
	for i, o := range obs {
		if o.detected || r[i] > 0 {
			sum += r[i] * r[i]
			cnt++
		}
	}
	s2 := sum / float64(dof)
	tq := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(dof)}.Quantile(0.5 + CalibrationConfidence/2)

	out := &CalibrationResult{Units: pb.base.Units(), Fitted: map[string]FittedValue{}, Residuals: make([]Residual, len(obs)),
		Detects: pb.detects, NonDetects: len(obs) - pb.detects, DegreesOfFreedom: dof, Evaluations: pb.evals,
		Caveats: []plume.Caveat{{Code: plume.CaveatScreeningEstimate, Severity: plume.SeverityCaution, Message: plume.ScreeningCaution}}}
	fitted := pb.evalSc
	fitted.Receptors = pb.req.Scenario.Receptors
	for j, path := range pb.req.Fit {
		sd := math.Sqrt(math.Max(s2*cov.At(j, j), 0))
		lnp := math.Log(best[j])
		fv := FittedValue{Value: plume.Clean(best[j]), Initial: plume.Clean(pb.init[j]), Bounds: []float64{pb.lo[j], pb.hi[j]},
			CI: []float64{plume.Clean(math.Exp(lnp - tq*sd)), plume.Clean(math.Exp(lnp + tq*sd))}}
		span := math.Log(pb.hi[j]) - math.Log(pb.lo[j])
		fv.AtBound = lnp-math.Log(pb.lo[j]) < 1e-3*span || math.Log(pb.hi[j])-lnp < 1e-3*span
		out.Fitted[path] = fv
		_ = pb.params[j].Set(&fitted, best[j])
		if fv.AtBound {
			out.Caveats = append(out.Caveats, plume.Caveat{Code: CaveatAtBound, Severity: plume.SeverityWarning, Message: fmt.Sprintf(
				"%s = %.4g sits at a bound of its search range [%.4g, %.4g]: the data push it beyond; widen the bounds or check the scenario.", path, best[j], pb.lo[j], pb.hi[j])})
		}
	}
	pb.fitCaveats(out)
	out.FittedScenario = FittedScenario{Scenario: fitted}
	for i, o := range obs {
		ob := pb.req.Observations[i]
		out.Residuals[i] = Residual{WellID: o.well, Time: *ob.Time, Observed: o.c / uf.C, Detected: o.detected,
			Modelled: plume.Clean(model[i] / uf.C), ResidualLog10: plume.Clean(r[i])}
	}
	out.RMSELog10 = plume.Clean(math.Sqrt(sum / float64(max(cnt, 1))))
	out.Caveats = append(out.Caveats,
		plume.Caveat{Code: CaveatLinearisedIntervals, Severity: plume.SeverityNote, Message: fmt.Sprintf(
			"Intervals are approximate (95 %%, linearised at the optimum from the Jacobian in ln of each parameter, Student t with %d degrees of freedom); they assume independent errors of equal spread in log10 concentration and a correct model, and ignore the uncertainty of the parameters not fitted.", dof)},
		plume.Caveat{Code: CaveatNonDetects, Severity: plume.SeverityNote, Message: "Non-detects are censored values: each costs nothing while the model stays below its detection limit and the log10 excess above it otherwise; they are never set to zero or to the limit."})
	return out
}

// fitCaveats adds the caveats on estimated dispersivities and a fitted velocity.
func (pb *fitProblem) fitCaveats(out *CalibrationResult) {
	if pb.base.Derived().DispersivityEstimated {
		out.Caveats = append(out.Caveats, plume.Caveat{Code: plume.CaveatDispersivityEstimated, Severity: plume.SeverityCaution, Message: fmt.Sprintf(
			"Dispersivities not given were estimated (%s): at aquifer.dispersivity_scale when given, and then fixed at those values in the fit and in fitted_scenario; otherwise at each well's own travel distance (or, when alpha_L is fitted, starting from its value at the farthest well).", plume.DispersivityRelation)})
	}
	fitsVelocity := false
	for _, p := range pb.req.Fit {
		fitsVelocity = fitsVelocity || p == "aquifer.seepage_velocity"
	}
	if pb.req.Scenario.Aquifer.SeepageVelocity == nil && fitsVelocity {
		out.Caveats = append(out.Caveats, plume.Caveat{Code: "seepage_velocity_fitted", Severity: plume.SeverityNote, Message: "The seepage velocity was fitted directly; in fitted_scenario it overrides the conductivity, gradient and porosity (which are kept for the record)."})
	}
}
