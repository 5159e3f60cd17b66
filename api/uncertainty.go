package api

import (
	"context"
	"fmt"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
	"downgradient/plume/uncertainty"
)

// uncertaintyBody is the body of POST /v1/uncertainty apart from the scenario.
type uncertaintyBody struct {
	Realizations *int     `json:"realizations"`
	Seed         *uint64  `json:"seed"`
	Methods      []string `json:"methods"`
	Compound     string   `json:"compound"`
}

// uncertainty is POST /v1/uncertainty: the scenario's distribution objects
// are sampled by Latin hypercube, each realization screened with the
// closed forms (or, for at most uncertainty.MaxNumericRealizations, all
// methods), and the results summarised per receptor, time and method.
func (s *server) uncertainty(c echo.Context) error {
	format, p := negotiate(c)
	if p != nil {
		return p
	}
	req, _, p := s.uncertaintyRun(c)
	if p != nil {
		return p
	}
	ctx := c.Request().Context()
	sc := req.Template
	size := uncertaintySize(sc, len(req.Methods), len(req.Parameters), format)
	if p := s.checkOutput(size, formatName[format], uncertaintyReduce...); p != nil {
		return p
	}
	r, p := compute(ctx, s, renameOutside("realizations", "seed", "methods", "compound"), func(ctx context.Context) (*reply, error) {
		res, err := uncertainty.RunUncertainty(ctx, req, s.engineOptions())
		if err != nil {
			return nil, err
		}
		return s.encodeUncertainty(ctx, format, sc, res)
	})
	if p != nil {
		return p
	}
	return s.send(c, r)
}

// uncertaintyRun decodes the /v1/uncertainty envelope of c (distribution
// objects, the scenario at their medians, realizations, seed, methods) and
// checks the workload; the scenario body comes back with its free text
// (description, memo, sources of values) for a report.
func (s *server) uncertaintyRun(c echo.Context) (uncertainty.UncertaintyRequest, scenarioBody, *Problem) {
	var req uncertainty.UncertaintyRequest
	var ub uncertaintyBody
	tree, p := decodeEnvelope(c, &ub)
	if p != nil {
		return req, scenarioBody{}, p
	}
	dt := extractUncertain(tree)
	if len(dt.malformed)+len(dt.invalid) > 0 {
		kind := kindInvalid
		if len(dt.malformed) > 0 {
			kind = kindMalformed
		}
		var fps []FieldProblem
		for _, e := range append(dt.malformed, dt.invalid...) {
			fps = append(fps, FieldProblem{Field: joinFieldPath("scenario", e.Field), Message: e.Message})
		}
		return req, scenarioBody{}, newProblem(kind, fmt.Sprintf("%d field(s) of the distribution objects are wrong", len(fps)), fps...)
	}
	sb, p := s.decodeScenarioBodyTree(tree)
	if p != nil {
		return req, sb, p
	}
	ctx := c.Request().Context()
	if len(dt.notNumbers) > 0 {
		return req, sb, s.problemFromError(ctx, dt.notNumbers.Err(), scenarioField)
	}
	sc := sb.Scenario
	req = uncertainty.UncertaintyRequest{Template: sc, Parameters: dt.params, Methods: ub.Methods, Compound: ub.Compound}
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
			return req, sb, newProblem(kindInvalid, "realizations out of range", FieldProblem{Field: "realizations", Message: fmt.Sprintf("must be >= 1, got %d", *ub.Realizations)})
		}
	}
	if ub.Seed != nil {
		req.Seed = *ub.Seed
	}
	if err := uncertainty.CheckWorkload(req, s.cfg.MaxEvaluations); err != nil {
		return req, sb, s.problemFromError(ctx, err, nil)
	}
	return req, sb, nil
}

// uncertaintyReduce are the fields that make an uncertainty answer large.
var uncertaintyReduce = []string{"scenario.receptors", "scenario.times", "methods"}

// encodeUncertainty encodes an uncertainty result in format within the
// output budget.
func (s *server) encodeUncertainty(ctx context.Context, format outputFormat, sc plume.Scenario, res *uncertainty.UncertaintyResult) (*reply, error) {
	runHook(&testHookEncode, ctx)
	switch format {
	case formatCSV:
		return s.capBytes(&reply{contentType: mimeCSV + "; charset=utf-8; header=present", body: encodeUncertaintyCSV(sc, res),
			header: [][2]string{{"Content-Disposition", `inline; filename="uncertainty.csv"`}}}, uncertaintyReduce...)
	case formatGeoJSON:
		return s.encodeJSON(buildUncertaintyGeoJSON(sc, res), mimeGeoJSON, uncertaintyReduce...)
	}
	return s.encodeJSON(res, echo.MIMEApplicationJSON, uncertaintyReduce...)
}
