package plume

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// The maximum contaminant levels of US EPA National Primary Drinking Water
// Regulations, 40 CFR 141.61(a), table 1 ("Maximum Contaminant Levels for
// Volatile Organic Contaminants"), mg/L, with the CAS numbers the regulation
// lists; checked against the published text of the regulation.
func TestContaminantsMCLMatch40CFR14161(t *testing.T) {
	cases := []struct {
		name string
		cas  string
		mcl  float64
	}{
		{"benzene", "71-43-2", 0.005},
		{"toluene", "108-88-3", 1},
		{"ethylbenzene", "100-41-4", 0.7},
		{"xylenes", "1330-20-7", 10},
		{"tce", "79-01-6", 0.005},
		{"pce", "127-18-4", 0.005},
		{"cis-1,2-dce", "156-59-2", 0.07},
		{"vinyl chloride", "75-01-4", 0.002},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c, ok := LookupContaminant(tc.name)
			if !ok {
				t.Fatalf("%q not in the table", tc.name)
			}
			if c.CAS != tc.cas {
				t.Errorf("CAS = %q, 40 CFR 141.61(a) lists %q", c.CAS, tc.cas)
			}
			found := false
			for _, l := range c.DrinkingWaterLimits {
				if l.Authority == "US EPA" && l.Kind == "MCL" {
					found = true
					if l.Value != tc.mcl {
						t.Errorf("MCL = %g mg/L, 40 CFR 141.61(a) gives %g", l.Value, tc.mcl)
					}
					if !strings.Contains(l.Regulation, "40 CFR 141.61") {
						t.Errorf("MCL cites %q, want 40 CFR 141.61", l.Regulation)
					}
					if l.FromMemory {
						t.Errorf("MCL marked from memory but was checked against 40 CFR 141.61(a)")
					}
				}
			}
			if !found {
				t.Errorf("no US EPA MCL")
			}
		})
	}
}

// MTBE has no MCL in 40 CFR 141 (US EPA only issued a 1997 advisory); the
// table must not invent one.
func TestContaminantsMTBEHasNoMCL(t *testing.T) {
	c, ok := LookupContaminant("MTBE")
	if !ok {
		t.Fatal("MTBE not in the table")
	}
	for _, l := range c.DrinkingWaterLimits {
		if l.Kind == "MCL" {
			t.Errorf("MTBE has an MCL %g; 40 CFR 141.61 lists none", l.Value)
		}
	}
	if sl, ok := c.ScreeningLevel(); !ok || sl.Kind != "advisory" {
		t.Errorf("ScreeningLevel = %+v, %v; want the advisory", sl, ok)
	}
}

// Every entry is complete: positive finite values, units, a source for each
// value, limits citing either 40 CFR 141 or the WHO Guidelines.
func TestContaminantsComplete(t *testing.T) {
	required := []string{"benzene", "toluene", "ethylbenzene", "xylenes", "mtbe", "tce", "pce", "cis-1,2-dce", "vinyl chloride"}
	table := Contaminants()
	names := map[string]bool{}
	for _, c := range table {
		names[c.Name] = true
	}
	for _, r := range required {
		if !names[r] {
			t.Errorf("required compound %q missing", r)
		}
	}
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	for _, c := range table {
		t.Run(c.Name, func(t *testing.T) {
			if c.Name != strings.ToLower(c.Name) || c.Title == "" || c.CAS == "" {
				t.Errorf("bad identity %q %q %q", c.Name, c.Title, c.CAS)
			}
			for _, v := range []struct {
				what string
				sv   SourcedValue
				unit string
			}{{"koc", c.Koc, "L/kg"}, {"solubility", c.Solubility, "mg/L"}} {
				if !pos(v.sv.Value) || v.sv.Unit != v.unit || v.sv.Source == "" {
					t.Errorf("%s = %+v", v.what, v.sv)
				}
			}
			h := c.HalfLife
			if !pos(h.Low) || !pos(h.High) || h.Low > h.High || h.Unit != "d" || h.Source == "" {
				t.Errorf("half_life = %+v", h)
			}
			if c.ConservativeHalfLife() != h.High {
				t.Errorf("ConservativeHalfLife = %g, want the long end %g", c.ConservativeHalfLife(), h.High)
			}
			if len(c.DrinkingWaterLimits) == 0 {
				t.Errorf("no drinking-water limit")
			}
			for _, l := range c.DrinkingWaterLimits {
				if !pos(l.Value) || l.Unit != "mg/L" {
					t.Errorf("limit %+v", l)
				}
				if !strings.Contains(l.Regulation, "40 CFR 141") && !strings.Contains(l.Regulation, "Guidelines for Drinking-water Quality") &&
					!strings.Contains(l.Regulation, "Drinking Water Advisory") {
					t.Errorf("limit cites %q", l.Regulation)
				}
			}
			// The screening level is the lowest limit.
			sl, ok := c.ScreeningLevel()
			if !ok {
				t.Fatal("no screening level")
			}
			for _, l := range c.DrinkingWaterLimits {
				if l.Value < sl.Value {
					t.Errorf("screening level %g is not the lowest (%g)", sl.Value, l.Value)
				}
			}
			// Sorption order of magnitude: every Koc here lies between 1 and
			// 10^4 L/kg for these light organics (common practice).
			if c.Koc.Value < 1 || c.Koc.Value > 1e4 {
				t.Errorf("Koc %g L/kg implausible", c.Koc.Value)
			}
		})
	}
}

func TestLookupContaminantNames(t *testing.T) {
	cases := []struct {
		in   string
		want string
		ok   bool
	}{
		{"benzene", "benzene", true},
		{"  Benzene ", "benzene", true},
		{"TCE", "tce", true},
		{"Trichloroethylene", "tce", true},
		{"trichloroethene", "tce", true},
		{"PCE", "pce", true},
		{"perchloroethylene", "pce", true},
		{"Vinyl  Chloride", "vinyl chloride", true},
		{"vinyl_chloride", "vinyl chloride", true},
		{"Xylenes (total)", "xylenes", true},
		{"xylene", "xylenes", true},
		{"cis-1,2-DCE", "cis-1,2-dce", true},
		{"cis-1,2-dichloroethylene", "cis-1,2-dce", true},
		{"methyl tert-butyl ether", "mtbe", true},
		{"unobtainium", "", false},
		{"", "", false},
	}
	for _, tc := range cases {
		c, ok := LookupContaminant(tc.in)
		if ok != tc.ok || c.Name != tc.want {
			t.Errorf("LookupContaminant(%q) = %q, %v; want %q, %v", tc.in, c.Name, ok, tc.want, tc.ok)
		}
	}
}

// The table hands out copies.
func TestContaminantsAreCopies(t *testing.T) {
	a := Contaminants()
	a[0].DrinkingWaterLimits[0].Value = 99
	a[0].Aliases = append(a[0].Aliases, "changed")
	b, _ := LookupContaminant(a[0].Name)
	if b.DrinkingWaterLimits[0].Value == 99 {
		t.Error("Contaminants returned the table's own slice")
	}
}

func ExampleLookupContaminant() {
	c, _ := LookupContaminant("Benzene")
	sl, _ := c.ScreeningLevel()
	fmt.Printf("%s: Koc %g %s, screening level %g %s (%s %s)\n", c.Title, c.Koc.Value, c.Koc.Unit, sl.Value, sl.Unit, sl.Authority, sl.Kind)
	// Output: Benzene: Koc 59 L/kg, screening level 0.005 mg/L (US EPA MCL)
}
