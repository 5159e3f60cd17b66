package api

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"sort"
	"strings"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// uncertaintyBody is the body of POST /v1/uncertainty apart from the scenario.
type uncertaintyBody struct {
	Realizations *int     `json:"realizations"`
	Seed         *uint64  `json:"seed"`
	Methods      []string `json:"methods"`
}

// uncertainty is POST /v1/uncertainty: the scenario's distribution objects
// are sampled by Latin hypercube, each realization screened with the
// closed forms (or, for at most plume.MaxNumericRealizations, all methods),
// and the results summarised per receptor, time and method.
func (s *server) uncertainty(c echo.Context) error {
	format, p := negotiate(c)
	if p != nil {
		return p
	}
	var ub uncertaintyBody
	tree, p := decodeEnvelope(c, &ub)
	if p != nil {
		return p
	}
	params, malformed, invalid := plume.ExtractUncertain(tree)
	if len(malformed)+len(invalid) > 0 {
		kind := kindInvalid
		if len(malformed) > 0 {
			kind = kindMalformed
		}
		var fps []FieldProblem
		for _, e := range append(malformed, invalid...) {
			fps = append(fps, FieldProblem{Field: joinFieldPath("scenario", e.Field), Message: e.Message})
		}
		return newProblem(kind, fmt.Sprintf("%d field(s) of the distribution objects are wrong", len(fps)), fps...)
	}
	sc, p := s.decodeScenarioTree(tree)
	if p != nil {
		return p
	}
	req := plume.UncertaintyRequest{Template: sc, Parameters: params, Methods: ub.Methods}
	if len(req.Methods) == 0 {
		// The scenario's own closed forms, else exact (numeric only when asked
		// for at the top level).
		for _, m := range sc.Methods {
			if m != plume.MethodNumeric {
				req.Methods = append(req.Methods, m)
			}
		}
	}
	if ub.Realizations != nil {
		req.Realizations = *ub.Realizations
		if *ub.Realizations < 1 {
			return newProblem(kindInvalid, "realizations out of range", FieldProblem{Field: "realizations", Message: fmt.Sprintf("must be >= 1, got %d", *ub.Realizations)})
		}
	}
	if ub.Seed != nil {
		req.Seed = *ub.Seed
	}
	if p := s.checkUncertaintyWorkload(req); p != nil {
		return p
	}
	ctx, cancel := context.WithTimeout(c.Request().Context(), s.cfg.RequestTimeout)
	defer cancel()
	res, err := plume.RunUncertainty(ctx, req, plume.Options{EngineVersion: s.cfg.Version, CellBudget: s.cfg.CellBudget})
	if err != nil {
		return s.problemFromUncertainty(ctx, err)
	}
	switch format {
	case formatCSV:
		return writeUncertaintyCSV(c, sc, res)
	case formatGeoJSON:
		return writeJSON(c, http.StatusOK, mimeGeoJSON, buildUncertaintyGeoJSON(sc, res))
	}
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, res)
}

// checkUncertaintyWorkload refuses runs over the limits with 413:
// realizations over plume.MaxRealizations, numeric above
// plume.MaxNumericRealizations, or realizations x receptors x (times + 1) x
// methods closed-form evaluations over the per-request limit.
func (s *server) checkUncertaintyWorkload(req plume.UncertaintyRequest) *Problem {
	n := req.Realizations
	if n == 0 {
		n = plume.DefaultRealizations
	}
	methods := req.Methods
	if len(methods) == 0 {
		methods = []string{plume.MethodExact}
	}
	var fps []FieldProblem
	if n > plume.MaxRealizations {
		fps = append(fps, FieldProblem{Field: "realizations", Message: fmt.Sprintf("%d realizations; at most %d allowed", n, plume.MaxRealizations)})
	}
	numeric, closed := false, 0
	for _, m := range methods {
		switch m {
		case plume.MethodNumeric:
			numeric = true
		case plume.MethodExact, plume.MethodDomenico:
			closed++
		}
	}
	if numeric && n > plume.MaxNumericRealizations {
		fps = append(fps, FieldProblem{Field: "realizations", Message: fmt.Sprintf(
			"the numeric method is limited to %d realizations (each takes seconds); got %d: use methods [\"exact\"] or [\"exact\", \"domenico\"] for more", plume.MaxNumericRealizations, n)})
	}
	if evals := n * len(req.Template.Receptors) * (len(req.Template.Times) + 1) * max(closed, 1); evals > s.cfg.MaxEvaluations {
		fps = append(fps, FieldProblem{Field: "realizations", Message: fmt.Sprintf(
			"realizations x receptors x (times + 1) x methods = %d evaluations; at most %d allowed per request: use fewer realizations, receptors or times",
			evals, s.cfg.MaxEvaluations)})
	}
	if len(fps) == 0 {
		return nil
	}
	return newProblem(kindTooLarge, "workload over the limits", fps...)
}

// problemFromUncertainty maps RunUncertainty's errors.
func (s *server) problemFromUncertainty(ctx context.Context, err error) *Problem {
	var re *plume.RealizationError
	if errors.As(err, &re) {
		var fe plume.FieldErrors
		var fps []FieldProblem
		vals := make([]string, 0, len(re.Values))
		for k, v := range re.Values {
			vals = append(vals, fmt.Sprintf("%s = %g", k, v))
		}
		sort.Strings(vals)
		if errors.As(re.Err, &fe) {
			for _, e := range fe {
				fps = append(fps, FieldProblem{Field: joinFieldPath("scenario", e.Field), Message: e.Message})
			}
		}
		return newProblem(kindInvalid, fmt.Sprintf("realization %d (%s) is not a valid scenario: narrow the distributions so that every combination is valid: %v",
			re.Index, strings.Join(vals, ", "), re.Err), fps...)
	}
	if strings.Contains(err.Error(), "panicked") {
		return newProblem(kindInternal, "the server could not complete the request")
	}
	return s.problemFromScreen(ctx, err, renameOutside("realizations", "seed", "methods"))
}
