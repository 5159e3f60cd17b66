package api

import (
	"context"

	"github.com/labstack/echo/v4"

	"downgradient/plume/fit"
)

// attenuationBody is the body of POST /v1/attenuation apart from the scenario.
type attenuationBody struct {
	Observations []fit.Observation `json:"observations"`
	Time         *float64          `json:"time"`
}

// attenuation is POST /v1/attenuation: the bulk attenuation rate along the
// plume centreline from the observations and the Buscheck & Alcantar
// biodegradation rate. A scenario without receptors gets one per well.
func (s *server) attenuation(c echo.Context) error {
	var ab attenuationBody
	tree, p := decodeEnvelope(c, &ab)
	if p != nil {
		return p
	}
	fillReceptors(tree, ab.Observations)
	sc, p := s.decodeScenarioTree(tree)
	if p != nil {
		return p
	}
	size := fitSize(len(ab.Observations), nil, nil)
	if p := s.checkOutput(size, "application/json", "observations"); p != nil {
		return p
	}
	r, p := compute(c.Request().Context(), s, renameOutside("observations", "time"), func(ctx context.Context) (*reply, error) {
		res, err := fit.Attenuation(ctx, fit.AttenuationRequest{Scenario: sc, Observations: ab.Observations, Time: ab.Time})
		if err != nil {
			return nil, err
		}
		runHook(&testHookEncode, ctx)
		return s.encodeJSON(res, echo.MIMEApplicationJSON, "observations")
	})
	if p != nil {
		return p
	}
	return s.send(c, r)
}
