package plume

import (
	"slices"
	"sort"
	"strings"

	"github.com/agnivade/levenshtein"
)

// Compound is one entry of the contaminant reference table served by
// GET /v1/contaminants: transport properties and drinking-water limits of a
// common fuel or solvent compound, each value with its source.
//
// (The name Contaminant is taken by the request's contaminant object, so the
// table entry is called Compound.)
//
// Values marked FromMemory were recalled from the named source but could not
// be checked against it while this table was written; check them before
// relying on them. Every value is a screening default: site data win.
type Compound struct {
	// Canonical lower-case name used in requests, e.g. "benzene", "cis-1,2-dce".
	Name string `json:"name"`
	// Human-readable name, e.g. "cis-1,2-Dichloroethene".
	Title string `json:"title"`
	// Other names LookupContaminant accepts (lower case).
	Aliases []string `json:"aliases"`
	// CAS Registry Number.
	CAS string `json:"cas"`
	// Organic-carbon partition coefficient Koc, L/kg.
	Koc SourcedValue `json:"koc"`
	// Aqueous solubility of the pure compound at about 25 C, mg/L.
	Solubility SourcedValue `json:"solubility"`
	// Typical range of the first-order half-life in groundwater, days.
	HalfLife HalfLifeRange `json:"half_life"`
	// Drinking-water limits, mg/L, with the regulation or guideline cited.
	DrinkingWaterLimits []DrinkingWaterLimit `json:"drinking_water_limits"`
	// Molar mass, g/mol: the default yield of a decay link is the ratio of
	// the daughter's molar mass to the parent's.
	MolarMass SourcedValue `json:"molar_mass"`
}

// SourcedValue is a number with its unit and the source it comes from.
type SourcedValue struct {
	// The value, in Unit.
	Value float64 `json:"value"`
	// Unit of Value, e.g. "L/kg" or "mg/L".
	Unit string `json:"unit"`
	// Bibliographic source.
	Source string `json:"source"`
	// True when the value was recalled from the source, not checked against it.
	FromMemory bool `json:"from_memory"`
}

// HalfLifeRange is a literature range of half-lives in groundwater, days.
// The long end (High) is the conservative choice for screening: slower decay
// gives a longer plume.
type HalfLifeRange struct {
	// Short end of the range, days.
	Low float64 `json:"low"`
	// Long end of the range, days.
	High float64 `json:"high"`
	// Unit of Low and High: "d".
	Unit string `json:"unit"`
	// Bibliographic source.
	Source string `json:"source"`
	// True when the range was recalled from the source, not checked against it.
	FromMemory bool `json:"from_memory"`
	// Conditions behind the range.
	Note string `json:"note,omitempty"`
}

// DrinkingWaterLimit is one authority's limit for the compound in drinking water.
type DrinkingWaterLimit struct {
	// Issuing body: "US EPA" or "WHO".
	Authority string `json:"authority"`
	// Kind of limit: "MCL" (enforceable maximum contaminant level),
	// "guideline value" (WHO), "provisional guideline value" (WHO) or
	// "advisory" (not enforceable).
	Kind string `json:"kind"`
	// The limit, mg/L.
	Value float64 `json:"value"`
	// Unit of Value: "mg/L".
	Unit string `json:"unit"`
	// The regulation or guideline cited.
	Regulation string `json:"regulation"`
	// True when the value was recalled from the regulation, not checked against it.
	FromMemory bool `json:"from_memory"`
	// Remarks, e.g. what the limit covers.
	Note string `json:"note,omitempty"`
}

// Citations used by the table.
const (
	srcSSG = "US EPA (1996) Soil Screening Guidance: Technical Background Document, 2nd ed., EPA/540/R-95/128, chemical-specific properties table"
	// Howard, Boethling, Jarvis, Meylan & Michalenko (1991).
	srcHoward = "Howard P.H. et al. (1991) Handbook of Environmental Degradation Rates, Lewis Publishers (groundwater half-life range)"
	// The table of 40 CFR 141.61(a) was checked against the published text of the regulation.
	srcMCL = "US EPA National Primary Drinking Water Regulations, 40 CFR 141.61(a) (maximum contaminant levels for volatile organic contaminants)"
	srcWHO = "WHO (2017) Guidelines for Drinking-water Quality, 4th ed. incorporating the 1st addendum, Annex 3 (chemical guideline values)"
)

func mcl(v float64) DrinkingWaterLimit {
	return DrinkingWaterLimit{Authority: "US EPA", Kind: "MCL", Value: v, Unit: "mg/L", Regulation: srcMCL}
}

func who(v float64, kind, note string) DrinkingWaterLimit {
	return DrinkingWaterLimit{Authority: "WHO", Kind: kind, Value: v, Unit: "mg/L", Regulation: srcWHO, FromMemory: true, Note: note}
}

func ssg(v float64, unit string) SourcedValue {
	return SourcedValue{Value: v, Unit: unit, Source: srcSSG, FromMemory: true}
}

// Standard atomic weights, g/mol (IUPAC, abridged to the values of the
// 2021 table: C 12.011, H 1.008, O 15.999, Cl 35.45).
const (
	atomicC  = 12.011
	atomicH  = 1.008
	atomicO  = 15.999
	atomicCl = 35.45
)

// molar is the molar mass of the formula C_c H_h O_o Cl_cl, g/mol.
func molar(formula string, c, h, o, cl float64) SourcedValue {
	return SourcedValue{Value: c*atomicC + h*atomicH + o*atomicO + cl*atomicCl, Unit: "g/mol",
		Source: "computed from the formula " + formula + " with the IUPAC standard atomic weights (C 12.011, H 1.008, O 15.999, Cl 35.45)"}
}

func howard(lo, hi float64, note string) HalfLifeRange {
	return HalfLifeRange{Low: lo, High: hi, Unit: "d", Source: srcHoward, FromMemory: true, Note: note}
}

const noteAerobic = "low: aerobic biodegradation; high: anaerobic or slow aerobic biodegradation (common practice: use site data where available)"

// compounds is the reference table, in the order it is served.
var compounds = []Compound{
	{
		Name: "benzene", Title: "Benzene", CAS: "71-43-2",
		MolarMass:           molar("C6H6", 6, 6, 0, 0),
		Aliases:             []string{},
		Koc:                 ssg(59, "L/kg"),
		Solubility:          ssg(1750, "mg/L"),
		HalfLife:            howard(10, 730, noteAerobic),
		DrinkingWaterLimits: []DrinkingWaterLimit{mcl(0.005), who(0.01, "guideline value", "")},
	},
	{
		Name: "toluene", Title: "Toluene", CAS: "108-88-3",
		MolarMass:           molar("C7H8", 7, 8, 0, 0),
		Aliases:             []string{"methylbenzene"},
		Koc:                 ssg(182, "L/kg"),
		Solubility:          ssg(526, "mg/L"),
		HalfLife:            howard(7, 28, noteAerobic),
		DrinkingWaterLimits: []DrinkingWaterLimit{mcl(1), who(0.7, "guideline value", "")},
	},
	{
		Name: "ethylbenzene", Title: "Ethylbenzene", CAS: "100-41-4",
		MolarMass:           molar("C8H10", 8, 10, 0, 0),
		Aliases:             []string{},
		Koc:                 ssg(363, "L/kg"),
		Solubility:          ssg(169, "mg/L"),
		HalfLife:            howard(6, 228, noteAerobic),
		DrinkingWaterLimits: []DrinkingWaterLimit{mcl(0.7), who(0.3, "guideline value", "")},
	},
	{
		Name: "xylenes", Title: "Xylenes (total)", CAS: "1330-20-7",
		MolarMass: molar("C8H10", 8, 10, 0, 0),
		Aliases:   []string{"xylene", "xylenes (total)", "total xylenes", "xylenes, total"},
		// Mean of the o-, m- and p-xylene entries of the same table
		// (363, 407, 389 L/kg; 178, 161, 185 mg/L), rounded.
		Koc:        SourcedValue{Value: 386, Unit: "L/kg", Source: srcSSG + "; mean of the o-, m- and p-xylene values", FromMemory: true},
		Solubility: SourcedValue{Value: 175, Unit: "mg/L", Source: srcSSG + "; mean of the o-, m- and p-xylene values", FromMemory: true},
		HalfLife:   howard(14, 365, "range of o-xylene, the slowest of the three isomers; "+noteAerobic),
		DrinkingWaterLimits: []DrinkingWaterLimit{
			mcl(10),
			who(0.5, "guideline value", "sum of the three isomers"),
		},
	},
	{
		Name: "mtbe", Title: "Methyl tert-butyl ether (MTBE)", CAS: "1634-04-4",
		MolarMass: molar("C5H12O", 5, 12, 1, 0),
		Aliases:   []string{"methyl tert-butyl ether", "methyl tertiary butyl ether", "methyl tert butyl ether", "tert-butyl methyl ether"},
		Koc: SourcedValue{Value: 11, Unit: "L/kg",
			Source:     "US EPA (1997) Drinking Water Advisory: Consumer Acceptability Advice and Health Effects Analysis on Methyl Tertiary-Butyl Ether (MTBE), EPA-822-F-97-009 (log Koc about 1.05)",
			FromMemory: true},
		Solubility: SourcedValue{Value: 51000, Unit: "mg/L",
			Source:     "US EPA (1997) Drinking Water Advisory on MTBE, EPA-822-F-97-009 (reported range about 36,000-51,000 mg/L)",
			FromMemory: true},
		HalfLife: howard(56, 360, "slow or no biodegradation is common under anaerobic conditions; "+noteAerobic),
		DrinkingWaterLimits: []DrinkingWaterLimit{{
			Authority: "US EPA", Kind: "advisory", Value: 0.02, Unit: "mg/L",
			Regulation: "US EPA (1997) Drinking Water Advisory on MTBE, EPA-822-F-97-009 (no MCL under 40 CFR 141)",
			FromMemory: true,
			Note:       "low end of the 20-40 ug/L taste and odour advisory; not enforceable. WHO sets no guideline value (taste and odour thresholds lie below health-based values).",
		}},
	},
	{
		Name: "tce", Title: "Trichloroethene (TCE)", CAS: "79-01-6",
		MolarMass:  molar("C2HCl3", 2, 1, 0, 3),
		Aliases:    []string{"trichloroethene", "trichloroethylene"},
		Koc:        ssg(166, "L/kg"),
		Solubility: ssg(1100, "mg/L"),
		HalfLife:   howard(321, 1653, "anaerobic reductive dechlorination; little aerobic degradation"),
		DrinkingWaterLimits: []DrinkingWaterLimit{
			mcl(0.005),
			who(0.02, "provisional guideline value", ""),
		},
	},
	{
		Name: "pce", Title: "Tetrachloroethene (PCE)", CAS: "127-18-4",
		MolarMass:  molar("C2Cl4", 2, 0, 0, 4),
		Aliases:    []string{"tetrachloroethene", "tetrachloroethylene", "perchloroethylene", "perc"},
		Koc:        ssg(155, "L/kg"),
		Solubility: ssg(200, "mg/L"),
		HalfLife:   howard(365, 730, "anaerobic reductive dechlorination; little aerobic degradation"),
		DrinkingWaterLimits: []DrinkingWaterLimit{
			mcl(0.005),
			who(0.1, "guideline value", "the 3rd edition gave 0.04 mg/L"),
		},
	},
	{
		Name: "cis-1,2-dce", Title: "cis-1,2-Dichloroethene (cis-1,2-DCE)", CAS: "156-59-2",
		MolarMass:  molar("C2H2Cl2", 2, 2, 0, 2),
		Aliases:    []string{"cis-1,2-dichloroethene", "cis-1,2-dichloroethylene", "cis-dce", "cis 1,2-dce"},
		Koc:        ssg(35.5, "L/kg"),
		Solubility: ssg(3500, "mg/L"),
		HalfLife:   howard(56, 2875, "anaerobic reductive dechlorination"),
		DrinkingWaterLimits: []DrinkingWaterLimit{
			mcl(0.07),
			who(0.05, "guideline value", "1,2-dichloroethene, cis and trans isomers together"),
		},
	},
	{
		Name: "vinyl chloride", Title: "Vinyl chloride (chloroethene)", CAS: "75-01-4",
		MolarMass:  molar("C2H3Cl", 2, 3, 0, 1),
		Aliases:    []string{"vinyl_chloride", "vinyl-chloride", "vc", "chloroethene", "chloroethylene"},
		Koc:        ssg(18.6, "L/kg"),
		Solubility: ssg(2760, "mg/L"),
		HalfLife:   howard(56, 2875, "aerobic oxidation is fast; anaerobic reductive dechlorination slow"),
		DrinkingWaterLimits: []DrinkingWaterLimit{
			mcl(0.002),
			who(0.0003, "guideline value", ""),
		},
	},
}

// compoundIndex maps every normalized name and alias to its table index.
var compoundIndex = func() map[string]int {
	m := make(map[string]int)
	for i, c := range compounds {
		m[normalizeCompoundName(c.Name)] = i
		m[normalizeCompoundName(c.Title)] = i
		for _, a := range c.Aliases {
			m[normalizeCompoundName(a)] = i
		}
	}
	return m
}()

// normalizeCompoundName lower-cases and collapses white space.
func normalizeCompoundName(s string) string {
	return strings.Join(strings.Fields(strings.ToLower(s)), " ")
}

// LookupContaminant finds a compound of the reference table by its name, its
// title or an alias, ignoring case and repeated white space. The returned
// value is a copy; changing it does not change the table.
func LookupContaminant(name string) (Compound, bool) {
	i, ok := compoundIndex[normalizeCompoundName(name)]
	if !ok {
		return Compound{}, false
	}
	return compounds[i].clone(), true
}

// Contaminants returns a copy of the whole reference table in a stable order.
func Contaminants() []Compound {
	out := make([]Compound, len(compounds))
	for i, c := range compounds {
		out[i] = c.clone()
	}
	return out
}

func (c Compound) clone() Compound {
	c.Aliases = slices.Clone(c.Aliases)
	c.DrinkingWaterLimits = slices.Clone(c.DrinkingWaterLimits)
	return c
}

// ScreeningLevel returns the lowest drinking-water limit of the table entry,
// mg/L (the conservative default screening level), and false when the entry
// has none.
func (c Compound) ScreeningLevel() (DrinkingWaterLimit, bool) {
	best := -1
	for i, l := range c.DrinkingWaterLimits {
		if best < 0 || l.Value < c.DrinkingWaterLimits[best].Value {
			best = i
		}
	}
	if best < 0 {
		return DrinkingWaterLimit{}, false
	}
	return c.DrinkingWaterLimits[best], true
}

// ConservativeHalfLife returns the long end of the half-life range, days:
// the slowest decay of the range, which gives the longest plume.
func (c Compound) ConservativeHalfLife() float64 { return c.HalfLife.High }

// SuggestContaminant returns the table's name of the entry whose name,
// title or alias is closest to name by edit distance (Levenshtein, on the
// normalised names), when it is close enough to be a likely misspelling:
// at most 2 edits, and at most a quarter of the name's length (our
// choice). ok is false for an exact match or nothing close.
func SuggestContaminant(name string) (suggestion string, ok bool) {
	n := normalizeCompoundName(name)
	if n == "" {
		return "", false
	}
	if _, exact := compoundIndex[n]; exact {
		return "", false
	}
	best, bestD := -1, 1<<30
	keys := make([]string, 0, len(compoundIndex))
	for k := range compoundIndex {
		keys = append(keys, k)
	}
	sort.Strings(keys) // ties go to the alphabetically first, whatever the map order
	for _, k := range keys {
		if d := levenshtein.ComputeDistance(n, k); d < bestD {
			best, bestD = compoundIndex[k], d
		}
	}
	limit := min(2, max(1, len([]rune(n))/4))
	if best < 0 || bestD > limit {
		return "", false
	}
	return compounds[best].Name, true
}
