package api

import (
	"bytes"
	"encoding/csv"

	"downgradient/plume"
	"downgradient/plume/uncertainty"
)

// uncertaintyCSVHeader is the header row of the uncertainty CSV.
func uncertaintyCSVHeader(u plume.Units) []string {
	L, T, C := unitToken(u.Length), unitToken(u.Time), unitToken(u.Concentration)
	return []string{"receptor_id", "x_" + L, "y_" + L, "z_" + L, "plume_x_" + L, "plume_y_" + L,
		"time_" + T, "method", "mean_" + C, "p05_" + C, "p25_" + C, "p50_" + C, "p75_" + C, "p95_" + C,
		"exceedance_probability", "exceedance_probability_ci_low", "exceedance_probability_ci_high"}
}

// encodeUncertaintyCSV writes one row per receptor, time and method, then
// the steady-state rows (time "steady") and the peak row (time "peak").
// x and y are the request's site coordinates (the median where uncertain).
func encodeUncertaintyCSV(sc plume.Scenario, res *uncertainty.UncertaintyResult) []byte {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	_ = w.Write(uncertaintyCSVHeader(res.Units))
	opt := func(p *float64) string {
		if p == nil {
			return ""
		}
		return formatNumber(*p)
	}
	for i, rr := range res.Receptors {
		var x, y *float64
		if i < len(sc.Receptors) {
			x, y = sc.Receptors[i].X, sc.Receptors[i].Y
		}
		prefix := []string{csvSafe(rr.ID), opt(x), opt(y), formatNumber(rr.Z), formatNumber(rr.PlumeX), formatNumber(rr.PlumeY)}
		row := func(t string, s uncertainty.UncertainSummary) {
			lo, hi := "", ""
			if len(s.ExceedanceProbabilityCI) == 2 {
				lo, hi = formatNumber(s.ExceedanceProbabilityCI[0]), formatNumber(s.ExceedanceProbabilityCI[1])
			}
			p := s.Percentiles
			rec := append(append([]string(nil), prefix...), t, s.Method, formatNumber(s.Mean),
				formatNumber(p.P05), formatNumber(p.P25), formatNumber(p.P50), formatNumber(p.P75), formatNumber(p.P95),
				opt(s.ExceedanceProbability), lo, hi)
			_ = w.Write(rec)
		}
		for _, sp := range rr.Series {
			row(formatNumber(sp.Time), sp.UncertainSummary)
		}
		for _, s := range rr.SteadyState {
			row("steady", s)
		}
		row("peak", rr.Peak)
	}
	w.Flush()
	return buf.Bytes()
}

// uncertaintyFeatureCollection is the GeoJSON form of an uncertainty result:
// receptor points (site frame, request length unit) with the peak summary
// and the top driver as flat properties; the run's settings ride along.
type uncertaintyFeatureCollection struct {
	Type            string                        `json:"type"`
	Features        []uncertaintyFeature          `json:"features"`
	CoordinateFrame string                        `json:"coordinate_frame"`
	Units           plume.Units                   `json:"units"`
	Engine          plume.Engine                  `json:"engine"`
	Realizations    int                           `json:"realizations"`
	Seed            uint64                        `json:"seed"`
	Methods         []string                      `json:"methods"`
	Parameters      []uncertainty.ParameterSample `json:"parameters"`
	Caveats         []plume.Caveat                `json:"caveats"`
}

type uncertaintyFeature struct {
	Type       string                 `json:"type"`
	ID         string                 `json:"id"`
	Geometry   *pointGeometry         `json:"geometry"`
	Properties uncertaintyFeatureProp `json:"properties"`
}

type uncertaintyFeatureProp struct {
	ID                          string                         `json:"id"`
	SiteX                       float64                        `json:"site_x"`
	SiteY                       float64                        `json:"site_y"`
	Z                           float64                        `json:"z"`
	PlumeX                      float64                        `json:"plume_x"`
	PlumeY                      float64                        `json:"plume_y"`
	PeakMethod                  string                         `json:"peak_method"`
	PeakMean                    float64                        `json:"peak_mean"`
	PeakP05                     float64                        `json:"peak_p05"`
	PeakP50                     float64                        `json:"peak_p50"`
	PeakP95                     float64                        `json:"peak_p95"`
	PeakExceedanceProbability   *float64                       `json:"peak_exceedance_probability"`
	PeakExceedanceProbabilityCI []float64                      `json:"peak_exceedance_probability_ci"`
	TopDriver                   *string                        `json:"top_driver"`
	TopDriverRankCorrelation    *float64                       `json:"top_driver_rank_correlation"`
	Series                      []uncertainty.UncertainPoint   `json:"series"`
	SteadyState                 []uncertainty.UncertainSummary `json:"steady_state"`
	Drivers                     []uncertainty.Driver           `json:"drivers"`
}

func buildUncertaintyGeoJSON(sc plume.Scenario, res *uncertainty.UncertaintyResult) uncertaintyFeatureCollection {
	fc := uncertaintyFeatureCollection{Type: "FeatureCollection", Features: make([]uncertaintyFeature, 0, len(res.Receptors)),
		Units: res.Units, Engine: res.Engine, Realizations: res.Realizations, Seed: res.Seed, Methods: res.Methods,
		Parameters: res.Parameters, Caveats: res.Caveats}
	site := plume.SiteCoordinates(sc)
	toGeo := geoFrame(sc.CRS, res.Units, &fc.CoordinateFrame)
	for i, rr := range res.Receptors {
		var xy [2]float64
		if i < len(site) {
			xy = site[i]
		}
		pk := rr.Peak
		props := uncertaintyFeatureProp{ID: rr.ID, SiteX: xy[0], SiteY: xy[1], Z: rr.Z, PlumeX: rr.PlumeX, PlumeY: rr.PlumeY,
			PeakMethod: pk.Method, PeakMean: pk.Mean, PeakP05: pk.Percentiles.P05, PeakP50: pk.Percentiles.P50, PeakP95: pk.Percentiles.P95,
			PeakExceedanceProbability: pk.ExceedanceProbability, PeakExceedanceProbabilityCI: pk.ExceedanceProbabilityCI,
			Series: rr.Series, SteadyState: rr.SteadyState, Drivers: rr.Drivers}
		if len(rr.Drivers) > 0 {
			props.TopDriver = &rr.Drivers[0].Parameter
			props.TopDriverRankCorrelation = &rr.Drivers[0].RankCorrelation
		}
		fc.Features = append(fc.Features, uncertaintyFeature{Type: "Feature", ID: rr.ID,
			Geometry: toGeo(xy[0], xy[1]), Properties: props})
	}
	return fc
}
