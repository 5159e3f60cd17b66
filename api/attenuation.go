package api

import (
	"net/http"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// attenuationBody is the body of POST /v1/attenuation apart from the scenario.
type attenuationBody struct {
	Observations []plume.Observation `json:"observations"`
	Time         *float64            `json:"time"`
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
	res, err := plume.Attenuation(plume.AttenuationRequest{Scenario: sc, Observations: ab.Observations, Time: ab.Time})
	if err != nil {
		return s.problemFromScreen(c.Request().Context(), err, renameOutside("observations", "time"))
	}
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, res)
}
