package api

import (
	"bytes"
	"strings"

	"downgradient/internal/crs"
	"downgradient/plume"
)

// featureCollection is an RFC 7946 FeatureCollection of receptor points.
// With the scenario's crs, coordinates are WGS 84 longitude/latitude and
// the site coordinates are properties site_x, site_y; without one they are
// in the site frame and the request's length unit (by prior arrangement,
// RFC 7946 section 4), and coordinate_frame says so. type and features come
// first (a GIS reader looks for them at the start); units, engine, derived
// parameters and caveats ride along after them as foreign members.
type featureCollection struct {
	Type            string         `json:"type"`
	Features        []feature      `json:"features"`
	CoordinateFrame string         `json:"coordinate_frame"`
	Units           plume.Units    `json:"units"`
	Engine          plume.Engine   `json:"engine"`
	Derived         plume.Derived  `json:"derived"`
	Caveats         []plume.Caveat `json:"caveats"`
}

type feature struct {
	Type       string            `json:"type"`
	ID         string            `json:"id"`
	Geometry   *pointGeometry    `json:"geometry"`
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
	SiteX                 float64             `json:"site_x"`
	SiteY                 float64             `json:"site_y"`
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
	PeakConcentration     *float64            `json:"peak_concentration"`
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
	// flat holds one attribute per requested time and method, named with
	// the units, after the fields above (see flatColumns); with several
	// compounds, each compound's columns (see compoundColumns).
	flat []flatColumn
}

// flatColumn is one attribute column of a feature: value is a *float64,
// *bool or string (nil pointers are null).
type flatColumn struct {
	name  string
	value any
}

// MarshalJSON writes the fields, then the flat columns in order.
func (p receptorFeatProps) MarshalJSON() ([]byte, error) {
	type plain receptorFeatProps
	b, err := marshalJSON(plain(p))
	if err != nil {
		return nil, err
	}
	b = bytes.TrimRight(b, "\n")
	var buf bytes.Buffer
	buf.Write(b[:len(b)-1])
	for _, c := range p.flat {
		var v []byte
		switch x := c.value.(type) {
		case *float64:
			v = []byte("null")
			if x != nil {
				v = []byte(formatNumber(*x))
			}
		default:
			if v, err = marshalJSON(x); err != nil {
				return nil, err
			}
			v = bytes.TrimRight(v, "\n")
		}
		buf.WriteString(`,"` + c.name + `":`)
		buf.Write(v)
	}
	buf.WriteByte('}')
	return buf.Bytes(), nil
}

// flatColumns are a receptor's values as columns a GIS shows: one per
// method and requested time, then the steady state, each named
// <method>_t<time><time unit>_<concentration unit> (e.g.
// exact_t3650d_mg_L; a decimal point is written p: t182p5d).
func flatColumns(rr plume.ReceptorResult, u plume.Units, prefix string) []flatColumn {
	cu := strings.NewReplacer("/", "_").Replace(u.Concentration)
	var out []flatColumn
	for _, m := range plume.AllMethods {
		for _, sp := range rr.Series {
			if v := plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric); v != nil {
				t := strings.ReplaceAll(formatNumber(sp.Time), ".", "p")
				out = append(out, flatColumn{name: prefix + m + "_t" + t + u.Time + "_" + cu, value: v})
			}
		}
		ss := rr.SteadyState
		if v := plume.MethodValue(m, ss.Exact, ss.Domenico, ss.Numeric); v != nil {
			out = append(out, flatColumn{name: prefix + m + "_steady_" + cu, value: v})
		}
	}
	return out
}

// compoundColumns are receptor i's columns for each compound of several,
// each name prefixed by the compound's token (compoundToken): its
// screening level, verdict, peak, first exceedance, then its values by
// method and time as flatColumns names them.
func compoundColumns(views []compoundView, i int, u plume.Units) []flatColumn {
	var out []flatColumn
	for _, cv := range views {
		rr := cv.res.Receptors[i]
		tok := compoundToken(cv.name) + "_"
		var peak, peakTime *float64
		method := ""
		if rr.Peak.Method != "" {
			peak, peakTime, method = &rr.Peak.Concentration, rr.Peak.Time, rr.Peak.Method
		}
		out = append(out,
			flatColumn{tok + "screening_level", cv.res.Derived.ScreeningLevel},
			flatColumn{tok + "exceeds_screening_level", rr.ExceedsScreeningLevel},
			flatColumn{tok + "peak_concentration", peak},
			flatColumn{tok + "peak_time", peakTime},
			flatColumn{tok + "peak_method", method},
			flatColumn{tok + "first_exceedance_time", rr.FirstExceedanceTime})
		out = append(out, flatColumns(rr, u, tok)...)
	}
	return out
}

func buildGeoJSON(sc plume.Scenario, res *plume.Result) featureCollection {
	fc := featureCollection{Type: "FeatureCollection", Features: make([]feature, 0, len(res.Receptors)),
		Units: res.Units, Engine: res.Engine, Derived: res.Derived, Caveats: res.Caveats}
	fb := newFeatureBuilder(sc, res, &fc.CoordinateFrame)
	for i := range res.Receptors {
		fc.Features = append(fc.Features, fb.feature(i))
	}
	return fc
}

// featureBuilder makes the features of a result's receptors (a whole
// result, or one part of a streamed layer).
type featureBuilder struct {
	res      *plume.Result
	views    []compoundView // nil for one compound
	toLonLat func(x, y float64) *pointGeometry
}

// newFeatureBuilder prepares the features of res; frame is set to the
// words that say what the coordinates are.
func newFeatureBuilder(sc plume.Scenario, res *plume.Result, frame *string) *featureBuilder {
	fb := &featureBuilder{res: res, toLonLat: geoFrame(res.CRS, res.Units, frame)}
	if len(res.Derived.Compounds) > 0 {
		fb.views = compoundViews(sc, res)
	}
	return fb
}

// feature is receptor i's feature.
func (fb *featureBuilder) feature(i int) feature {
	res, rr := fb.res, fb.res.Receptors[i]
	series := rr.Series
	if series == nil {
		series = []plume.SeriesPoint{}
	}
	f := feature{
		Type:     "Feature",
		ID:       rr.ID,
		Geometry: fb.toLonLat(rr.X, rr.Y),
		Properties: receptorFeatProps{
			ID: rr.ID, SiteX: rr.X, SiteY: rr.Y, Status: rr.Status, flat: flatColumns(rr, res.Units, ""), CaveatCodes: strings.Join(res.CaveatCodes(rr.ID), ";"),
			Z: rr.Z, ScreenTop: rr.ScreenTop, ScreenBottom: rr.ScreenBottom, ScreeningLevel: res.Derived.ScreeningLevel,
			PlumeX: rr.PlumeX, PlumeY: rr.PlumeY,
			SteadyExact: rr.SteadyState.Exact, SteadyDomenico: rr.SteadyState.Domenico, SteadyNumeric: rr.SteadyState.Numeric,
			PeakConcentration: &rr.Peak.Concentration, PeakTime: rr.Peak.Time, PeakMethod: rr.Peak.Method,
			FirstExceedanceTime: rr.FirstExceedanceTime, ExceedsScreeningLevel: rr.ExceedsScreeningLevel,
			DomenicoDeviation: rr.DomenicoDeviation, Series: series,
		},
	}
	last := &f.Properties
	if fb.views != nil {
		// Several compounds: the receptor's own columns hold only
		// what is common (its verdict over the compounds); each
		// compound's follow under its name.
		last.PeakConcentration, last.ScreeningLevel = nil, nil
		last.flat = compoundColumns(fb.views, i, res.Units)
	}
	if a := rr.AllowableSourceConcentration; a != nil {
		last.AllowableSteady, last.AllowableWithinTimes = a.SteadyState, a.WithinTimes
	}
	if a := rr.DilutionAttenuationFactor; a != nil {
		last.DAFSteady, last.DAFWithinTimes = a.SteadyState, a.WithinTimes
	}
	return f
}

// geoFrame returns the map from site coordinates to a GeoJSON point: WGS
// 84 longitude/latitude through the CRS when there is one (a point outside
// the projection gets a null geometry), else the site coordinates
// themselves; frame is set to the words that say which.
func geoFrame(code string, u plume.Units, frame *string) func(x, y float64) *pointGeometry {
	if code != "" {
		if fr, err := crs.Open(code); err == nil {
			*frame = "WGS 84 longitude/latitude (RFC 7946), projected from the site frame " + code + "; site coordinates in properties site_x, site_y"
			return func(x, y float64) *pointGeometry {
				lon, lat, err := fr.ToLonLat(x, y)
				if err != nil {
					return nil
				}
				return &pointGeometry{Type: "Point", Coordinates: [2]float64{lon, lat}}
			}
		}
	}
	*frame = "site frame in " + u.Length + " (no crs given): coordinates are not WGS 84 longitude/latitude; load the layer with the site's own CRS"
	return func(x, y float64) *pointGeometry {
		return &pointGeometry{Type: "Point", Coordinates: [2]float64{x, y}}
	}
}
