package api

import (
	"context"
	"net/http"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// calibrationBody is the body of POST /v1/calibrations apart from the scenario.
type calibrationBody struct {
	Observations []plume.Observation   `json:"observations"`
	Fit          []string              `json:"fit"`
	Bounds       map[string][2]float64 `json:"bounds"`
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
	if p := s.checkWorkload(sc); p != nil {
		return p.under("scenario")
	}
	ctx, cancel := context.WithTimeout(c.Request().Context(), s.cfg.RequestTimeout)
	defer cancel()
	rename := renameOutside("observations", "fit", "bounds")
	res, err := plume.Calibrate(ctx, plume.CalibrationRequest{Scenario: sc, Observations: cb.Observations, Fit: cb.Fit, Bounds: cb.Bounds})
	if err != nil {
		return s.problemFromScreen(ctx, err, rename)
	}
	screening, p := s.screen(ctx, res.FittedScenario.Scenario, func(f string) string { return joinFieldPath("fitted_scenario", f) })
	if p != nil {
		return p
	}
	res.Screening = screening
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, res)
}
