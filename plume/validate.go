package plume

import (
	"fmt"
	"strings"
)

// Validate checks a scenario in its own units and returns every bad field at
// once as FieldErrors (nil when the scenario is valid). The rules:
//   - units from m|ft, d|yr, mg/L|ug/L;
//   - every number finite (no NaN or Inf);
//   - aquifer: conductivity, gradient, seepage velocity, bulk density and
//     dispersivities > 0; effective porosity in (0, 1); organic carbon
//     fraction in [0, 1]; effective diffusion >= 0;
//   - seepage_velocity, or hydraulic_conductivity + hydraulic_gradient +
//     effective_porosity;
//   - contaminant.retardation (>= 1), or Koc (given, or from the reference
//     table by name) + organic_carbon_fraction + bulk_density + effective_porosity;
//   - half-lives > 0 or null; screening level and solubility > 0; Koc >= 0;
//     decay_applies_to "total" or "dissolved";
//   - source: exactly one of concentration (> 0) or mass (> 0); width and
//     depth both or neither, > 0; start >= 0; duration > 0; inlet
//     "concentration" or "flux" (flux only for a 1D column); an
//     instantaneous mass needs effective_porosity and no duration or half-life;
//   - at least one receptor, each with finite x and y, depths >= 0, both
//     screen ends or neither with bottom >= top, unique ids;
//   - times >= 0 and finite; methods from exact, domenico, numeric.
func Validate(sc Scenario) error {
	var fe FieldErrors
	validateUnits(&fe, sc.Units)
	validateAquifer(&fe, sc)
	validateContaminant(&fe, sc)
	validateSource(&fe, sc)
	validateReceptors(&fe, sc.Receptors)
	for i, t := range sc.Times {
		if !finite(t) || t < 0 {
			fe.add(fmt.Sprintf("times[%d]", i), fmt.Sprintf("must be a finite number >= 0, got %g", t))
		}
	}
	for i, m := range sc.Methods {
		if !knownMethod(m) {
			fe.add(fmt.Sprintf("methods[%d]", i), fmt.Sprintf("must be one of %s, got %q", strings.Join(AllMethods, ", "), m))
		}
	}
	return fe.orNil()
}

func knownMethod(m string) bool {
	for _, k := range AllMethods {
		if m == k {
			return true
		}
	}
	return false
}

// rule is a range check on a given number; it returns "" when v is allowed,
// else the allowed range in words.
type rule func(v float64) string

func positive(v float64) string {
	if v > 0 {
		return ""
	}
	return "must be > 0"
}

func nonNegative(v float64) string {
	if v >= 0 {
		return ""
	}
	return "must be >= 0"
}

func openUnit(v float64) string {
	if v > 0 && v < 1 {
		return ""
	}
	return "must be in (0, 1)"
}

func closedUnit(v float64) string {
	if v >= 0 && v <= 1 {
		return ""
	}
	return "must be in [0, 1]"
}

func atLeastOne(v float64) string {
	if v >= 1 {
		return ""
	}
	return "must be >= 1"
}

func anyFinite(float64) string { return "" }

// check adds an error when p is given and not finite or not allowed by r.
func (fe *FieldErrors) check(path string, p *float64, r rule) {
	if p == nil {
		return
	}
	v := *p
	if !finite(v) {
		msg := r(1)
		if msg == "" {
			msg = "must be a finite number"
		} else {
			msg += " and finite"
		}
		fe.add(path, fmt.Sprintf("%s, got %g", msg, v))
		return
	}
	if msg := r(v); msg != "" {
		fe.add(path, fmt.Sprintf("%s, got %g", msg, v))
	}
}

func validateUnits(fe *FieldErrors, u Units) {
	switch u.Length {
	case "", LengthMetre, LengthFoot:
	default:
		fe.add("units.length", fmt.Sprintf("must be %q or %q, got %q", LengthMetre, LengthFoot, u.Length))
	}
	switch u.Time {
	case "", TimeDay, TimeYear:
	default:
		fe.add("units.time", fmt.Sprintf("must be %q or %q, got %q", TimeDay, TimeYear, u.Time))
	}
	switch u.Concentration {
	case "", ConcMgL, ConcUgL:
	default:
		fe.add("units.concentration", fmt.Sprintf("must be %q or %q, got %q", ConcMgL, ConcUgL, u.Concentration))
	}
}

func validateAquifer(fe *FieldErrors, sc Scenario) {
	a := sc.Aquifer
	fe.check("aquifer.hydraulic_conductivity", a.HydraulicConductivity, positive)
	fe.check("aquifer.hydraulic_gradient", a.HydraulicGradient, positive)
	fe.check("aquifer.effective_porosity", a.EffectivePorosity, openUnit)
	fe.check("aquifer.seepage_velocity", a.SeepageVelocity, positive)
	fe.check("aquifer.bulk_density", a.BulkDensity, positive)
	fe.check("aquifer.organic_carbon_fraction", a.OrganicCarbonFraction, closedUnit)
	fe.check("aquifer.effective_diffusion", a.EffectiveDiffusion, nonNegative)
	if d := a.Dispersivity; d != nil {
		fe.check("aquifer.dispersivity.longitudinal", d.Longitudinal, positive)
		fe.check("aquifer.dispersivity.transverse", d.Transverse, positive)
		fe.check("aquifer.dispersivity.vertical", d.Vertical, positive)
	}
	if a.SeepageVelocity == nil {
		const why = "required unless aquifer.seepage_velocity is given (v = K i / n_e)"
		if a.HydraulicConductivity == nil {
			fe.add("aquifer.hydraulic_conductivity", why)
		}
		if a.HydraulicGradient == nil {
			fe.add("aquifer.hydraulic_gradient", why)
		}
		if a.EffectivePorosity == nil {
			fe.add("aquifer.effective_porosity", why)
		}
	}
}

func validateContaminant(fe *FieldErrors, sc Scenario) {
	c, a := sc.Contaminant, sc.Aquifer
	fe.check("contaminant.koc", c.Koc, nonNegative)
	fe.check("contaminant.half_life", c.HalfLife, positive)
	fe.check("contaminant.retardation", c.Retardation, atLeastOne)
	fe.check("contaminant.screening_level", c.ScreeningLevel, positive)
	fe.check("contaminant.solubility", c.Solubility, positive)
	switch c.DecayAppliesTo {
	case "", DecayTotal, DecayDissolved:
	default:
		fe.add("contaminant.decay_applies_to", fmt.Sprintf("must be %q or %q, got %q", DecayTotal, DecayDissolved, c.DecayAppliesTo))
	}
	if c.Retardation == nil {
		const why = "required unless contaminant.retardation is given (R = 1 + rho_b Koc f_oc / n_e)"
		if c.Koc == nil {
			ref, ok := lookupReference(c.Name)
			if !ok || ref.Koc == nil {
				fe.add("contaminant.koc", "required unless contaminant.retardation is given or contaminant.name is in the reference table with a Koc")
			}
		}
		if a.OrganicCarbonFraction == nil {
			fe.add("aquifer.organic_carbon_fraction", why)
		}
		if a.BulkDensity == nil {
			fe.add("aquifer.bulk_density", why)
		}
		if a.EffectivePorosity == nil && a.SeepageVelocity != nil {
			fe.add("aquifer.effective_porosity", why)
		}
	}
}

func validateSource(fe *FieldErrors, sc Scenario) {
	s := sc.Source
	fe.check("source.x", s.X, anyFinite)
	fe.check("source.y", s.Y, anyFinite)
	fe.check("source.flow_azimuth_deg", s.FlowAzimuthDeg, anyFinite)
	fe.check("source.concentration", s.Concentration, positive)
	fe.check("source.width", s.Width, positive)
	fe.check("source.depth", s.Depth, positive)
	fe.check("source.start", s.Start, nonNegative)
	fe.check("source.duration", s.Duration, positive)
	fe.check("source.half_life", s.HalfLife, positive)
	fe.check("source.mass", s.Mass, positive)
	fe.check("source.release_depth", s.ReleaseDepth, nonNegative)
	switch {
	case s.Concentration == nil && s.Mass == nil:
		fe.add("source.concentration", "required (or source.mass for an instantaneous release)")
	case s.Concentration != nil && s.Mass != nil:
		fe.add("source.mass", "give either source.concentration (continuous source) or source.mass (instantaneous release), not both")
	}
	if s.Mass != nil {
		if s.Duration != nil {
			fe.add("source.duration", "must be null for an instantaneous release (source.mass)")
		}
		if s.HalfLife != nil {
			fe.add("source.half_life", "must be null for an instantaneous release (source.mass)")
		}
		if sc.Aquifer.EffectivePorosity == nil {
			fe.add("aquifer.effective_porosity", "required for an instantaneous release (source.mass)")
		}
		if s.Inlet != "" {
			fe.add("source.inlet", "applies only to a continuous 1D column source")
		}
		return
	}
	if s.ReleaseDepth != nil {
		fe.add("source.release_depth", "applies only to an instantaneous release (source.mass)")
	}
	if (s.Width == nil) != (s.Depth == nil) {
		if s.Width == nil {
			fe.add("source.width", "give both source.width and source.depth (3D source) or neither (1D column)")
		} else {
			fe.add("source.depth", "give both source.width and source.depth (3D source) or neither (1D column)")
		}
	}
	switch s.Inlet {
	case "", InletConcentration:
	case InletFlux:
		if s.Width != nil || s.Depth != nil {
			fe.add("source.inlet", `"flux" applies only to a 1D column source (no width and depth)`)
		}
	default:
		fe.add("source.inlet", fmt.Sprintf("must be %q or %q, got %q", InletConcentration, InletFlux, s.Inlet))
	}
}

func validateReceptors(fe *FieldErrors, rs []Receptor) {
	if len(rs) == 0 {
		fe.add("receptors", "at least one receptor is required")
		return
	}
	seen := make(map[string]int, len(rs))
	for i, r := range rs {
		p := fmt.Sprintf("receptors[%d]", i)
		if r.X == nil {
			fe.add(p+".x", "required: site x (east) of the receptor")
		}
		if r.Y == nil {
			fe.add(p+".y", "required: site y (north) of the receptor")
		}
		fe.check(p+".x", r.X, anyFinite)
		fe.check(p+".y", r.Y, anyFinite)
		fe.check(p+".z", r.Z, nonNegative)
		fe.check(p+".screen_top", r.ScreenTop, nonNegative)
		fe.check(p+".screen_bottom", r.ScreenBottom, nonNegative)
		switch {
		case (r.ScreenTop == nil) != (r.ScreenBottom == nil):
			if r.ScreenTop == nil {
				fe.add(p+".screen_top", "give both screen_top and screen_bottom, or neither")
			} else {
				fe.add(p+".screen_bottom", "give both screen_top and screen_bottom, or neither")
			}
		case r.ScreenTop != nil && finite(*r.ScreenTop) && finite(*r.ScreenBottom) && *r.ScreenBottom < *r.ScreenTop:
			fe.add(p+".screen_bottom", fmt.Sprintf("must be >= screen_top (%g), got %g", *r.ScreenTop, *r.ScreenBottom))
		}
		if r.ID != "" {
			if j, dup := seen[r.ID]; dup {
				fe.add(p+".id", fmt.Sprintf("must be unique; %q is also receptors[%d].id", r.ID, j))
			} else {
				seen[r.ID] = i
			}
		}
	}
}
