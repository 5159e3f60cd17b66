package api

import (
	"net/http"
	"strings"

	"github.com/labstack/echo/v4"

	"downgradient/plume"
)

// featureCollection is an RFC 7946 FeatureCollection of receptor points.
// Coordinates are in the site frame and the request's length unit (by prior
// arrangement, RFC 7946 section 4); units, engine, derived parameters and
// caveats ride along as foreign members.
type featureCollection struct {
	Type     string         `json:"type"`
	Features []feature      `json:"features"`
	Units    plume.Units    `json:"units"`
	Engine   plume.Engine   `json:"engine"`
	Derived  plume.Derived  `json:"derived"`
	Caveats  []plume.Caveat `json:"caveats"`
}

type feature struct {
	Type       string            `json:"type"`
	ID         string            `json:"id"`
	Geometry   pointGeometry     `json:"geometry"`
	Properties receptorFeatProps `json:"properties"`
}

type pointGeometry struct {
	Type        string     `json:"type"`
	Coordinates [2]float64 `json:"coordinates"`
}

// receptorFeatProps flattens a receptor's results into the flat properties
// GIS tools show as attribute columns; the full series is kept as an array.
type receptorFeatProps struct {
	ID                    string              `json:"id"`
	Status                plume.Status        `json:"status"`
	CaveatCodes           string              `json:"caveat_codes"`
	Z                     float64             `json:"z"`
	ScreenTop             *float64            `json:"screen_top"`
	ScreenBottom          *float64            `json:"screen_bottom"`
	PlumeX                float64             `json:"plume_x"`
	PlumeY                float64             `json:"plume_y"`
	SteadyExact           *float64            `json:"steady_exact"`
	SteadyDomenico        *float64            `json:"steady_domenico"`
	SteadyNumeric         *float64            `json:"steady_numeric"`
	PeakConcentration     float64             `json:"peak_concentration"`
	PeakTime              *float64            `json:"peak_time"`
	PeakMethod            string              `json:"peak_method"`
	FirstExceedanceTime   *float64            `json:"first_exceedance_time"`
	ExceedsScreeningLevel *bool               `json:"exceeds_screening_level"`
	ScreeningLevel        *float64            `json:"screening_level"`
	AllowableSteady       *float64            `json:"allowable_source_concentration_steady"`
	AllowableWithinTimes  *float64            `json:"allowable_source_concentration_within_times"`
	DAFSteady             *float64            `json:"dilution_attenuation_factor_steady"`
	DAFWithinTimes        *float64            `json:"dilution_attenuation_factor_within_times"`
	DomenicoDeviation     *float64            `json:"domenico_deviation"`
	Series                []plume.SeriesPoint `json:"series"`
}

func buildGeoJSON(sc plume.Scenario, res *plume.Result) featureCollection {
	fc := featureCollection{Type: "FeatureCollection", Features: make([]feature, 0, len(res.Receptors)),
		Units: res.Units, Engine: res.Engine, Derived: res.Derived, Caveats: res.Caveats}
	for i, rr := range res.Receptors {
		var xy [2]float64
		if i < len(sc.Receptors) {
			if p := sc.Receptors[i].X; p != nil {
				xy[0] = *p
			}
			if p := sc.Receptors[i].Y; p != nil {
				xy[1] = *p
			}
		}
		series := rr.Series
		if series == nil {
			series = []plume.SeriesPoint{}
		}
		fc.Features = append(fc.Features, feature{
			Type:     "Feature",
			ID:       rr.ID,
			Geometry: pointGeometry{Type: "Point", Coordinates: xy},
			Properties: receptorFeatProps{
				ID: rr.ID, Status: rr.Status, CaveatCodes: strings.Join(res.CaveatCodes(rr.ID), ";"),
				Z: rr.Z, ScreenTop: rr.ScreenTop, ScreenBottom: rr.ScreenBottom, ScreeningLevel: res.Derived.ScreeningLevel,
				PlumeX: rr.PlumeX, PlumeY: rr.PlumeY,
				SteadyExact: rr.SteadyState.Exact, SteadyDomenico: rr.SteadyState.Domenico, SteadyNumeric: rr.SteadyState.Numeric,
				PeakConcentration: rr.Peak.Concentration, PeakTime: rr.Peak.Time, PeakMethod: rr.Peak.Method,
				FirstExceedanceTime: rr.FirstExceedanceTime, ExceedsScreeningLevel: rr.ExceedsScreeningLevel,
				DomenicoDeviation: rr.DomenicoDeviation, Series: series,
			},
		})
		last := &fc.Features[len(fc.Features)-1].Properties
		if a := rr.AllowableSourceConcentration; a != nil {
			last.AllowableSteady, last.AllowableWithinTimes = a.SteadyState, a.WithinTimes
		}
		if a := rr.DilutionAttenuationFactor; a != nil {
			last.DAFSteady, last.DAFWithinTimes = a.SteadyState, a.WithinTimes
		}
	}
	return fc
}

func writeGeoJSON(c echo.Context, sc plume.Scenario, res *plume.Result) error {
	return writeJSON(c, http.StatusOK, mimeGeoJSON, buildGeoJSON(sc, res))
}
