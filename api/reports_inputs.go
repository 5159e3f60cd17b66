package api

import (
	"fmt"
	"strings"

	"downgradient/plume"
)

// Bases of a value in the input table: how the engine obtained it.
const (
	basisGiven     = "given"
	basisDerived   = "derived"
	basisTable     = "reference table"
	basisEstimated = "estimated"
	basisDefault   = "default"
)

// inputRow is one value of the input table: the value the engine used, its
// unit, its basis with how it was obtained, and the request's free-text
// source for it (sources_of_values), if any.
type inputRow struct {
	Name, Value, Unit string
	// Basis is one of the basis* constants; How says more.
	Basis, How string
	// Source is the free text of sources_of_values for this value.
	Source string
	// key is the value's JSON path (sources_of_values key).
	key string
}

// inputGroup is a captioned part of the input table.
type inputGroup struct {
	Name string
	Rows []inputRow
}

// sourceKeys are the keys sources_of_values accepts, each the JSON path
// of an input (openapi.yaml lists the same keys; a test checks it).
var sourceKeys = []string{
	"aquifer.hydraulic_conductivity", "aquifer.hydraulic_gradient", "aquifer.effective_porosity",
	"aquifer.seepage_velocity", "aquifer.bulk_density", "aquifer.organic_carbon_fraction",
	"aquifer.dispersivity", "aquifer.dispersivity.longitudinal", "aquifer.dispersivity.transverse",
	"aquifer.dispersivity.vertical", "aquifer.dispersivity_scale", "aquifer.effective_diffusion",
	"contaminant.name", "contaminant.koc", "contaminant.half_life", "contaminant.retardation",
	"contaminant.screening_level", "contaminant.solubility", "contaminant.decay_applies_to",
	"source.x", "source.y", "source.flow_azimuth_deg", "source.concentration", "source.width",
	"source.depth", "source.start", "source.duration", "source.half_life", "source.mass",
	"source.release_depth", "source.inlet", "receptors", "times",
	// Several compounds or sources: one text for all of them.
	"contaminants", "sources",
}

// inputTable builds the input table of a scenario and its derived values;
// sources are the request's sources_of_values.
func inputTable(sc plume.Scenario, d plume.Derived, u plume.Units, sources map[string]string) []inputGroup {
	groups := []inputGroup{{Name: "Aquifer", Rows: aquiferRows(sc.Aquifer, d, u)}}
	if len(d.Compounds) == 0 {
		groups = append(groups, inputGroup{Name: "Contaminant", Rows: contaminantRows(sc.Contaminant, d, u)})
	}
	for i, cd := range d.Compounds {
		if i < len(sc.Contaminants) {
			groups = append(groups, inputGroup{Name: "Compound " + cd.Name, Rows: compoundRows(sc.Contaminants[i], cd, u)})
		}
	}
	if len(sc.Sources) == 0 {
		groups = append(groups, inputGroup{Name: "Source", Rows: sourceRows(sc.Source, d, u)})
	}
	for i, src := range sc.Sources {
		rows := sourceRows(src, d, u)
		for k := range rows {
			rows[k].key = "sources"
		}
		name := src.ID
		if name == "" {
			name = fmt.Sprintf("S%d", i+1)
		}
		groups = append(groups, inputGroup{Name: "Source " + name, Rows: rows})
	}
	for gi := range groups {
		for ri := range groups[gi].Rows {
			r := &groups[gi].Rows[ri]
			r.Source = sourceFor(sources, r.key)
		}
	}
	return groups
}

// sourceFor is the source text of key, or of its parent path
// ("aquifer.dispersivity" for "aquifer.dispersivity.longitudinal").
func sourceFor(sources map[string]string, key string) string {
	for k := key; k != ""; {
		if s, ok := sources[k]; ok {
			return s
		}
		i := strings.LastIndex(k, ".")
		if i < 0 || !strings.Contains(k[:i], ".") {
			break
		}
		k = k[:i]
	}
	return ""
}

// given is the row of an optional input given directly; ok false when absent.
func given(name, key string, v *float64, unit string) (inputRow, bool) {
	if v == nil {
		return inputRow{}, false
	}
	return inputRow{Name: name, Value: fmtReportNumber(*v), Unit: unit, Basis: basisGiven, key: key}, true
}

// appendGiven adds the rows of the inputs given.
func appendGiven(rows []inputRow, rs ...func() (inputRow, bool)) []inputRow {
	for _, r := range rs {
		if row, ok := r(); ok {
			rows = append(rows, row)
		}
	}
	return rows
}

// orDefault is the row of an input given or, when absent, its default.
func orDefault(name, key string, v *float64, unit, def, how string) inputRow {
	if r, ok := given(name, key, v, unit); ok {
		return r
	}
	return inputRow{Name: name, Value: def, Unit: unit, Basis: basisDefault, How: how, key: key}
}

func aquiferRows(a plume.Aquifer, d plume.Derived, u plume.Units) []inputRow {
	L, T := u.Length, u.Time
	rows := appendGiven(nil,
		func() (inputRow, bool) {
			return given("Hydraulic conductivity", "aquifer.hydraulic_conductivity", a.HydraulicConductivity, d.InputUnits["aquifer.hydraulic_conductivity"])
		},
		func() (inputRow, bool) {
			return given("Hydraulic gradient", "aquifer.hydraulic_gradient", a.HydraulicGradient, "–")
		},
		func() (inputRow, bool) {
			return given("Effective porosity", "aquifer.effective_porosity", a.EffectivePorosity, "–")
		})
	v := inputRow{Name: "Seepage velocity", Value: fmtReportNumber(d.SeepageVelocity), Unit: L + "/" + T, Basis: basisGiven, key: "aquifer.seepage_velocity"}
	if d.SeepageVelocitySource != plume.OriginGiven {
		v.Basis, v.How = basisDerived, "Darcy: v = K i / n_e"
	}
	rows = append(rows, v)
	rows = appendGiven(rows,
		func() (inputRow, bool) { return given("Bulk density", "aquifer.bulk_density", a.BulkDensity, "kg/L") },
		func() (inputRow, bool) {
			return given("Organic carbon fraction", "aquifer.organic_carbon_fraction", a.OrganicCarbonFraction, "–")
		})
	rows = append(rows, dispersivityRows(a, d, L)...)
	rows = appendGiven(rows, func() (inputRow, bool) {
		return given("Dispersivity scale", "aquifer.dispersivity_scale", a.DispersivityScale, L)
	})
	rows = append(rows, orDefault("Effective diffusion", "aquifer.effective_diffusion", a.EffectiveDiffusion, L+"²/"+T, "0", "none"))
	return rows
}

// dispersivityRows are the three dispersivities: given, estimated at the
// plume scale, or estimated at each receptor's own distance.
func dispersivityRows(a plume.Aquifer, d plume.Derived, L string) []inputRow {
	var g plume.Dispersivity
	if a.Dispersivity != nil {
		g = *a.Dispersivity
	}
	est := "estimated at each receptor's own travel distance (values in the receptor table): " + d.DispersivityRelation
	if d.Dispersivity != nil && d.TravelDistance != nil {
		est = fmt.Sprintf("estimated at the plume scale of %s %s: %s", fmtReportNumber(*d.TravelDistance), L, d.DispersivityRelation)
	}
	var rows []inputRow
	for _, dv := range []struct {
		name, key string
		given     *float64
		used      func(plume.DispersivityValues) float64
	}{
		{"Longitudinal dispersivity", "aquifer.dispersivity.longitudinal", g.Longitudinal, func(v plume.DispersivityValues) float64 { return v.Longitudinal }},
		{"Transverse dispersivity", "aquifer.dispersivity.transverse", g.Transverse, func(v plume.DispersivityValues) float64 { return v.Transverse }},
		{"Vertical dispersivity", "aquifer.dispersivity.vertical", g.Vertical, func(v plume.DispersivityValues) float64 { return v.Vertical }},
	} {
		if r, ok := given(dv.name, dv.key, dv.given, L); ok {
			rows = append(rows, r)
			continue
		}
		r := inputRow{Name: dv.name, Value: "per receptor", Unit: L, Basis: basisEstimated, How: est, key: dv.key}
		if d.Dispersivity != nil {
			r.Value = fmtReportNumber(dv.used(*d.Dispersivity))
		}
		rows = append(rows, r)
	}
	return rows
}

func contaminantRows(k plume.Contaminant, d plume.Derived, u plume.Units) []inputRow {
	T, C := u.Time, u.Concentration
	table := map[string]bool{}
	for _, p := range d.FromReferenceTable {
		table[p] = true
	}
	fromTable := func(r inputRow) inputRow {
		if table[r.key] {
			r.Basis, r.How = basisTable, "entry "+d.ReferenceCompound
		}
		return r
	}
	var rows []inputRow
	if k.Name != "" {
		how := "not in the reference table"
		if d.ReferenceCompound != "" {
			how = "reference table entry " + d.ReferenceCompound
		}
		rows = append(rows, inputRow{Name: "Compound", Value: k.Name, Basis: basisGiven, How: how, key: "contaminant.name"})
	}
	if d.Koc != nil {
		rows = append(rows, fromTable(inputRow{Name: "Koc", Value: fmtReportNumber(*d.Koc), Unit: "L/kg", Basis: basisGiven, key: "contaminant.koc"}))
	}
	r := inputRow{Name: "Retardation factor", Value: fmtReportNumber(d.Retardation), Unit: "–", Basis: basisGiven, key: "contaminant.retardation"}
	if d.RetardationSource != plume.OriginGiven {
		r.Basis, r.How = basisDerived, "linear sorption: R = 1 + ρb Koc foc / n_e"
	}
	rows = append(rows, r)
	hl := inputRow{Name: "Half-life", Value: "none", Unit: T, Basis: basisDefault, How: "no decay", key: "contaminant.half_life"}
	if d.HalfLife != nil {
		hl = fromTable(inputRow{Name: "Half-life", Value: fmtReportNumber(*d.HalfLife), Unit: T, Basis: basisGiven, key: "contaminant.half_life"})
		if hl.Basis == basisTable {
			hl.How += ", long end of its range"
		}
	}
	applies := inputRow{Name: "Decay acts on", Value: d.DecayAppliesTo, Basis: basisGiven, key: "contaminant.decay_applies_to"}
	if k.DecayAppliesTo == "" {
		applies.Basis = basisDefault
	}
	applies.How = map[string]string{plume.DecayTotal: "dissolved and sorbed mass", plume.DecayDissolved: "the dissolved phase only (rate divided by R)"}[d.DecayAppliesTo]
	rows = append(rows, hl, applies)
	for _, lv := range []struct {
		name, key, none string
		v               *float64
	}{
		{"Screening level", "contaminant.screening_level", "none given or found: nothing is compared", d.ScreeningLevel},
		{"Aqueous solubility", "contaminant.solubility", "unknown: no separate-phase check", d.Solubility},
	} {
		if lv.v == nil {
			rows = append(rows, inputRow{Name: lv.name, Value: "none", Unit: C, Basis: basisDefault, How: lv.none, key: lv.key})
			continue
		}
		rows = append(rows, fromTable(inputRow{Name: lv.name, Value: fmtReportNumber(*lv.v), Unit: C, Basis: basisGiven, key: lv.key}))
	}
	return rows
}

// compoundRows are one compound's values of a scenario of several
// (contaminants[]), all keyed "contaminants" for sources_of_values.
func compoundRows(k plume.Constituent, cd plume.CompoundDerived, u plume.Units) []inputRow {
	T, C := u.Time, u.Concentration
	table := map[string]bool{}
	for _, p := range cd.FromReferenceTable {
		table[p[strings.LastIndex(p, ".")+1:]] = true
	}
	basis := func(field string, given bool) (string, string) {
		switch {
		case given:
			return basisGiven, ""
		case table[field]:
			return basisTable, "entry " + cd.ReferenceCompound
		}
		return basisDerived, ""
	}
	rows := []inputRow{{Name: "Source concentration", Value: fmtReportNumber(cd.SourceConcentration), Unit: C, Basis: basisGiven}}
	if cd.Koc != nil {
		b, how := basis("koc", k.Koc != nil)
		rows = append(rows, inputRow{Name: "Koc", Value: fmtReportNumber(*cd.Koc), Unit: "L/kg", Basis: b, How: how})
	}
	r := inputRow{Name: "Retardation factor", Value: fmtReportNumber(cd.Retardation), Unit: "–", Basis: basisGiven}
	if cd.RetardationSource != plume.OriginGiven {
		r.Basis, r.How = basisDerived, "linear sorption: R = 1 + ρb Koc foc / n_e"
	}
	rows = append(rows, r)
	hl := inputRow{Name: "Half-life", Value: "none", Unit: T, Basis: basisDefault, How: "no decay"}
	if cd.HalfLife != nil {
		b, how := basis("half_life", k.HalfLife != nil)
		hl = inputRow{Name: "Half-life", Value: fmtReportNumber(*cd.HalfLife), Unit: T, Basis: b, How: how}
	}
	rows = append(rows, hl)
	if cd.DecaysTo != "" {
		dt := inputRow{Name: "Decays to", Value: cd.DecaysTo, Basis: basisGiven}
		if cd.Yield != nil {
			dt.How = "yield " + fmtReportNumber(*cd.Yield)
			if cd.YieldSource != plume.OriginGiven {
				dt.How += " (ratio of molar masses)"
			}
		}
		rows = append(rows, dt)
	}
	for _, lv := range []struct {
		name, field, none string
		v                 *float64
		given             bool
	}{
		{"Screening level", "screening_level", "none given or found: nothing is compared", cd.ScreeningLevel, k.ScreeningLevel != nil},
		{"Aqueous solubility", "solubility", "unknown", cd.Solubility, k.Solubility != nil},
	} {
		if lv.v == nil {
			rows = append(rows, inputRow{Name: lv.name, Value: "none", Unit: C, Basis: basisDefault, How: lv.none})
			continue
		}
		b, how := basis(lv.field, lv.given)
		rows = append(rows, inputRow{Name: lv.name, Value: fmtReportNumber(*lv.v), Unit: C, Basis: b, How: how})
	}
	for i := range rows {
		rows[i].key = "contaminants"
	}
	return rows
}

func sourceRows(s plume.Source, d plume.Derived, u plume.Units) []inputRow {
	L, T, C := u.Length, u.Time, u.Concentration
	rows := []inputRow{
		orDefault("Face centre, site x", "source.x", s.X, L, "0", "site origin"),
		orDefault("Face centre, site y", "source.y", s.Y, L, "0", "site origin"),
		orDefault("Flow azimuth", "source.flow_azimuth_deg", s.FlowAzimuthDeg, "° from north", "90", "east"),
	}
	rows = appendGiven(rows,
		func() (inputRow, bool) { return given("Concentration", "source.concentration", s.Concentration, C) },
		func() (inputRow, bool) { return given(massLabel(s), "source.mass", s.Mass, "kg") },
		func() (inputRow, bool) {
			return given("Depletion exponent", "source.depletion_exponent", s.DepletionExponent, "–")
		},
		func() (inputRow, bool) { return given("Width", "source.width", s.Width, L) },
		func() (inputRow, bool) { return given("Depth below the water table", "source.depth", s.Depth, L) })
	rows = append(rows,
		orDefault("Start", "source.start", s.Start, T, "0", "the clock of the requested times"),
		orDefault("Duration", "source.duration", s.Duration, T, "continuous", "no end"),
		orDefault("Depletion half-life", "source.half_life", s.HalfLife, T, "none", "constant strength"))
	if d.SourceKind == plume.SourceKindInstantaneous {
		rows = append(rows, orDefault("Release depth", "source.release_depth", s.ReleaseDepth, L, "0", "the water table"))
	}
	if d.SourceKind == plume.SourceKind1D {
		in := inputRow{Name: "Column inlet", Value: d.Inlet, Basis: basisGiven, key: "source.inlet"}
		if s.Inlet == "" {
			in.Basis = basisDefault
		}
		rows = append(rows, in)
	}
	return rows
}

// modelRows are values the engine computed from the inputs.
func modelRows(d plume.Derived, u plume.Units) []inputRow {
	L, T, C := u.Length, u.Time, u.Concentration
	rows := []inputRow{
		{Name: "Source model", Value: map[string]string{plume.SourceKind3D: "vertical rectangle (3D)", plume.SourceKind1D: "column (1D)", plume.SourceKindInstantaneous: "instantaneous release"}[d.SourceKind],
			Basis: basisDerived, How: "from the source fields given"},
		{Name: "Decay rate in the retarded equation", Value: fmtReportNumber(d.EffectiveDecayRate), Unit: "1/" + T, Basis: basisDerived, How: "ln 2 / half-life"},
	}
	if ds := d.Dispersion; ds != nil {
		rows = append(rows, inputRow{Name: "Longitudinal dispersion coefficient", Value: fmtReportNumber(ds.Longitudinal), Unit: L + "²/" + T, Basis: basisDerived, How: "α_L v + D_e"})
	}
	of := "the source concentration"
	if d.SourceKind == plume.SourceKindInstantaneous {
		of = "the released mass dissolved in 1 m³ of pore water"
	}
	rows = append(rows, inputRow{Name: "Reporting floor", Value: fmtReportNumber(d.ConcentrationFloor), Unit: C, Basis: basisDerived,
		How: fmt.Sprintf("%g of %s; values below it are reported as 0 and printed \u201c%s\u201d", plume.ConcentrationFloorFraction, of, floorText)})
	return append(rows, sourceMassRows(d, u)...)
}

// massLabel names source.mass: a released mass, or with a concentration
// the source's dissolvable mass.
func massLabel(src plume.Source) string {
	if src.Concentration != nil {
		return "Dissolvable source mass"
	}
	return "Released mass"
}

// sourceMassRows lists the depletion of each source with a mass: its
// rate, when it falls below the screening level and when its mass is gone.
func sourceMassRows(d plume.Derived, u plume.Units) []inputRow {
	var rows []inputRow
	orNever := func(p *float64) string {
		if p == nil {
			return "never"
		}
		return fmtReportNumber(*p)
	}
	for _, sd := range d.Sources {
		if sd.DepletionRate == nil {
			continue
		}
		of := ""
		if sd.ID != "" {
			of = " (" + sd.ID + ")"
		}
		rows = append(rows,
			inputRow{Name: "Source depletion rate" + of, Value: fmtReportNumber(*sd.DepletionRate), Unit: "1/" + u.Time, Basis: basisDerived,
				How: "Q C0 / M0 with Q = n_e v W D (source mass; Falta, Rao & Basu 2005)"},
			inputRow{Name: "Source mass exhausted" + of, Value: orNever(sd.TimeMassExhausted), Unit: u.Time, Basis: basisDerived, How: "on the scenario's clock"})
		if d.ScreeningLevel != nil {
			rows = append(rows, inputRow{Name: "Source below the screening level" + of, Value: orNever(sd.TimeBelowScreeningLevel), Unit: u.Time,
				Basis: basisDerived, How: "on the scenario's clock"})
		}
	}
	return rows
}
