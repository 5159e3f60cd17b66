package api

import (
	"context"
	"fmt"
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
	body, _ := c.Get(ctxBody).([]byte)
	size := fitSize(len(cb.Observations), body, &sc)
	if p := s.checkOutput(size, "application/json", "scenario.receptors", "scenario.times", "observations"); p != nil {
		return p
	}
	r, p := compute(ctx, s, renameOutside("observations", "fit", "bounds", "fitted_scenario", "compound"), func(ctx context.Context) (*reply, error) {
		res, err := fit.Calibrate(ctx, fit.CalibrationRequest{Scenario: sc, Observations: cb.Observations, Fit: cb.Fit, Bounds: cb.Bounds, Compound: cb.Compound})
		if err != nil {
			return nil, err
		}
		desc := fmt.Sprintf("Fitted by POST /v1/calibrations to %d observations: %s", len(cb.Observations), strings.Join(cb.Fit, ", "))
		res.FittedScenario.Description = &desc
		screening, err := s.screenWork(ctx, res.FittedScenario.Scenario)
		if e, ok := plume.AsError(err); ok && e.Kind != plume.KindInternal {
			return nil, &plume.Error{Kind: e.Kind, Detail: e.Detail, Fields: e.Fields.Prefixed("fitted_scenario."), Err: e.Err}
		} else if err != nil {
			return nil, err
		}
		res.Screening = screening
		runHook(&testHookEncode, ctx)
		return s.encodeJSON(res, echo.MIMEApplicationJSON, "scenario.receptors", "scenario.times", "observations")
	})
	if p != nil {
		return p
	}
	return s.send(c, r)
}
