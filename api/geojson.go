package api

import "downgradient/plume"

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
	ExceedsScreeningLevel bool                `json:"exceeds_screening_level"`
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
				ID: rr.ID, Z: rr.Z, ScreenTop: rr.ScreenTop, ScreenBottom: rr.ScreenBottom,
				PlumeX: rr.PlumeX, PlumeY: rr.PlumeY,
				SteadyExact: rr.SteadyState.Exact, SteadyDomenico: rr.SteadyState.Domenico, SteadyNumeric: rr.SteadyState.Numeric,
				PeakConcentration: rr.Peak.Concentration, PeakTime: rr.Peak.Time, PeakMethod: rr.Peak.Method,
				FirstExceedanceTime: rr.FirstExceedanceTime, ExceedsScreeningLevel: rr.ExceedsScreeningLevel,
				DomenicoDeviation: rr.DomenicoDeviation, Series: series,
			},
		})
	}
	return fc
}
