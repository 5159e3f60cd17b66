package api

import (
	"net/http"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// openapiYAML serves the contract as written.
func (s *server) openapiYAML(c echo.Context) error {
	return c.Blob(http.StatusOK, "application/yaml", s.spec.YAML)
}

// openapiJSON serves the contract as JSON.
func (s *server) openapiJSON(c echo.Context) error {
	return c.Blob(http.StatusOK, echo.MIMEApplicationJSON, s.spec.JSON)
}

// health is the body of GET /healthz.
type health struct {
	Status  string `json:"status"`
	Version string `json:"version"`
}

// healthz reports that the process is up; the service holds no state, so up is ready.
func (s *server) healthz(c echo.Context) error {
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, health{Status: "ok", Version: s.cfg.Version})
}

// contaminantTable is the body of GET /v1/contaminants.
type contaminantTable struct {
	Contaminants []plume.Compound `json:"contaminants"`
}

// contaminants serves the reference table.
func (s *server) contaminants(c echo.Context) error {
	return writeJSON(c, http.StatusOK, echo.MIMEApplicationJSON, contaminantTable{Contaminants: plume.Contaminants()})
}
