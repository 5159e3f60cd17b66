package plume

import "math"

// Unit names accepted in Units.
const (
	LengthMetre = "m"
	LengthFoot  = "ft"
	TimeDay     = "d"
	TimeYear    = "yr"
	ConcMgL     = "mg/L"
	ConcUgL     = "ug/L"
)

// Hydraulic conductivity units accepted in Units.Conductivity, with their
// exact factors to m/d (1 ft = 0.3048 m, 1 d = 86400 s, 1 yr = 365.25 d,
// 1 US gallon = 3.785411784 L, NIST SP 811 appendix B).
var conductivityUnits = map[string]float64{
	"m/d":     1,
	"ft/d":    MetresPerFoot,
	"m/s":     86400,
	"cm/s":    864,
	"m/yr":    1 / DaysPerYear,
	"ft/yr":   MetresPerFoot / DaysPerYear,
	"gpd/ft2": 3.785411784e-3 / (MetresPerFoot * MetresPerFoot),
}

// ConductivityUnits lists the names accepted in Units.Conductivity.
func ConductivityUnits() []string {
	return []string{"m/d", "ft/d", "m/s", "cm/s", "m/yr", "ft/yr", "gpd/ft2"}
}

// Exact conversion factors to the canonical units (m, d, mg/L).
const (
	// MetresPerFoot: the international foot, exactly 0.3048 m (NIST SP 811, appendix B).
	MetresPerFoot = 0.3048
	// DaysPerYear: the Julian year of 365.25 d, our stated convention for "yr".
	DaysPerYear = 365.25
	// MgLPerUgL: 1 ug/L = 0.001 mg/L (SI prefixes).
	MgLPerUgL = 0.001
)

// unitFactors are the multipliers from request units to canonical units:
// a request value q in the request's unit is q*f in the canonical unit.
type unitFactors struct {
	L float64 // metres per request length unit
	T float64 // days per request time unit
	C float64 // mg/L per request concentration unit
	K float64 // m/d per request conductivity unit
	M float64 // g/d per request mass-discharge unit
}

// converter is the factors of a conversion to canonical units and where
// the converted optional values are kept (one allocation per block).
type converter struct {
	unitFactors
	opt *optionals
}

// withDefaults fills empty unit names with m, d, mg/L.
func (u Units) withDefaults() Units {
	if u.Length == "" {
		u.Length = LengthMetre
	}
	if u.Time == "" {
		u.Time = TimeDay
	}
	if u.Concentration == "" {
		u.Concentration = ConcMgL
	}
	if u.Conductivity == "" {
		u.Conductivity = u.Length + "/" + u.Time
	}
	u.MassDischarge = massDischargeUnit(u.Time)
	return u
}

// massDischargeUnit is the mass-discharge unit of a time unit.
func massDischargeUnit(time string) string {
	if time == TimeYear {
		return "kg/yr"
	}
	return "g/d"
}

// factors returns the conversion factors of u; ok is false when a name is unknown.
func (u Units) factors() (f unitFactors, ok bool) {
	u = u.withDefaults()
	ok = true
	switch u.Length {
	case LengthMetre:
		f.L = 1
	case LengthFoot:
		f.L = MetresPerFoot
	default:
		ok = false
	}
	switch u.Time {
	case TimeDay:
		f.T = 1
	case TimeYear:
		f.T = DaysPerYear
	default:
		ok = false
	}
	switch u.Concentration {
	case ConcMgL:
		f.C = 1
	case ConcUgL:
		f.C = MgLPerUgL
	default:
		ok = false
	}
	f.K = f.L / f.T
	f.M = 1
	if u.Time == TimeYear {
		f.M = 1000 / DaysPerYear // kg/yr -> g/d
	}
	if k, given := conductivityUnits[u.Conductivity]; given {
		f.K = k
	} else if u.Conductivity != u.Length+"/"+u.Time {
		ok = false
	}
	return f, ok
}

// scaled returns a copy of p multiplied by k (nil stays nil).
func scaled(p *float64, k float64) *float64 {
	if p == nil {
		return nil
	}
	v := *p * k
	return &v
}

// toCanonical returns a deep copy of sc with every quantity in m, d, mg/L and
// Units set to the canonical names. sc must have valid unit names.
func toCanonical(sc Scenario) Scenario {
	uf, _ := sc.Units.factors()
	f := converter{uf, new(optionals)}
	out := sc
	out.Units = Units{Length: LengthMetre, Time: TimeDay, Concentration: ConcMgL}
	out.Aquifer = canonicalAquifer(sc.Aquifer, f)
	out.Contaminant = canonicalContaminant(sc.Contaminant, f)
	if len(sc.Contaminants) > 0 {
		out.Contaminants = make([]Constituent, len(sc.Contaminants))
		for i, k := range sc.Contaminants {
			out.Contaminants[i] = canonicalConstituent(k, f)
		}
	}
	out.Source = canonicalSource(sc.Source, f)
	if len(sc.Sources) > 0 {
		out.Sources = make([]Source, len(sc.Sources))
		for i, src := range sc.Sources {
			out.Sources[i] = canonicalSource(src, f)
		}
	}
	if len(sc.Transects) > 0 {
		out.Transects = make([]Transect, len(sc.Transects))
		for i, tr := range sc.Transects {
			out.Transects[i] = canonicalTransect(tr, f)
		}
	}
	out.Receptors = make([]Receptor, len(sc.Receptors))
	for i, r := range sc.Receptors {
		out.Receptors[i] = canonicalReceptor(r, f)
	}
	out.Times = make([]float64, len(sc.Times))
	for i, t := range sc.Times {
		out.Times[i] = t * f.T
	}
	out.Methods = append([]string(nil), sc.Methods...)
	return out
}

// canonicalAquifer converts the aquifer's dimensional fields (factors f:
// request unit -> canonical; the conductivity by f.K, its own unit).
func canonicalAquifer(a Aquifer, f converter) Aquifer {
	L, T := f.L, f.T
	out := Aquifer{
		HydraulicConductivity: f.opt.scaled(a.HydraulicConductivity, f.K),
		HydraulicGradient:     f.opt.scaled(a.HydraulicGradient, 1),
		EffectivePorosity:     f.opt.scaled(a.EffectivePorosity, 1),
		SeepageVelocity:       f.opt.scaled(a.SeepageVelocity, L/T),
		BulkDensity:           f.opt.scaled(a.BulkDensity, 1),
		OrganicCarbonFraction: f.opt.scaled(a.OrganicCarbonFraction, 1),
		EffectiveDiffusion:    f.opt.scaled(a.EffectiveDiffusion, L*L/T),
		DispersivityScale:     f.opt.scaled(a.DispersivityScale, L),
	}
	if a.Dispersivity != nil {
		out.Dispersivity = &Dispersivity{
			Longitudinal: f.opt.scaled(a.Dispersivity.Longitudinal, L),
			Transverse:   f.opt.scaled(a.Dispersivity.Transverse, L),
			Vertical:     f.opt.scaled(a.Dispersivity.Vertical, L),
		}
	}
	return out
}

// canonicalContaminant converts the single-compound form's fields.
func canonicalContaminant(c Contaminant, f converter) Contaminant {
	return Contaminant{
		Name:             c.Name,
		Koc:              f.opt.scaled(c.Koc, 1),
		HalfLife:         f.opt.scaled(c.HalfLife, f.T),
		UseTableHalfLife: c.UseTableHalfLife,
		Retardation:      f.opt.scaled(c.Retardation, 1),
		ScreeningLevel:   f.opt.scaled(c.ScreeningLevel, f.C),
		Solubility:       f.opt.scaled(c.Solubility, f.C),
		DecayAppliesTo:   c.DecayAppliesTo,
	}
}

// canonicalConstituent converts one compound of contaminants[].
func canonicalConstituent(k Constituent, f converter) Constituent {
	k.SourceConcentration = f.opt.scaled(k.SourceConcentration, f.C)
	k.HalfLife = f.opt.scaled(k.HalfLife, f.T)
	k.ScreeningLevel = f.opt.scaled(k.ScreeningLevel, f.C)
	k.Solubility = f.opt.scaled(k.Solubility, f.C)
	return k
}

// canonicalTransect converts a transect's line, depths, stream flow
// (volume per time) and surface-water level.
func canonicalTransect(tr Transect, f converter) Transect {
	L := f.L
	return Transect{
		ID:             tr.ID,
		From:           [2]float64{tr.From[0] * L, tr.From[1] * L},
		To:             [2]float64{tr.To[0] * L, tr.To[1] * L},
		Top:            f.opt.scaled(tr.Top, L),
		Bottom:         f.opt.scaled(tr.Bottom, L),
		StreamFlow:     f.opt.scaled(tr.StreamFlow, L*L*L/f.T),
		ScreeningLevel: f.opt.scaled(tr.ScreeningLevel, f.C),
	}
}

// canonicalReceptor converts a receptor's position and screen.
func canonicalReceptor(r Receptor, f converter) Receptor {
	L := f.L
	return Receptor{
		ID:           r.ID,
		X:            f.opt.scaled(r.X, L),
		Y:            f.opt.scaled(r.Y, L),
		Z:            f.opt.scaled(r.Z, L),
		ScreenTop:    f.opt.scaled(r.ScreenTop, L),
		ScreenBottom: f.opt.scaled(r.ScreenBottom, L),
	}
}

// Finite reports whether x is neither NaN nor infinite.
func Finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// Clean returns x when finite, 0 for NaN, and the largest finite float64 of
// the same sign for an infinity. It is the last line of defence: results
// are built so that it never changes a value.
func Clean(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return 0
	case math.IsInf(x, 1):
		return math.MaxFloat64
	case math.IsInf(x, -1):
		return -math.MaxFloat64
	}
	return x
}

// canonicalSource is s in m, d, mg/L.
func canonicalSource(s Source, f converter) Source {
	L, T, C := f.L, f.T, f.C
	return Source{
		ID:                s.ID,
		X:                 f.opt.scaled(s.X, L),
		Y:                 f.opt.scaled(s.Y, L),
		FlowAzimuthDeg:    f.opt.scaled(s.FlowAzimuthDeg, 1),
		Concentration:     f.opt.scaled(s.Concentration, C),
		Width:             f.opt.scaled(s.Width, L),
		Depth:             f.opt.scaled(s.Depth, L),
		Start:             f.opt.scaled(s.Start, T),
		Duration:          f.opt.scaled(s.Duration, T),
		HalfLife:          f.opt.scaled(s.HalfLife, T),
		Mass:              f.opt.scaled(s.Mass, 1),
		DepletionExponent: f.opt.scaled(s.DepletionExponent, 1),
		ReleaseDepth:      f.opt.scaled(s.ReleaseDepth, L),
		Inlet:             s.Inlet,
	}
}
