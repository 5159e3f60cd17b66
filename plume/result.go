package plume

import (
	"bytes"
	"encoding/json"
)

// Result is the response of a screening (DESIGN.md section 4). Lengths, times
// and concentrations are in the request's units (echoed in Units); every
// number is finite.
type Result struct {
	// Engine identifies the code and the input so a result can be reproduced.
	Engine Engine `json:"engine"`
	// Units of every number in the result (the request's, defaults filled in).
	Units Units `json:"units"`
	// The site frame's coordinate reference system, when the request named one.
	CRS string `json:"crs,omitempty"`
	// The receptors counted by outcome, and the verdict in one sentence.
	Summary Summary `json:"summary"`
	// Derived transport parameters and where each came from.
	Derived Derived `json:"derived"`
	// One entry per receptor, in request order.
	Receptors []ReceptorResult `json:"receptors"`
	// Report of the finite-volume grid when the numeric method ran; omitted otherwise.
	Numeric *NumericReport `json:"numeric,omitempty"`
	// Mass discharge through each transect; omitted when none was asked for.
	Transects []TransectResult `json:"transects,omitempty"`
	// With several sources and a screening level: the common factor by
	// which every source concentration may be scaled so that the worst
	// receptor just reaches the level.
	AllowableScaleFactor *Allowance `json:"allowable_scale_factor,omitempty"`
	// Cautions and notes; always holds the general screening caution.
	Caveats []Caveat `json:"caveats"`
}

// Summary counts the receptors by outcome. Exceeding + Below + NotCompared
// = Receptors; a receptor not compared is one not modelled or one without a
// known screening level.
type Summary struct {
	Receptors int `json:"receptors"`
	// Compared with the level and at or above it at some time.
	Exceeding int `json:"exceeding"`
	// Compared with the level and below it at all times.
	Below int `json:"below"`
	// Not compared: not modelled, or no screening level known.
	NotCompared int `json:"not_compared"`
	// Not modelled (upgradient of the source).
	NotModelled int `json:"not_modelled"`
	// Inside the source zone (the source's own concentration is compared).
	InsideSource int `json:"inside_source"`
	// The outcome in words.
	Text string `json:"text"`
}

// Engine identifies the code version and the input.
type Engine struct {
	// Version of the engine (Options.EngineVersion).
	Version string `json:"version"`
	// SHA-256 (hex) of the canonical JSON of the request scenario: the
	// Scenario as decoded, re-encoded by encoding/json (fields in declaration
	// order, shortest round-trip numbers, no whitespace).
	InputSHA256 string `json:"input_sha256"`
}

// Derived holds the parameters the methods used, in the request's units.
type Derived struct {
	// Seepage velocity v, L/T.
	SeepageVelocity float64 `json:"seepage_velocity"`
	// How v was obtained: "given" or "darcy" (v = K i / n_e).
	SeepageVelocitySource string `json:"seepage_velocity_source"`
	// Retardation factor R, dimensionless.
	Retardation float64 `json:"retardation"`
	// How R was obtained: "given" or "sorption" (R = 1 + rho_b Koc f_oc / n_e).
	RetardationSource string `json:"retardation_source"`
	// Koc used for R, L/kg; null when R was given.
	Koc *float64 `json:"koc"`
	// Half-life used, T; null means no decay.
	HalfLife *float64 `json:"half_life"`
	// Decay rate ln 2 / half-life, 1/T (0 without decay).
	DecayRate float64 `json:"decay_rate"`
	// Which mass the half-life acts on: "total" or "dissolved".
	DecayAppliesTo string `json:"decay_applies_to"`
	// Decay rate applied to the dissolved concentration in the retarded
	// equation, 1/T: DecayRate ("total") or DecayRate / R ("dissolved").
	EffectiveDecayRate float64 `json:"effective_decay_rate"`
	// Dispersivities used, L; null when each receptor has its own
	// (dispersivity_basis "receptor_distance": see receptors[].dispersivity).
	Dispersivity *DispersivityValues `json:"dispersivity"`
	// True when any dispersivity was estimated rather than given.
	DispersivityEstimated bool `json:"dispersivity_estimated"`
	// What the longitudinal dispersivity rests on: "given";
	// "dispersivity_scale" (estimated at aquifer.dispersivity_scale for the
	// whole model); "receptor_distance" (estimated at each receptor's own
	// travel distance, so that no receptor's answer depends on the others).
	DispersivityBasis string `json:"dispersivity_basis"`
	// The relations used for the estimated dispersivities; empty when none was estimated.
	DispersivityRelation string `json:"dispersivity_relation,omitempty"`
	// The plume scale a model-wide estimate used (aquifer.dispersivity_scale),
	// L; null when alpha_L was given or each receptor used its own distance.
	TravelDistance *float64 `json:"travel_distance"`
	// Dispersion coefficients D_i = alpha_i v + D_e, L^2/T; null when each
	// receptor has its own.
	Dispersion *DispersionValues `json:"dispersion"`
	// Screening level used, C; null when none was given or found.
	ScreeningLevel *float64 `json:"screening_level"`
	// Aqueous solubility used for the separate-phase check, C; null when unknown.
	Solubility *float64 `json:"solubility"`
	// The source geometry: "3d" (rectangle), "1d" (column) or "instantaneous" (mass).
	SourceKind string `json:"source_kind"`
	// Inlet condition of the 1D column: "concentration" or "flux"; empty otherwise.
	Inlet string `json:"inlet,omitempty"`
	// JSON paths of the values estimated by the engine rather than given or
	// computed from given data (e.g. "aquifer.dispersivity.longitudinal").
	Estimated []string `json:"estimated"`
	// JSON paths of the values taken from the contaminant reference table.
	FromReferenceTable []string `json:"from_reference_table"`
	// Name of the reference table entry matched; empty when none.
	ReferenceCompound string `json:"reference_compound,omitempty"`
	// How peak and first-exceedance times were found.
	PeakMethod string `json:"peak_method"`
	// Concentrations below this floor, C, are reported as 0: 1e-12 of the
	// source concentration (for an instantaneous release, of the release's
	// mass dissolved in 1 m^3 of pore water). Far below any screening level,
	// it keeps round-off noise and subnormal numbers out of every output.
	ConcentrationFloor float64 `json:"concentration_floor"`
	// The unit of every dimensional input, by its JSON path, as the engine
	// read it (for example "aquifer.hydraulic_conductivity": "ft/d").
	InputUnits UnitNames `json:"input_units"`
	// Each source's strength and depletion (an array even for one source).
	Sources []SourceDerived `json:"sources"`
	// Each compound of several (contaminants[]); omitted for one. The
	// single-compound fields above then describe the first compound.
	Compounds []CompoundDerived `json:"compounds,omitempty"`
}

// ReceptorDispersivity is a receptor's own dispersivities, L, estimated at
// its travel distance (dispersivity_basis "receptor_distance").
type ReceptorDispersivity struct {
	Longitudinal float64 `json:"longitudinal"`
	Transverse   float64 `json:"transverse"`
	Vertical     float64 `json:"vertical"`
	// Travel distance the estimate used (at least 2 m), L.
	TravelDistance float64 `json:"travel_distance"`
}

// DispersivityValues are the three dispersivities used, L.
type DispersivityValues struct {
	// Longitudinal dispersivity alpha_L, L.
	Longitudinal float64 `json:"longitudinal"`
	// Transverse horizontal dispersivity alpha_T, L.
	Transverse float64 `json:"transverse"`
	// Transverse vertical dispersivity alpha_V, L.
	Vertical float64 `json:"vertical"`
}

// DispersionValues are the unretarded dispersion coefficients, L^2/T.
type DispersionValues struct {
	// Longitudinal D_x = alpha_L v + D_e, L^2/T.
	Longitudinal float64 `json:"longitudinal"`
	// Transverse horizontal D_y = alpha_T v + D_e, L^2/T.
	Transverse float64 `json:"transverse"`
	// Transverse vertical D_z = alpha_V v + D_e, L^2/T.
	Vertical float64 `json:"vertical"`
}

// ReceptorResult is the answer at one receptor.
type ReceptorResult struct {
	// Receptor identifier from the request (or "R<index+1>").
	ID string `json:"id"`
	// Site coordinates, L (as given, or projected from lon and lat).
	X float64 `json:"x"`
	Y float64 `json:"y"`
	// Distance along flow from the centre of the source's downgradient face, L.
	PlumeX float64 `json:"plume_x"`
	// Transverse offset, positive to the left of the flow direction, L.
	PlumeY float64 `json:"plume_y"`
	// Depth below the water table of the point, or the screen's mid-depth, L.
	Z float64 `json:"z"`
	// Top of the well screen, L; null for a point receptor.
	ScreenTop *float64 `json:"screen_top,omitempty"`
	// Bottom of the well screen, L; null for a point receptor.
	ScreenBottom *float64 `json:"screen_bottom,omitempty"`
	// Whether and how the receptor was modelled: "modelled",
	// "not_modelled_upgradient" (values reported as 0 are not a model
	// result), "inside_source" (values are the source concentration).
	Status Status `json:"status"`
	// The receptor's own dispersivities when each receptor has its own
	// (dispersivity_basis "receptor_distance"); omitted otherwise.
	Dispersivity *ReceptorDispersivity `json:"dispersivity,omitempty"`
	// Concentrations at the requested times, one value per method run.
	Series []SeriesPoint `json:"series"`
	// Concentrations as t -> infinity, C (numeric is not run to steady state).
	SteadyState MethodValues `json:"steady_state"`
	// Highest concentration over all time and when it occurs.
	Peak Peak `json:"peak"`
	// Earliest time the concentration reaches the screening level, T; null
	// when it never does (or no screening level is known).
	FirstExceedanceTime *float64 `json:"first_exceedance_time"`
	// True when the peak concentration reaches the screening level, false
	// when it stays below; null when nothing was compared: the receptor is
	// not modelled (upgradient) or no screening level is known.
	ExceedsScreeningLevel *bool `json:"exceeds_screening_level"`
	// Largest relative difference (Domenico - exact)/exact over the series and
	// steady state where both ran and exact is above a floor; null otherwise.
	DomenicoDeviation *float64 `json:"domenico_deviation,omitempty"`
	// Agreement of the numeric cross-check with the exact solution; null when not run.
	NumericAgreement *Agreement `json:"numeric_agreement,omitempty"`
	// The source concentration at which this receptor would just reach the
	// screening level (one source; null where not defined), C.
	AllowableSourceConcentration *Allowance `json:"allowable_source_concentration,omitempty"`
	// Source concentration / receptor concentration, dimensionless (one
	// source; null where the receptor's value is 0 or not modelled).
	DilutionAttenuationFactor *Allowance `json:"dilution_attenuation_factor,omitempty"`
	// With several sources, the factor by which every source concentration
	// may be scaled so that this receptor just reaches the level.
	AllowableScaleFactor *Allowance `json:"allowable_scale_factor,omitempty"`
	// Each source's contribution (several sources and contributions: true).
	Contributions []Contribution `json:"contributions,omitempty"`
	// Each compound's answer (several compounds); the receptor's own
	// series, steady state, peak and first exceedance are then left out,
	// and its exceeds_screening_level is true if any compound's is, else
	// null if any compound's is, else false.
	Compounds []CompoundResult `json:"compounds,omitempty"`
}

// Allowance is a quantity that bounds the source, at steady state and
// within the requested times; a member is null where it is not defined
// (the receptor's value is 0, the receptor is not modelled, or no level).
type Allowance struct {
	SteadyState *float64 `json:"steady_state"`
	WithinTimes *float64 `json:"within_times"`
}

// Contribution is one source's part of a receptor's values.
type Contribution struct {
	SourceID    string        `json:"source_id"`
	Series      []SeriesPoint `json:"series"`
	SteadyState MethodValues  `json:"steady_state"`
}

// SourceDerived describes one source's strength and depletion.
type SourceDerived struct {
	// The source's id ("" for a lone source).
	ID string `json:"id,omitempty"`
	// Initial mass discharge out of the source face, Q C0, with Q the Darcy
	// flux through the face (n_e v W D), mass per time (units.mass_discharge);
	// null for a 1D column, an instantaneous release or without porosity.
	MassDischarge *float64 `json:"mass_discharge"`
	// Depletion rate Q C0 / M0 of a source with a given mass, 1/T; null otherwise.
	DepletionRate *float64 `json:"depletion_rate"`
	// Time, on the scenario's clock, when the source concentration falls
	// below the screening level, T; null when it never does or is unknown.
	TimeBelowScreeningLevel *float64 `json:"time_below_screening_level"`
	// Time, on the scenario's clock, when the source's mass is exhausted, T;
	// null when it never is.
	TimeMassExhausted *float64 `json:"time_mass_exhausted"`
}

// TransectResult is the mass discharge through one transect.
type TransectResult struct {
	ID string `json:"id"`
	// Length of the line, L, and the depth interval, L.
	Length float64 `json:"length"`
	Top    float64 `json:"top"`
	Bottom float64 `json:"bottom"`
	// Method the discharge is computed with ("exact", else "domenico").
	Method string `json:"method"`
	// One item per requested time.
	Series []TransectPoint `json:"series"`
	// As t -> infinity (0 for a source that stops or depletes).
	SteadyState TransectValue `json:"steady_state"`
}

// TransectValue is the mass discharge through a transect and, for a
// stream, the fully mixed stream concentration.
type TransectValue struct {
	// Advective mass discharge, mass per time (units.mass_discharge).
	MassDischarge float64 `json:"mass_discharge"`
	// Mass discharge / stream flow, C; null without a stream flow.
	StreamConcentration *float64 `json:"stream_concentration"`
	// Stream concentration compared with the transect's screening level;
	// null without both.
	ExceedsScreeningLevel *bool `json:"exceeds_screening_level"`
}

// TransectPoint is TransectValue at one requested time, T.
type TransectPoint struct {
	Time float64 `json:"time"`
	TransectValue
}

// SeriesPoint holds the concentrations at one time, C; a method not run is omitted.
type SeriesPoint struct {
	// Time since the source started, T.
	Time float64 `json:"time"`
	// Exact time-integral (or Ogata-Banks, or puff) value, C.
	Exact *float64 `json:"exact,omitempty"`
	// Domenico (1987) approximation, C.
	Domenico *float64 `json:"domenico,omitempty"`
	// Finite-volume cross-check, C.
	Numeric *float64 `json:"numeric,omitempty"`
}

// MethodValues holds one value per method, C; a method not run is omitted.
type MethodValues struct {
	// Exact value, C.
	Exact *float64 `json:"exact,omitempty"`
	// Domenico value, C.
	Domenico *float64 `json:"domenico,omitempty"`
	// Numeric value, C.
	Numeric *float64 `json:"numeric,omitempty"`
}

// Peak is the highest concentration at a receptor over all time.
type Peak struct {
	// Time of the peak, T; null when the concentration rises toward the
	// steady state and the peak is approached as t -> infinity.
	Time *float64 `json:"time"`
	// Peak concentration, C.
	Concentration float64 `json:"concentration"`
	// Method whose values the peak is taken from ("exact" or "domenico").
	Method string `json:"method"`
}

// Agreement compares the numeric cross-check with the exact solution at one receptor.
type Agreement struct {
	// Largest |numeric - exact| / max(exact, floor) over the series, dimensionless.
	MaxRelativeDifference float64 `json:"max_relative_difference"`
	// Time at which the largest difference occurs, T (0 when it occurs at
	// steady state; see AtSteadyState).
	Time float64 `json:"time"`
	// True when the largest difference is the steady-state one.
	AtSteadyState bool `json:"at_steady_state"`
	// |numeric - exact| / max(exact, floor) at steady state, when the
	// numeric steady state was solved (constant continuous sources).
	SteadyStateRelativeDifference *float64 `json:"steady_state_relative_difference,omitempty"`
	// Tolerance applied, dimensionless.
	Tolerance float64 `json:"tolerance"`
	// Concentration floor below which differences are not counted, C.
	Floor float64 `json:"floor"`
	// True when MaxRelativeDifference <= Tolerance.
	WithinTolerance bool `json:"within_tolerance"`
}

// NumericReport describes the finite-volume grid the numeric method used.
// The 3D grid covers half the plume (y >= 0; the solution is symmetric).
type NumericReport struct {
	// Which solver ran: "3d" (rectangular source) or "1d" (column).
	Solver string `json:"solver"`
	// Number of cells along x, y and z (1 and 1 for the column).
	Cells [3]int `json:"cells"`
	// Total number of cells.
	TotalCells int `json:"total_cells"`
	// Smallest cell size along x, y, z, L (the grid is graded).
	Spacing [3]float64 `json:"spacing"`
	// Largest cell size along x, y, z, L.
	MaxSpacing [3]float64 `json:"max_spacing"`
	// Grid extent along flow from the source face: x from XMin to XMax, L.
	XMin float64 `json:"x_min"`
	// See XMin, L.
	XMax float64 `json:"x_max"`
	// Half-width of the grid across flow (from the plume axis), L.
	YHalf float64 `json:"y_half"`
	// Depth of the grid below the water table, L.
	ZMax float64 `json:"z_max"`
	// Largest grid Peclet number along flow, v dx / D_x, dimensionless.
	GridPeclet float64 `json:"grid_peclet"`
	// Largest time step, T.
	TimeStep float64 `json:"time_step"`
	// Largest Courant number v dt / (R dx), dimensionless.
	Courant float64 `json:"courant"`
	// Number of time steps taken.
	TimeSteps int `json:"time_steps"`
	// Closure error of the mass budget relative to the mass in, dimensionless.
	MassBalanceError float64 `json:"mass_balance_error"`
	// Cell budget the grid had to fit in.
	CellBudget int `json:"cell_budget"`
	// Elapsed time since the source started, T, from which the numeric
	// values are the directly solved steady state (the field has stopped
	// changing by then); omitted when every value was time stepped.
	SteadyFrom *float64 `json:"steady_from,omitempty"`
}

// Caveat severities.
const (
	SeverityNote    = "note"
	SeverityCaution = "caution"
	SeverityWarning = "warning"
)

// Caveat is a caution attached to a result.
type Caveat struct {
	// Stable snake_case code, one of the Caveat* constants.
	Code string `json:"code"`
	// "note", "caution" or "warning".
	Severity string `json:"severity"`
	// Plain-English explanation with the numbers involved.
	Message string `json:"message"`
	// Receptor concerned; empty when the caveat concerns the whole result.
	ReceptorID string `json:"receptor_id,omitempty"`
	// Compound concerned, for a scenario of several compounds
	// (contaminants[].name); empty when the caveat concerns all of them.
	Compound string `json:"compound,omitempty"`
}

// MethodValue returns the value of method m in a per-method triple (nil
// for a method not run or unknown).
func MethodValue(m string, exact, domenico, numeric *float64) *float64 {
	switch m {
	case MethodExact:
		return exact
	case MethodDomenico:
		return domenico
	case MethodNumeric:
		return numeric
	}
	return nil
}

// MarshalJSON writes the receptor; with several compounds its own series,
// steady state, peak and first exceedance (which belong to each compound)
// are left out.
func (r ReceptorResult) MarshalJSON() ([]byte, error) {
	type plain ReceptorResult
	var v any = plain(r)
	if len(r.Compounds) > 0 {
		v = struct {
			plain
			Series              *struct{} `json:"series,omitempty"`
			SteadyState         *struct{} `json:"steady_state,omitempty"`
			Peak                *struct{} `json:"peak,omitempty"`
			FirstExceedanceTime *struct{} `json:"first_exceedance_time,omitempty"`
		}{plain: plain(r)}
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimRight(buf.Bytes(), "\n"), nil
}
