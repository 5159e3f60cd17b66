package plume

import (
	"fmt"
	"strconv"
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
//   - source: concentration (> 0), mass (> 0, an instantaneous release),
//     or both (a source depleting by its mass: width and depth,
//     effective_porosity, no duration or half-life, depletion_exponent in
//     (0, 10]); width and depth both or neither, > 0; start >= 0; duration
//     > 0; inlet "concentration" or "flux" (flux only for a 1D column); an
//     instantaneous mass needs effective_porosity and no duration or half-life;
//   - at least one receptor, each with finite x and y, depths >= 0, both
//     screen ends or neither with bottom >= top, unique ids;
//   - no control characters in receptor ids or the contaminant's name
//     (CheckText);
//   - times >= 0 and finite; methods from exact, domenico, numeric.
func Validate(sc Scenario) error { return validate(sc, true) }

// validate is Validate; without receptors it checks everything but the
// receptors (a layer's, checked one by one as they arrive: see Layer).
func validate(sc Scenario, receptors bool) error {
	var fe FieldErrors
	validateUnits(&fe, sc.Units)
	validateAquifer(&fe, sc)
	validateContaminant(&fe, sc)
	validateSource(&fe, sc)
	if receptors {
		validateReceptors(&fe, sc.Receptors)
	}
	validateCRS(&fe, sc, receptors)
	validateTransects(&fe, sc)
	for i, t := range sc.Times {
		if !Finite(t) || t < 0 {
			fe.Add(fmt.Sprintf("times[%d]", i), fmt.Sprintf("must be a finite number >= 0, got %g", t))
		}
	}
	for i, m := range sc.Methods {
		if !KnownMethod(m) {
			fe.Add(fmt.Sprintf("methods[%d]", i), fmt.Sprintf("must be one of %s, got %q", strings.Join(AllMethods, ", "), m))
		}
	}
	return fe.Err()
}

// KnownMethod reports whether m names a method.
func KnownMethod(m string) bool {
	for _, k := range AllMethods {
		if m == k {
			return true
		}
	}
	return false
}

// Rule is a range check on a given number; it returns "" when v is allowed,
// else the allowed range in words.
type Rule func(v float64) string

// Positive allows v > 0.
func Positive(v float64) string {
	if v > 0 {
		return ""
	}
	return "must be > 0"
}

// NonNegative allows v >= 0.
func NonNegative(v float64) string {
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

// AnyFinite allows every finite number.
func AnyFinite(float64) string { return "" }

// Check adds an error when p is given and not finite or not allowed by r.
func (fe *FieldErrors) Check(path string, p *float64, r Rule) {
	if msg := ruleMessage(p, r); msg != "" {
		fe.Add(path, msg)
	}
}

// ruleMessage is what is wrong with *p under r, "" when p is nil or the
// value passes.
func ruleMessage(p *float64, r Rule) string {
	if p == nil {
		return ""
	}
	v := *p
	if !Finite(v) {
		msg := r(1)
		if msg == "" {
			msg = "must be a finite number"
		} else {
			msg += " and finite"
		}
		return fmt.Sprintf("%s, got %g", msg, v)
	}
	if msg := r(v); msg != "" {
		return fmt.Sprintf("%s, got %g", msg, v)
	}
	return ""
}

// elemPath is the JSON path of an object: an element of an array
// ("receptors", 3: receptors[3]) or, with index -1, a top-level object
// ("contaminant"). Its text is built only when a field is refused, so that
// validating a large valid request allocates nothing for paths.
type elemPath struct {
	array string
	index int
}

// String is the path as text.
func (e elemPath) String() string {
	if e.index < 0 {
		return e.array
	}
	return e.array + "[" + strconv.Itoa(e.index) + "]"
}

// field is the path of one of the object's fields.
func (e elemPath) field(name string) string { return e.String() + "." + name }

// CheckIn is Check for the field name of the object at e.
func (fe *FieldErrors) CheckIn(e elemPath, name string, p *float64, r Rule) {
	if msg := ruleMessage(p, r); msg != "" {
		fe.Add(e.field(name), msg)
	}
}

func validateUnits(fe *FieldErrors, u Units) {
	switch u.Length {
	case "", LengthMetre, LengthFoot:
	default:
		fe.Add("units.length", fmt.Sprintf("must be %q or %q, got %q", LengthMetre, LengthFoot, u.Length))
	}
	switch u.Time {
	case "", TimeDay, TimeYear:
	default:
		fe.Add("units.time", fmt.Sprintf("must be %q or %q, got %q", TimeDay, TimeYear, u.Time))
	}
	switch u.Concentration {
	case "", ConcMgL, ConcUgL:
	default:
		fe.Add("units.concentration", fmt.Sprintf("must be %q or %q, got %q", ConcMgL, ConcUgL, u.Concentration))
	}
	if want := massDischargeUnit(u.Time); u.MassDischarge != "" && u.MassDischarge != want {
		fe.Add("units.mass_discharge", fmt.Sprintf("is set by the engine from units.time: %q here; leave it out, got %q", want, u.MassDischarge))
	}
	if _, ok := conductivityUnits[u.Conductivity]; !ok && u.Conductivity != "" {
		fe.Add("units.conductivity", fmt.Sprintf("must be one of %s, got %q", strings.Join(ConductivityUnits(), ", "), u.Conductivity))
	}
}

func validateAquifer(fe *FieldErrors, sc Scenario) {
	a := sc.Aquifer
	fe.Check("aquifer.hydraulic_conductivity", a.HydraulicConductivity, Positive)
	fe.Check("aquifer.hydraulic_gradient", a.HydraulicGradient, Positive)
	fe.Check("aquifer.dispersivity_scale", a.DispersivityScale, Positive)
	fe.Check("aquifer.effective_porosity", a.EffectivePorosity, openUnit)
	fe.Check("aquifer.seepage_velocity", a.SeepageVelocity, Positive)
	fe.Check("aquifer.bulk_density", a.BulkDensity, Positive)
	fe.Check("aquifer.organic_carbon_fraction", a.OrganicCarbonFraction, closedUnit)
	fe.Check("aquifer.effective_diffusion", a.EffectiveDiffusion, NonNegative)
	if d := a.Dispersivity; d != nil {
		fe.Check("aquifer.dispersivity.longitudinal", d.Longitudinal, Positive)
		fe.Check("aquifer.dispersivity.transverse", d.Transverse, Positive)
		fe.Check("aquifer.dispersivity.vertical", d.Vertical, Positive)
	}
	if a.SeepageVelocity == nil {
		const why = "required unless aquifer.seepage_velocity is given (v = K i / n_e)"
		if a.HydraulicConductivity == nil {
			fe.Add("aquifer.hydraulic_conductivity", why)
		}
		if a.HydraulicGradient == nil {
			fe.Add("aquifer.hydraulic_gradient", why)
		}
		if a.EffectivePorosity == nil {
			fe.Add("aquifer.effective_porosity", why)
		}
	}
}

func validateContaminant(fe *FieldErrors, sc Scenario) {
	if len(sc.Contaminants) > 0 {
		validateContaminants(fe, sc)
		return
	}
	validateOneContaminant(fe, sc.Aquifer, elemPath{"contaminant", -1}, sc.Contaminant)
}

// validateOneContaminant checks one compound's properties; e is its JSON
// path (contaminant, or contaminants[i]).
func validateOneContaminant(fe *FieldErrors, a Aquifer, e elemPath, c Contaminant) {
	if msg := textMessage(c.Name, false); msg != "" {
		fe.Add(e.field("name"), msg)
	}
	fe.CheckIn(e, "koc", c.Koc, NonNegative)
	fe.CheckIn(e, "half_life", c.HalfLife, Positive)
	fe.CheckIn(e, "retardation", c.Retardation, atLeastOne)
	fe.CheckIn(e, "screening_level", c.ScreeningLevel, Positive)
	fe.CheckIn(e, "solubility", c.Solubility, Positive)
	switch c.DecayAppliesTo {
	case "", DecayTotal, DecayDissolved:
	default:
		fe.Add(e.field("decay_applies_to"), fmt.Sprintf("must be %q or %q, got %q", DecayTotal, DecayDissolved, c.DecayAppliesTo))
	}
	if c.Retardation != nil {
		return
	}
	why := func() string {
		return "required unless " + e.field("retardation") + " is given (R = 1 + rho_b Koc f_oc / n_e)"
	}
	if c.Koc == nil {
		ref, ok := lookupReference(c.Name)
		if !ok || ref.Koc == nil {
			fe.Add(e.field("koc"), "required unless "+e.field("retardation")+" is given or "+e.field("name")+" is in the reference table with a Koc")
		}
	}
	if a.OrganicCarbonFraction == nil {
		fe.Add("aquifer.organic_carbon_fraction", why())
	}
	if a.BulkDensity == nil {
		fe.Add("aquifer.bulk_density", why())
	}
	if a.EffectivePorosity == nil && a.SeepageVelocity != nil {
		fe.Add("aquifer.effective_porosity", why())
	}
}

// validateOneSource checks one source; at is its JSON path ("source" or
// "sources[i]").
func validateOneSource(fe *FieldErrors, sc Scenario, at string, s Source) {
	path := func(f string) string { return at + "." + f }
	check := func(f string, p *float64, r Rule) { // the path is built only for a problem
		if msg := ruleMessage(p, r); msg != "" {
			fe.Add(path(f), msg)
		}
	}
	check("x", s.X, AnyFinite)
	check("y", s.Y, AnyFinite)
	check("flow_azimuth_deg", s.FlowAzimuthDeg, AnyFinite)
	check("concentration", s.Concentration, Positive)
	check("width", s.Width, Positive)
	check("depth", s.Depth, Positive)
	check("start", s.Start, NonNegative)
	check("duration", s.Duration, Positive)
	check("half_life", s.HalfLife, Positive)
	check("mass", s.Mass, Positive)
	check("release_depth", s.ReleaseDepth, NonNegative)
	check("depletion_exponent", s.DepletionExponent, depletionExponent)
	switch {
	case len(sc.Contaminants) > 0:
		if s.Concentration != nil {
			fe.Add(path("concentration"), "with contaminants, give each compound's source_concentration instead")
		}
		if s.Mass != nil {
			fe.Add(path("mass"), "several compounds need a continuous source of constant strength (each compound's source_concentration), not an instantaneous release or a source mass")
		}
	case s.Concentration == nil && s.Mass == nil:
		fe.Add(path("concentration"), "required (or source.mass for an instantaneous release)")
	}
	if s.DepletionExponent != nil && !s.depletesByMass() {
		fe.Add(path("depletion_exponent"), "applies only to a source with both a mass and a concentration (a source that depletes by its mass)")
	}
	switch {
	case s.depletesByMass():
		validateSourceMass(fe, sc, path, s)
		return
	case s.Mass != nil:
		if s.Duration != nil {
			fe.Add(path("duration"), "must be null for an instantaneous release (source.mass)")
		}
		if s.HalfLife != nil {
			fe.Add(path("half_life"), "must be null for an instantaneous release (source.mass)")
		}
		if sc.Aquifer.EffectivePorosity == nil {
			fe.Add("aquifer.effective_porosity", "required for an instantaneous release (source.mass)")
		}
		if s.Inlet != "" {
			fe.Add(path("inlet"), "applies only to a continuous 1D column source")
		}
		return
	}
	if s.ReleaseDepth != nil {
		fe.Add(path("release_depth"), "applies only to an instantaneous release (source.mass)")
	}
	validateSourceShape(fe, path, s)
}

// validateSourceShape checks the geometry and inlet of a continuous source.
func validateSourceShape(fe *FieldErrors, path func(string) string, s Source) {
	if (s.Width == nil) != (s.Depth == nil) {
		if s.Width == nil {
			fe.Add(path("width"), "give both source.width and source.depth (3D source) or neither (1D column)")
		} else {
			fe.Add(path("depth"), "give both source.width and source.depth (3D source) or neither (1D column)")
		}
	}
	switch s.Inlet {
	case "", InletConcentration:
	case InletFlux:
		if s.Width != nil || s.Depth != nil {
			fe.Add(path("inlet"), `"flux" applies only to a 1D column source (no width and depth)`)
		}
	default:
		fe.Add(path("inlet"), fmt.Sprintf("must be %q or %q, got %q", InletConcentration, InletFlux, s.Inlet))
	}
}

// MaxDepletionExponent is the largest source.depletion_exponent accepted.
// The power-law source function holds for any exponent > 0; field fits
// mostly lie between about 0.5 and 2 (Falta, Rao & Basu 2005, from
// memory), and beyond 10 the source concentration falls by orders of
// magnitude as soon as any mass is lost, which no source zone sustains.
// Exponent 0 (a concentration independent of the mass: a constant source
// until the mass is gone) is source.duration's business, so the range is
// (0, MaxDepletionExponent].
const MaxDepletionExponent = 10

// depletionExponent allows v in (0, MaxDepletionExponent].
func depletionExponent(v float64) string {
	if v > 0 && v <= MaxDepletionExponent {
		return ""
	}
	return fmt.Sprintf("must be in (0, %d]", MaxDepletionExponent)
}

// validateSourceMass checks a continuous source with a dissolvable mass:
// it depletes by the water flux through its face, so it needs a face
// (width and depth), the effective porosity (the Darcy flux is n_e v), and
// no other history (half-life, duration).
func validateSourceMass(fe *FieldErrors, sc Scenario, path func(string) string, s Source) {
	if s.HalfLife != nil {
		fe.Add(path("half_life"), "must be null with a source mass: the source depletes by its mass (give source.mass or source.half_life, not both)")
	}
	if s.Duration != nil {
		fe.Add(path("duration"), "must be null with a source mass: the source lasts as long as its mass (give source.mass or source.duration, not both)")
	}
	if s.Width == nil && s.Depth == nil {
		fe.Add(path("mass"), "a source mass needs a planar source with width and depth: the water flowing through the source face drains it, and a 1D column has no face area")
	}
	if s.ReleaseDepth != nil {
		fe.Add(path("release_depth"), "applies only to an instantaneous release (source.mass without a concentration)")
	}
	if sc.Aquifer.EffectivePorosity == nil {
		fe.Add("aquifer.effective_porosity", "required with a source mass: the water flux through the source face is n_e v W D")
	}
	validateSourceShape(fe, path, s)
}

// validateSource checks source, or each of sources and how they fit
// together: at most MaxSources, all planar 3D sources with one flow
// direction, no two source zones overlapping.
func validateSource(fe *FieldErrors, sc Scenario) {
	if len(sc.Sources) == 0 {
		if sc.Source == (Source{}) && len(sc.Contaminants) == 0 {
			fe.Add("source", "required: the release, as source (one) or sources (several), with a concentration (or a mass for an instantaneous release)")
			return
		}
		validateOneSource(fe, sc, "source", sc.Source)
		return
	}
	if sc.Source != (Source{}) {
		fe.Add("sources", "give source (one) or sources (several), not both")
	}
	if len(sc.Sources) > MaxSources {
		fe.Add("sources", fmt.Sprintf("%d sources; at most %d allowed", len(sc.Sources), MaxSources))
		return
	}
	ids := map[string]int{}
	for i, src := range sc.Sources {
		at := fmt.Sprintf("sources[%d]", i)
		validateOneSource(fe, sc, at, src)
		if src.instantaneous() || src.Width == nil || src.Depth == nil {
			fe.Add(at, "each of several sources must be a planar 3D source with width, depth and concentration (an instantaneous release or a 1D column is screened on its own)")
		}
		if j, dup := ids[src.ID]; dup && src.ID != "" {
			fe.Add(at+".id", fmt.Sprintf("repeats the id of sources[%d]", j))
		}
		ids[src.ID] = i
		az, az0 := derefOr(src.FlowAzimuthDeg, DefaultFlowAzimuthDeg), derefOr(sc.Sources[0].FlowAzimuthDeg, DefaultFlowAzimuthDeg)
		if i > 0 && az != az0 {
			fe.Add(at+".flow_azimuth_deg", fmt.Sprintf("all sources share the aquifer and the flow direction: must equal sources[0]'s %g, got %g", az0, az))
		}
	}
	validateSourceOverlap(fe, sc.Sources)
}

func validateReceptors(fe *FieldErrors, rs []Receptor) {
	if len(rs) == 0 {
		fe.Add("receptors", "at least one receptor is required")
		return
	}
	seen := make(map[string]int, len(rs))
	for i, r := range rs {
		validateReceptor(fe, i, r)
		if r.ID != "" {
			if j, dup := seen[r.ID]; dup {
				fe.Add(elemPath{"receptors", i}.field("id"), fmt.Sprintf("must be unique; %q is also receptors[%d].id", r.ID, j))
			} else {
				seen[r.ID] = i
			}
		}
	}
}

// validateReceptor checks receptors[i] on its own (its uniqueness is the
// caller's): site x and y (or lon and lat), depths >= 0, both screen ends
// or neither with bottom >= top, an id without control characters.
func validateReceptor(fe *FieldErrors, i int, r Receptor) {
	e := elemPath{"receptors", i}
	if r.X == nil && !r.hasLonLat() {
		fe.Add(e.field("x"), "required: site x (east) of the receptor (or lon and lat with a crs)")
	}
	if r.Y == nil && !r.hasLonLat() {
		fe.Add(e.field("y"), "required: site y (north) of the receptor (or lon and lat with a crs)")
	}
	fe.CheckIn(e, "x", r.X, AnyFinite)
	fe.CheckIn(e, "y", r.Y, AnyFinite)
	fe.CheckIn(e, "z", r.Z, NonNegative)
	fe.CheckIn(e, "screen_top", r.ScreenTop, NonNegative)
	fe.CheckIn(e, "screen_bottom", r.ScreenBottom, NonNegative)
	switch {
	case (r.ScreenTop == nil) != (r.ScreenBottom == nil):
		if r.ScreenTop == nil {
			fe.Add(e.field("screen_top"), "give both screen_top and screen_bottom, or neither")
		} else {
			fe.Add(e.field("screen_bottom"), "give both screen_top and screen_bottom, or neither")
		}
	case r.ScreenTop != nil && Finite(*r.ScreenTop) && Finite(*r.ScreenBottom) && *r.ScreenBottom < *r.ScreenTop:
		fe.Add(e.field("screen_bottom"), fmt.Sprintf("must be >= screen_top (%g), got %g", *r.ScreenTop, *r.ScreenBottom))
	}
	if msg := textMessage(r.ID, false); msg != "" {
		fe.Add(e.field("id"), msg)
	}
}

// MaxSources is the most sources one scenario may hold.
const MaxSources = 100

// validateSourceOverlap refuses two sources whose zones overlap in plan:
// each zone is the source's footprint, its width across the flow from its
// downgradient face back one width upgradient (the convention of
// receptor_inside_source), in the common flow frame.
func validateSourceOverlap(fe *FieldErrors, srcs []Source) {
	type zone struct{ x0, x1, y0, y1 float64 }
	fr := frameOf(srcs[0])
	var zs []zone
	for _, s := range srcs {
		if s.Width == nil {
			zs = append(zs, zone{})
			continue
		}
		w := *s.Width
		px, py := fr.ToPlume(derefOr(s.X, 0), derefOr(s.Y, 0))
		zs = append(zs, zone{px - w, px, py - w/2, py + w/2})
	}
	for i := range zs {
		for j := range i {
			a, b := zs[i], zs[j]
			if srcs[i].Width == nil || srcs[j].Width == nil {
				continue
			}
			if a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1 {
				fe.Add(fmt.Sprintf("sources[%d]", i), fmt.Sprintf(
					"its source zone overlaps that of sources[%d] (each zone is the source's width across the flow, reaching one width upgradient of its face): merge them into one source or move them apart", j))
			}
		}
	}
}

// derefOr is *p, or d when p is nil.
func derefOr(p *float64, d float64) float64 {
	if p == nil {
		return d
	}
	return *p
}

// MaxTransects is the most transects one scenario may hold.
const MaxTransects = 100

// validateTransects checks each transect: a line of positive length, a
// depth interval with bottom below top, a positive stream flow and level,
// unique ids; the mass discharge needs the effective porosity (the Darcy
// flux is n_e v) and a source with a width (a 1D column has none).
func validateTransects(fe *FieldErrors, sc Scenario) {
	if len(sc.Transects) == 0 {
		return
	}
	if len(sc.Transects) > MaxTransects {
		fe.Add("transects", fmt.Sprintf("%d transects; at most %d allowed", len(sc.Transects), MaxTransects))
		return
	}
	if sc.Aquifer.EffectivePorosity == nil {
		fe.Add("aquifer.effective_porosity", "required for a transect's mass discharge (the Darcy flux is n_e v)")
	}
	if src := sc.PrimarySource(); !src.instantaneous() && src.Width == nil {
		fe.Add("transects", "a 1D column source has no width, so no mass discharge through a transect: give source.width and source.depth")
	}
	ids := map[string]int{}
	for i, t := range sc.Transects {
		at := func(f string) string { return fmt.Sprintf("transects[%d].%s", i, f) }
		for k, v := range []float64{t.From[0], t.From[1], t.To[0], t.To[1]} {
			if !Finite(v) {
				fe.Add(at([]string{"from", "from", "to", "to"}[k]), "coordinates must be finite numbers")
			}
		}
		if t.From == t.To {
			fe.Add(at("to"), "must differ from from: a transect of zero length carries no discharge")
		}
		fe.Check(at("top"), t.Top, NonNegative)
		switch {
		case t.Bottom == nil:
			fe.Add(at("bottom"), "required: the depth of the transect's bottom below the water table, L")
		case !Finite(*t.Bottom) || *t.Bottom <= derefOr(t.Top, 0):
			fe.Add(at("bottom"), fmt.Sprintf("must be a finite number > top (%g), got %g", derefOr(t.Top, 0), *t.Bottom))
		}
		fe.Check(at("stream_flow"), t.StreamFlow, Positive)
		fe.Check(at("screening_level"), t.ScreeningLevel, Positive)
		if j, dup := ids[t.ID]; dup && t.ID != "" {
			fe.Add(at("id"), fmt.Sprintf("repeats the id of transects[%d]", j))
		}
		ids[t.ID] = i
		if len(t.ID) > 200 {
			fe.Add(at("id"), "at most 200 characters")
		}
	}
}
