package plume

// Scenario is a screening request (DESIGN.md section 4). Numbers are in the
// units named by Units (length L, time T, concentration C); a nil pointer
// means "not given" (JSON null or absent). Fields given directly win over
// the ones they are derived from.
type Scenario struct {
	// Units of the request and of the response; empty fields default to m, d, mg/L.
	Units Units `json:"units"`
	// Aquifer properties.
	Aquifer Aquifer `json:"aquifer"`
	// Contaminant properties; Name may pick defaults from the reference table.
	Contaminant Contaminant `json:"contaminant"`
	// Several compounds instead of Contaminant, each with its own source
	// concentration, sorption, decay and level, optionally linked by decay
	// (decays_to, yield).
	Contaminants []Constituent `json:"contaminants,omitempty"`
	// Source geometry, strength and history, in site coordinates.
	Source Source `json:"source"`
	// Several sources instead of Source (3D planar sources sharing the
	// aquifer and the flow direction); results are their superposition.
	Sources []Source `json:"sources,omitempty"`
	// Transects (a creek reach, a property line) through which the
	// advective mass discharge is reported.
	Transects []Transect `json:"transects,omitempty"`
	// With several sources, report each source's contribution at each
	// receptor (receptors[].contributions).
	Contributions bool `json:"contributions,omitempty"`
	// Coordinate reference system of the site frame, "EPSG:NNNN": a
	// projected CRS whose linear unit matches units.length (metre: m; US
	// survey or international foot: ft). With it GeoJSON outputs are in WGS
	// 84 longitude/latitude and receptors may be given as lon, lat.
	CRS string `json:"crs,omitempty"`
	// Receptors (wells, parcels, stream points) in site coordinates; at least one.
	Receptors []Receptor `json:"receptors"`
	// Times at which to report concentrations, T, each >= 0 and finite, on
	// the clock of source.start (the source begins at source.start, default
	// 0). May be empty: the steady state is always reported.
	Times []float64 `json:"times"`
	// Methods to run, from "exact", "domenico", "numeric"; empty means all three.
	Methods []string `json:"methods,omitempty"`
}

// Units names the units of a request; the response echoes them.
type Units struct {
	// Length unit: "m" (default) or "ft". Applies to coordinates, depths,
	// widths, dispersivities; velocities are L/T, conductivity L/T,
	// diffusion L^2/T.
	Length string `json:"length,omitempty"`
	// Time unit: "d" (default) or "yr" (1 yr = 365.25 d). Applies to times,
	// durations, half-lives; rates are 1/T.
	Time string `json:"time,omitempty"`
	// Concentration unit: "mg/L" (default) or "ug/L". Applies to source
	// concentration, screening level, solubility and every result concentration.
	Concentration string `json:"concentration,omitempty"`
	// Unit of hydraulic conductivity, when it is not the request's length
	// over time: "m/d", "ft/d", "m/s", "cm/s", "m/yr", "ft/yr" or "gpd/ft2"
	// (US gallons per day per square foot). Default: length/time.
	Conductivity string `json:"conductivity,omitempty"`
	// Unit of mass discharge in responses: "g/d" with times in days,
	// "kg/yr" with times in years. Set by the engine; a request may leave it
	// out or give that same value.
	MassDischarge string `json:"mass_discharge,omitempty"`
}

// Aquifer holds the hydraulic and sorption properties of the saturated zone.
// Either SeepageVelocity, or HydraulicConductivity, HydraulicGradient and
// EffectivePorosity together, must be given.
type Aquifer struct {
	// Hydraulic conductivity K, L/T (or Units.Conductivity), > 0.
	HydraulicConductivity *float64 `json:"hydraulic_conductivity"`
	// Hydraulic gradient i along the flow direction, dimensionless (L/L), > 0.
	HydraulicGradient *float64 `json:"hydraulic_gradient"`
	// Effective porosity n_e, dimensionless, in (0, 1). Needed for Darcy's law,
	// for retardation from sorption and for an instantaneous mass release.
	EffectivePorosity *float64 `json:"effective_porosity"`
	// Seepage (average linear) velocity v, L/T, > 0. When given, K and i are not needed.
	SeepageVelocity *float64 `json:"seepage_velocity"`
	// Dry bulk density rho_b, kg/L (= g/cm^3), > 0; no unit conversion.
	BulkDensity *float64 `json:"bulk_density"`
	// Fraction of organic carbon f_oc, dimensionless, in [0, 1].
	OrganicCarbonFraction *float64 `json:"organic_carbon_fraction"`
	// Dispersivities, L; any not given is estimated (see DispersivityScale).
	Dispersivity *Dispersivity `json:"dispersivity"`
	// Plume scale, L, > 0, at which a longitudinal dispersivity not given is
	// estimated for the whole model. Without it, each receptor (and each map
	// node) is screened with the dispersivity estimated at its own travel
	// distance, so that no answer depends on the other receptors.
	DispersivityScale *float64 `json:"dispersivity_scale,omitempty"`
	// Effective molecular diffusion coefficient D_e, L^2/T, >= 0; default 0.
	EffectiveDiffusion *float64 `json:"effective_diffusion"`
}

// Dispersivity holds the three dispersivities, L, each > 0 when given.
type Dispersivity struct {
	// Longitudinal dispersivity alpha_L, L, > 0.
	Longitudinal *float64 `json:"longitudinal"`
	// Transverse horizontal dispersivity alpha_T, L, > 0.
	Transverse *float64 `json:"transverse"`
	// Transverse vertical dispersivity alpha_V, L, > 0.
	Vertical *float64 `json:"vertical"`
}

// Contaminant holds the compound's transport properties. When Name matches
// the reference table (LookupContaminant), Koc, ScreeningLevel and Solubility
// default to the table's values, and the response lists which were used.
type Contaminant struct {
	// Name of the compound, e.g. "benzene"; free text, matched against the
	// reference table (a name not in the table is fine when the needed
	// properties are given).
	Name string `json:"name,omitempty"`
	// Organic-carbon partition coefficient Koc, L/kg, >= 0.
	Koc *float64 `json:"koc"`
	// Half-life of first-order decay, T, > 0; null means no decay.
	HalfLife *float64 `json:"half_life"`
	// Use the long (conservative) end of the reference table's half-life range
	// when HalfLife is null. Default false: null half-life means no decay.
	UseTableHalfLife bool `json:"use_table_half_life,omitempty"`
	// Retardation factor R, dimensionless, >= 1. When given, Koc, f_oc and
	// bulk density are not needed.
	Retardation *float64 `json:"retardation"`
	// Screening level (for example a drinking-water limit), C, > 0.
	ScreeningLevel *float64 `json:"screening_level"`
	// Aqueous solubility, C, > 0; used only for the separate-phase caveat.
	Solubility *float64 `json:"solubility"`
	// Which mass the half-life acts on: "total" (default; dissolved and sorbed
	// alike, decay rate used as is) or "dissolved" (dissolved phase only; the
	// decay rate in the retarded equation is divided by R).
	DecayAppliesTo string `json:"decay_applies_to,omitempty"`
}

// Constituent is one compound of a scenario with several: the fields of
// Contaminant, its source concentration, and the compound it decays to.
type Constituent struct {
	// Name of the compound (required, unique in the scenario); matched
	// against the reference table as Contaminant.Name is.
	Name string `json:"name"`
	// Concentration at the source, C, >= 0 (a daughter may have none of its own).
	SourceConcentration *float64 `json:"source_concentration"`
	Koc                 *float64 `json:"koc"`
	HalfLife            *float64 `json:"half_life"`
	UseTableHalfLife    bool     `json:"use_table_half_life,omitempty"`
	Retardation         *float64 `json:"retardation"`
	ScreeningLevel      *float64 `json:"screening_level"`
	Solubility          *float64 `json:"solubility"`
	DecayAppliesTo      string   `json:"decay_applies_to,omitempty"`
	// Name of the compound of this scenario this one decays to ("" none).
	DecaysTo string `json:"decays_to,omitempty"`
	// Mass of daughter formed per mass of this compound degraded, >= 0;
	// default the ratio of molar masses (both in the reference table).
	Yield *float64 `json:"yield"`
}

// contaminant is the Contaminant form of a constituent (its properties).
func (k Constituent) contaminant() Contaminant {
	return Contaminant{Name: k.Name, Koc: k.Koc, HalfLife: k.HalfLife, UseTableHalfLife: k.UseTableHalfLife,
		Retardation: k.Retardation, ScreeningLevel: k.ScreeningLevel, Solubility: k.Solubility, DecayAppliesTo: k.DecayAppliesTo}
}

// Source describes the release. A continuous source has Concentration; an
// instantaneous release (spill) has Mass instead. Concentration and Mass
// together are a continuous planar source whose dissolvable mass drains by
// the water flowing through its face (the power-law source function with
// DepletionExponent; see docs/source-mass.md). A source with Width and
// Depth is a vertical rectangle (3D methods); with neither it is a 1D column
// (Ogata-Banks) whose inlet type is Inlet.
type Source struct {
	// Identifier of the source in a list of several (sources[]); default "S<index+1>".
	ID string `json:"id,omitempty"`
	// Site x (east) of the centre of the source's downgradient face, L; default 0.
	X *float64 `json:"x"`
	// Site y (north) of the centre of the source's downgradient face, L; default 0.
	Y *float64 `json:"y"`
	// Direction groundwater flows, degrees clockwise from north, finite; default 90 (east).
	FlowAzimuthDeg *float64 `json:"flow_azimuth_deg"`
	// Source concentration C0, C, > 0 (continuous source).
	Concentration *float64 `json:"concentration"`
	// Width of the source perpendicular to flow, L, > 0 (3D).
	Width *float64 `json:"width"`
	// Depth of the source below the water table, L, > 0 (3D).
	Depth *float64 `json:"depth"`
	// Time the source starts, T, >= 0; default 0. Concentrations before it are 0.
	Start *float64 `json:"start"`
	// Duration of release, T, > 0; null means continuous.
	Duration *float64 `json:"duration"`
	// Half-life of exponential source depletion, T, > 0; null means constant strength.
	HalfLife *float64 `json:"half_life"`
	// Mass, kg, > 0. Alone: released instantaneously at Start (spill).
	// With Concentration: the continuous source's dissolvable mass M0,
	// which the water flux Q = n_e v W D through the face drains at
	// dM/dt = -Q Cs (3D sources only; not with HalfLife or Duration).
	Mass *float64 `json:"mass"`
	// Exponent Gamma of the power-law source function Cs/C0 = (M/M0)^Gamma
	// of a source with Mass and Concentration, dimensionless, in (0, 10];
	// default 1 (exponential depletion at the rate Q C0/M0).
	DepletionExponent *float64 `json:"depletion_exponent,omitempty"`
	// Depth of an instantaneous release below the water table, L, >= 0; default 0.
	ReleaseDepth *float64 `json:"release_depth"`
	// Inlet condition of the 1D column: "concentration" (first type, default)
	// or "flux" (third type).
	Inlet string `json:"inlet,omitempty"`
}

// Transect is a vertical rectangle standing on a line in the site frame
// (a creek reach, a property boundary) through which the advective mass
// discharge is reported.
type Transect struct {
	// Identifier echoed in the response; default "T<index+1>".
	ID string `json:"id,omitempty"`
	// Site coordinates of the line's ends, L.
	From [2]float64 `json:"from"`
	To   [2]float64 `json:"to"`
	// Depth interval below the water table, L; top default 0, bottom required.
	Top    *float64 `json:"top"`
	Bottom *float64 `json:"bottom"`
	// Flow of the stream that receives the discharge, L^3/T; with it the
	// fully mixed stream concentration is reported.
	StreamFlow *float64 `json:"stream_flow"`
	// Surface-water screening level of the stream concentration, C.
	ScreeningLevel *float64 `json:"screening_level"`
}

// Receptor is a point of interest in site coordinates: a point at depth Z or
// a well screen from ScreenTop to ScreenBottom (depth-averaged).
type Receptor struct {
	// Identifier echoed in the response; default "R<index+1>".
	ID string `json:"id,omitempty"`
	// Site x (east), L; required unless lon and lat are given.
	X *float64 `json:"x"`
	// Site y (north), L; required unless lon and lat are given.
	Y *float64 `json:"y"`
	// WGS 84 longitude and latitude, degrees, instead of x and y (with crs).
	Lon *float64 `json:"lon,omitempty"`
	Lat *float64 `json:"lat,omitempty"`
	// Depth below the water table, L, >= 0; default 0. Ignored when a screen is given.
	Z *float64 `json:"z"`
	// Depth of the top of the well screen below the water table, L, >= 0.
	ScreenTop *float64 `json:"screen_top"`
	// Depth of the bottom of the well screen, L, >= ScreenTop.
	ScreenBottom *float64 `json:"screen_bottom"`
}

// Method names, as used in requests and responses.
const (
	MethodExact    = "exact"
	MethodDomenico = "domenico"
	MethodNumeric  = "numeric"
)

// AllMethods lists the known methods in their canonical order.
var AllMethods = []string{MethodExact, MethodDomenico, MethodNumeric}

// Values of Contaminant.DecayAppliesTo.
const (
	DecayTotal     = "total"
	DecayDissolved = "dissolved"
)

// Values of Source.Inlet.
const (
	InletConcentration = "concentration"
	InletFlux          = "flux"
)

// instantaneous reports whether s is an instantaneous release: a mass
// without a concentration.
func (s Source) instantaneous() bool { return s.Mass != nil && s.Concentration == nil }

// depletesByMass reports whether s is a continuous source with a
// dissolvable mass (a mass and a concentration).
func (s Source) depletesByMass() bool { return s.Mass != nil && s.Concentration != nil }

// PrimarySource is the scenario's source, or the first of several.
func (sc Scenario) PrimarySource() Source {
	if len(sc.Sources) > 0 {
		return sc.Sources[0]
	}
	return sc.Source
}
