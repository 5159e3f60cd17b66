package plume

import "math"

// ConcentrationFloorFraction is the fraction of the source concentration
// below which a concentration is reported as 0 (Derived.ConcentrationFloor):
// far below any screening level (drinking-water limits are above 1e-9 of a
// source concentration in practice), at the accuracy the closed forms
// promise (1e-12 of the source concentration in absolute terms), and well
// above the subnormal numbers a spreadsheet cannot store.
const ConcentrationFloorFraction = 1e-12

// concentrationFloor is the floor in mg/L: ConcentrationFloorFraction of
// the (largest) source concentration, or for an instantaneous release of
// the concentration of its mass dissolved in 1 m^3 of pore water
// (M [kg] * 1e6 mg / (n_e * 1000 L)).
func (m *model) concentrationFloor() float64 {
	return ConcentrationFloorFraction * m.referenceConcentration()
}

// referenceConcentration is the largest source concentration, mg/L (for an
// instantaneous release, its mass dissolved in 1 m^3 of pore water).
func (m *model) referenceConcentration() float64 {
	if m.kind == SourceKindInstantaneous {
		return m.massKg * 1000 / math.Max(m.porosity, 1e-3)
	}
	ref := m.c0
	for _, s := range m.extra {
		ref = math.Max(ref, s.c0)
	}
	return ref
}

// inputUnits is the unit of every dimensional input, by JSON path ("[]"
// for every index), as the engine reads it.
func inputUnits(u Units) UnitNames {
	L, T, C := u.Length, u.Time, u.Concentration
	return UnitNames{
		"aquifer.hydraulic_conductivity":  u.Conductivity,
		"aquifer.seepage_velocity":        L + "/" + T,
		"aquifer.bulk_density":            "kg/L",
		"aquifer.dispersivity":            L,
		"aquifer.dispersivity_scale":      L,
		"aquifer.effective_diffusion":     L + "^2/" + T,
		"contaminant.koc":                 "L/kg",
		"contaminant.half_life":           T,
		"contaminant.screening_level":     C,
		"contaminant.solubility":          C,
		"source.x":                        L,
		"source.y":                        L,
		"source.flow_azimuth_deg":         "degrees clockwise from north",
		"source.concentration":            C,
		"source.width":                    L,
		"source.depth":                    L,
		"source.start":                    T,
		"source.duration":                 T,
		"source.half_life":                T,
		"source.mass":                     "kg",
		"source.release_depth":            L,
		"receptors[]":                     L,
		"times[]":                         T,
		"aquifer.hydraulic_gradient":      "dimensionless",
		"aquifer.effective_porosity":      "dimensionless",
		"aquifer.organic_carbon_fraction": "dimensionless",
	}
}
