package plume

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distuv"
)

// Parameters a calibration may fit (JSON paths of the scenario).
var CalibrationParameters = []string{
	"source.concentration",
	"contaminant.half_life",
	"source.half_life",
	"aquifer.dispersivity.longitudinal",
	"aquifer.seepage_velocity",
}

// CalibrationConfidence is the level of the fitted values' intervals.
const CalibrationConfidence = 0.95

// CalibrationRequest asks for the parameter values that best reproduce the
// observations.
type CalibrationRequest struct {
	// The scenario; its values of the fitted parameters are the starting
	// point (a missing one starts from a default, see Calibrate).
	Scenario Scenario
	// The monitoring results; each needs a time.
	Observations []Observation
	// The JSON paths to fit, from CalibrationParameters, each once.
	Fit []string
	// Optional bounds per fitted path, [low, high], 0 < low < high, in the
	// field's unit; default [start/1000, start*1000].
	Bounds map[string][2]float64
}

// CalibrationResult is a fit, in the request's units.
type CalibrationResult struct {
	Units Units `json:"units"`
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
	// The scenario with the fitted values (and the dispersivities the fit used).
	FittedScenario FittedScenario `json:"fitted_scenario"`
	// The screening recomputed with the fitted values (filled by the caller).
	Screening *Result `json:"screening"`
	// Cautions and notes.
	Caveats []Caveat `json:"caveats"`
}

// FittedScenario is a scenario as a request would send it (with an
// optional free-text description), so it can be posted back as is.
type FittedScenario struct {
	Scenario
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
// data cannot tell apart) is a FieldErrors saying what data would fix it.
func Calibrate(ctx context.Context, req CalibrationRequest) (*CalibrationResult, error) {
	sc := req.Scenario
	var fe FieldErrors
	seen := map[string]bool{}
	if len(req.Fit) == 0 {
		fe.add("fit", "name at least one parameter to fit, from "+strings.Join(CalibrationParameters, ", "))
	}
	for i, p := range req.Fit {
		ok := false
		for _, c := range CalibrationParameters {
			ok = ok || c == p
		}
		switch {
		case !ok:
			fe.add(fmt.Sprintf("fit[%d]", i), fmt.Sprintf("must be one of %s, got %q", strings.Join(CalibrationParameters, ", "), p))
		case seen[p]:
			fe.add(fmt.Sprintf("fit[%d]", i), fmt.Sprintf("%q is listed twice", p))
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
			fe.add(field, "bounds given for a parameter not in fit")
		case !(finite(b[0]) && finite(b[1]) && b[0] > 0 && b[1] > b[0]):
			fe.add(field, fmt.Sprintf("must be [low, high] with 0 < low < high, finite; got [%g, %g]", b[0], b[1]))
		}
	}
	if err := ValidateObservations(req.Observations, true); err != nil {
		fe = append(fe, err.(FieldErrors)...)
	}
	if len(fe) > 0 {
		return nil, fe.orNil()
	}
	if sc.Source.Mass != nil && seen["source.concentration"] {
		return nil, FieldErrors{{Field: "fit", Message: "source.concentration cannot be fitted for an instantaneous release (source.mass); fit the other parameters"}}
	}
	wellX := wellPlumeX(sc, req.Observations)
	base, err := prepare(sc, wellX...)
	if err != nil {
		return nil, err
	}
	uf := base.uf
	obs := base.observationPoints(req.Observations)
	detects := 0
	minObs := math.Inf(1)
	for _, o := range obs {
		if o.detected {
			detects++
		}
		minObs = math.Min(minObs, o.c)
	}
	np := len(req.Fit)
	if detects < np+1 {
		return nil, FieldErrors{{Field: "observations", Message: fmt.Sprintf(
			"fitting %d parameter(s) needs at least %d detected concentrations (one more than the parameters, to estimate the scatter); got %d detect(s) and %d non-detect(s): add detected samples, at several distances for dispersivity and velocity and at several times for half-lives, or fit fewer parameters",
			np, np+1, detects, len(obs)-detects)}}
	}
	floor := calibrationFloorFactor * minObs

	// The evaluation scenario: the request's, with the dispersivities the
	// fit uses fixed (an estimate depends on the travel distance) and one
	// receptor (Validate needs one; receptors do not enter the fit).
	evalSc := sc
	alpha := base.m.alpha
	evalSc.Aquifer.Dispersivity = &Dispersivity{Longitudinal: ptr(alpha[0] / uf.L), Transverse: ptr(alpha[1] / uf.L), Vertical: ptr(alpha[2] / uf.L)}
	evalSc.Receptors = []Receptor{{ID: "fit", X: ptr(0), Y: ptr(0)}}
	if sc.Source.X != nil {
		evalSc.Receptors[0].X = sc.Source.X
	}
	if sc.Source.Y != nil {
		evalSc.Receptors[0].Y = sc.Source.Y
	}

	// Starting values and bounds, request units.
	maxTau := 0.0
	for _, o := range obs {
		maxTau = math.Max(maxTau, o.tau)
	}
	init := make([]float64, np)
	lo, hi := make([]float64, np), make([]float64, np)
	for j, p := range req.Fit {
		var v float64
		switch p {
		case "source.concentration":
			v = base.m.c0 / uf.C
		case "contaminant.half_life":
			v = math.Max(maxTau, 1) / uf.T
			if base.m.lambda > 0 {
				v = math.Ln2 / base.m.lambda / uf.T
			}
		case "source.half_life":
			v = math.Max(maxTau, 1) / uf.T
			if base.m.depletion > 0 {
				v = math.Ln2 / base.m.depletion / uf.T
			}
		case "aquifer.dispersivity.longitudinal":
			v = alpha[0] / uf.L
		case "aquifer.seepage_velocity":
			v = base.m.v / (uf.L / uf.T)
		}
		lo[j], hi[j] = v/1000, v*1000
		if b, ok := req.Bounds[p]; ok {
			lo[j], hi[j] = b[0], b[1]
			v = math.Min(math.Max(v, lo[j]), hi[j])
		}
		init[j] = v
	}
	toP := func(z []float64, p []float64) {
		for j := range z {
			s := 1 / (1 + math.Exp(-z[j]))
			p[j] = math.Exp(math.Log(lo[j]) + (math.Log(hi[j])-math.Log(lo[j]))*s)
			p[j] = math.Min(math.Max(p[j], lo[j]), hi[j])
		}
	}
	toZ := func(p float64, j int) float64 {
		s := (math.Log(p) - math.Log(lo[j])) / (math.Log(hi[j]) - math.Log(lo[j]))
		s = math.Min(math.Max(s, 1e-6), 1-1e-6)
		return math.Log(s / (1 - s))
	}

	evals := 0
	// residuals at parameter values p (request units); ok false when the
	// scenario is invalid there (it cannot be: bounds keep values > 0).
	residuals := func(p []float64, r, model []float64) bool {
		evals++
		s := evalSc
		for j, path := range req.Fit {
			if setNumber(&s, path, p[j]) != nil {
				return false
			}
		}
		pr, err := prepare(s)
		if err != nil {
			return false
		}
		for i, o := range obs {
			c := pr.value(true, o.pt, o.tau)
			if model != nil {
				model[i] = c
			}
			d := math.Log10(math.Max(c, floor)) - math.Log10(o.c)
			if !o.detected {
				d = math.Max(0, d)
			}
			r[i] = d
		}
		return true
	}
	r := make([]float64, len(obs))
	pbuf := make([]float64, np)
	var cancelled error
	sse := func(z []float64) float64 {
		if cancelled != nil {
			return math.MaxFloat64
		}
		if err := ctx.Err(); err != nil {
			cancelled = err
			return math.MaxFloat64
		}
		toP(z, pbuf)
		if !residuals(pbuf, r, nil) {
			return math.MaxFloat64
		}
		s := 0.0
		for _, d := range r {
			s += d * d
		}
		return s
	}
	z := make([]float64, np)
	for j := range z {
		z[j] = toZ(init[j], j)
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
	best := make([]float64, np)
	toP(z, best)
	model := make([]float64, len(obs))
	residuals(best, r, model)

	// Jacobian with respect to ln p by central differences.
	const h = 1e-4
	J := mat.NewDense(len(obs), np, nil)
	rp, rm := make([]float64, len(obs)), make([]float64, len(obs))
	for j := range np {
		pp := append([]float64(nil), best...)
		pm := append([]float64(nil), best...)
		pp[j] *= math.Exp(h)
		pm[j] *= math.Exp(-h)
		residuals(pp, rp, nil)
		residuals(pm, rm, nil)
		nonzero := false
		for i := range obs {
			d := (rp[i] - rm[i]) / (2 * h)
			J.Set(i, j, d)
			nonzero = nonzero || math.Abs(d) > 1e-9
		}
		if !nonzero {
			return nil, FieldErrors{{Field: "fit", Message: fmt.Sprintf(
				"the observations do not depend on %s at the fitted values (every detect is insensitive to it): add samples where it matters (for half-lives, later times or farther wells; for the source concentration, detects near the source) or leave it out of fit", req.Fit[j])}}
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
				names = append(names, req.Fit[j])
			}
		}
		return nil, FieldErrors{{Field: "fit", Message: fmt.Sprintf(
			"the observations cannot tell %s apart (only a combination of them is determined): add observations at other distances and times (a time series at one well separates decay from travel time; wells at several distances separate dispersion from decay), or fix one of them",
			strings.Join(names, " and "))}}
	}
	var cov mat.Dense
	if err := cov.Inverse(&jtj); err != nil {
		return nil, FieldErrors{{Field: "fit", Message: "the fitted parameters are not determined by these observations: add observations at other distances and times or fit fewer parameters"}}
	}
	dof := detects - np
	sum, cnt := 0.0, 0
	for i, o := range obs {
		if o.detected || r[i] > 0 {
			sum += r[i] * r[i]
			cnt++
		}
	}
	s2 := sum / float64(dof)
	tq := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(dof)}.Quantile(0.5 + CalibrationConfidence/2)

	out := &CalibrationResult{Units: base.units, Fitted: map[string]FittedValue{}, Residuals: make([]Residual, len(obs)),
		Detects: detects, NonDetects: len(obs) - detects, DegreesOfFreedom: dof, Evaluations: evals,
		Caveats: []Caveat{{Code: CaveatScreeningEstimate, Severity: SeverityCaution, Message: ScreeningCaution}}}
	fitted := evalSc
	fitted.Receptors = sc.Receptors
	for j, path := range req.Fit {
		sd := math.Sqrt(math.Max(s2*cov.At(j, j), 0))
		lnp := math.Log(best[j])
		fv := FittedValue{Value: clean(best[j]), Initial: clean(init[j]), Bounds: []float64{lo[j], hi[j]},
			CI: []float64{clean(math.Exp(lnp - tq*sd)), clean(math.Exp(lnp + tq*sd))}}
		span := math.Log(hi[j]) - math.Log(lo[j])
		fv.AtBound = lnp-math.Log(lo[j]) < 1e-3*span || math.Log(hi[j])-lnp < 1e-3*span
		out.Fitted[path] = fv
		_ = setNumber(&fitted, path, best[j])
		if fv.AtBound {
			out.Caveats = append(out.Caveats, Caveat{Code: CaveatAtBound, Severity: SeverityWarning, Message: fmt.Sprintf(
				"%s = %.4g sits at a bound of its search range [%.4g, %.4g]: the data push it beyond; widen the bounds or check the scenario.", path, best[j], lo[j], hi[j])})
		}
	}
	if base.m.derived.DispersivityEstimated {
		out.Caveats = append(out.Caveats, Caveat{Code: CaveatDispersivityEstimated, Severity: SeverityCaution, Message: fmt.Sprintf(
			"Dispersivities were estimated from the distance to the farthest well or receptor (%s) and fixed at those values in the fit and in fitted_scenario.", DispersivityRelation)})
	}
	if sc.Aquifer.SeepageVelocity == nil && seen["aquifer.seepage_velocity"] {
		out.Caveats = append(out.Caveats, Caveat{Code: "seepage_velocity_fitted", Severity: SeverityNote, Message: "The seepage velocity was fitted directly; in fitted_scenario it overrides the conductivity, gradient and porosity (which are kept for the record)."})
	}
	desc := "Fitted by POST /v1/calibrations to " + fmt.Sprint(len(obs)) + " observations: " + strings.Join(req.Fit, ", ")
	out.FittedScenario = FittedScenario{Scenario: fitted, Description: &desc}
	for i, o := range obs {
		ob := req.Observations[i]
		out.Residuals[i] = Residual{WellID: o.well, Time: *ob.Time, Observed: o.c / uf.C, Detected: o.detected,
			Modelled: clean(model[i] / uf.C), ResidualLog10: clean(r[i])}
	}
	out.RMSELog10 = clean(math.Sqrt(sum / float64(max(cnt, 1))))
	out.Caveats = append(out.Caveats,
		Caveat{Code: CaveatLinearisedIntervals, Severity: SeverityNote, Message: fmt.Sprintf(
			"Intervals are approximate (95 %%, linearised at the optimum from the Jacobian in ln of each parameter, Student t with %d degrees of freedom); they assume independent errors of equal spread in log10 concentration and a correct model, and ignore the uncertainty of the parameters not fitted.", dof)},
		Caveat{Code: CaveatNonDetects, Severity: SeverityNote, Message: "Non-detects are censored values: each costs nothing while the model stays below its detection limit and the log10 excess above it otherwise; they are never set to zero or to the limit."})
	return out, nil
}
