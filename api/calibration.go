package api

import (
	"context"
	"fmt"
	"net/http"
	"strings"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
	"downgradient/plume/fit"
)

// calibrationBody is the body of POST /v1/calibrations apart from the scenario.
type calibrationBody struct {
	Observations []fit.Observation     `json:"observations"`
	Fit          []string              `json:"fit"`
	Bounds       map[string][2]float64 `json:"bounds"`
	Compound     string                `json:"compound"`
}

// calibrations is POST /v1/calibrations: fit the chosen parameters to the
// observations, then screen the scenario with the fitted values. A scenario
// without receptors gets one per well.
func (s *server) calibrations(c echo.Context) error {
	var cb calibrationBody
	tree, p := decodeEnvelope(c, &cb)
	if p != nil {
		return p
	}
	fillReceptors(tree, cb.Observations)
	sc, p := s.decodeScenarioTree(tree)
	if p != nil {
		return p
	}
	ctx := c.Request().Context()
	if err := plume.CheckWorkload(sc, s.cfg.MaxEvaluations); err != nil {
		return s.problemFromError(ctx, err, scenarioField)
	}
	type answer struct {
		res *fit.CalibrationResult
		p   *Problem
	}
	a, p := compute(ctx, s, renameOutside("observations", "fit", "bounds", "compound"), func(ctx context.Context) (answer, error) {
		res, err := fit.Calibrate(ctx, fit.CalibrationRequest{Scenario: sc, Observations: cb.Observations, Fit: cb.Fit, Bounds: cb.Bounds, Compound: cb.Compound})
		if err != nil {
			return answer{}, err
		}
		desc := fmt.Sprintf("Fitted by POST /v1/calibrations to %d observations: %s", len(cb.Observations), strings.Join(cb.Fit, ", "))
		res.FittedScenario.Description = &desc
		screening, err := plume.Screen(ctx, res.FittedScenario.Scenario, s.engineOptions())
		if err != nil {
			return answer{p: s.problemFromError(ctx, err, func(f string) string { return joinFieldPath("fitted_scenario", f) })}, nil
		}
		res.Screening = screening
		return answer{res: res}, nil
	})
	switch {
	case p != nil:
		return p
	case a.p != nil:
		return a.p
	}
	s.metrics.observeResult(a.res.Screening)
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, a.res)
}
