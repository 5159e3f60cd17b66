package plume

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// dryCleaner is the invented demo of testdata/demo/dry-cleaner.json.
func dryCleaner(t testing.TB) Scenario { return demoFile(t, "dry-cleaner.json") }

// chainScenario is the demo scenario with contaminants in place of its
// contaminant: an invented chain of three compounds with one retardation
// factor, so that every closed form applies.
func chainScenario() Scenario {
	sc := demoScenario()
	sc.Contaminant = Contaminant{}
	sc.Source.Concentration = nil
	sc.Contaminants = []Constituent{
		{Name: "PCE", SourceConcentration: f(10), Retardation: f(2), HalfLife: f(900), DecaysTo: "TCE"},
		{Name: "TCE", SourceConcentration: f(1), Retardation: f(2), HalfLife: f(600), DecaysTo: "vinyl chloride", Yield: f(0.4)},
		{Name: "vinyl chloride", SourceConcentration: f(0), Retardation: f(2), HalfLife: f(1500)},
	}
	return sc
}

func TestCompoundsBadInput(t *testing.T) {
	edit := func(e func(*Scenario)) Scenario {
		sc := chainScenario()
		e(&sc)
		return sc
	}
	many := chainScenario()
	for i := range 21 {
		many.Contaminants = append(many.Contaminants, Constituent{Name: fmt.Sprintf("solvent %d", i), SourceConcentration: f(1), Koc: f(10)})
	}
	many.Contaminants = many.Contaminants[:21]
	cases := []struct {
		name  string
		sc    Scenario
		field string
	}{
		{"decays_to names no compound", edit(func(s *Scenario) { s.Contaminants[1].DecaysTo = "cis-1,2-DCE" }), "contaminants[1].decays_to"},
		{"decays to itself", edit(func(s *Scenario) { s.Contaminants[1].DecaysTo = "trichloroethylene" }), "contaminants[1].decays_to"},
		{"cycle", edit(func(s *Scenario) { s.Contaminants[2].DecaysTo = "PCE"; s.Contaminants[2].Yield = f(1) }), "contaminants[0].decays_to"},
		{"negative yield", edit(func(s *Scenario) { s.Contaminants[1].Yield = f(-0.1) }), "contaminants[1].yield"},
		// TCE 131.39 -> VC 62.50 g/mol: the bound is 1.5 x 0.4757 = 0.7135.
		{"yield above 1.5 x molar-mass ratio", edit(func(s *Scenario) { s.Contaminants[1].Yield = f(0.72) }), "contaminants[1].yield"},
		{"yield without decays_to", edit(func(s *Scenario) { s.Contaminants[2].Yield = f(0.5) }), "contaminants[2].yield"},
		{"unknown molar masses and no yield", edit(func(s *Scenario) {
			s.Contaminants[2].Name = "solvent X"
			s.Contaminants[1].DecaysTo, s.Contaminants[1].Yield = "solvent X", nil
		}), "contaminants[1].yield"},
		{"contaminant and contaminants", edit(func(s *Scenario) { s.Contaminant = Contaminant{Name: "benzene"} }), "contaminants"},
		{"more than 20 compounds", many, "contaminants"},
		{"duplicate name (alias)", edit(func(s *Scenario) { s.Contaminants[1].Name = "tetrachloroethylene" }), "contaminants[1].name"},
		{"no source concentration", edit(func(s *Scenario) { s.Contaminants[2].SourceConcentration = nil }), "contaminants[2].source_concentration"},
		{"no compound released", edit(func(s *Scenario) {
			s.Contaminants[0].SourceConcentration, s.Contaminants[1].SourceConcentration = f(0), f(0)
		}), "contaminants"},
		{"source concentration besides contaminants", edit(func(s *Scenario) { s.Source.Concentration = f(1) }), "source.concentration"},
		{"several sources", edit(func(s *Scenario) {
			a := s.Source
			a.ID = "a"
			b := a
			b.ID, b.Y = "b", f(*a.Y+200)
			s.Source, s.Sources = Source{}, []Source{a, b}
		}), "contaminants"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Screen(context.Background(), tc.sc, Options{})
			if e, ok := AsError(err); !ok || e.Kind != KindInvalid {
				t.Fatalf("err %v, want a KindInvalid *Error", err)
			}
			var named []string
			for _, e := range FieldsOf(err) {
				named = append(named, e.Field)
				if e.Field == tc.field {
					return
				}
			}
			t.Errorf("err names %v, not %s", named, tc.field)
		})
	}
}

// A scenario of one compound gives the same values through contaminants
// as through contaminant.
func TestCompoundsOneEqualsContaminant(t *testing.T) {
	one := demoScenario()
	many := demoScenario()
	c := one.Contaminant
	many.Contaminant = Contaminant{}
	many.Contaminants = []Constituent{{Name: c.Name, SourceConcentration: one.Source.Concentration, Koc: c.Koc,
		HalfLife: c.HalfLife, Retardation: c.Retardation, ScreeningLevel: c.ScreeningLevel, DecayAppliesTo: c.DecayAppliesTo}}
	many.Source.Concentration = nil
	a, b := screenOK(t, one), screenOK(t, many)
	for i, ra := range a.Receptors {
		rb := b.Receptors[i].Compounds[0]
		for j, p := range ra.Series {
			if p.Exact == nil || rb.Series[j].Exact == nil || *p.Exact != *rb.Series[j].Exact {
				t.Errorf("%s time %g: exact %v through contaminants, %v through contaminant", ra.ID, p.Time, rb.Series[j].Exact, p.Exact)
			}
		}
		if !sameBool(ra.ExceedsScreeningLevel, b.Receptors[i].ExceedsScreeningLevel) {
			t.Errorf("%s: verdict %v, want %v", ra.ID, b.Receptors[i].ExceedsScreeningLevel, ra.ExceedsScreeningLevel)
		}
	}
}

func sameBool(a, b *bool) bool {
	return a == nil && b == nil || a != nil && b != nil && *a == *b
}

// With zero yields the compounds are independent (issue 13, limits): each
// equals its own single-compound screening.
func TestCompoundsZeroYieldIndependent(t *testing.T) {
	sc := chainScenario()
	sc.Contaminants[0].Yield, sc.Contaminants[1].Yield = f(0), f(0)
	sc.Methods = []string{MethodExact, MethodDomenico}
	res := screenOK(t, sc)
	if codes := res.CaveatCodes(""); !contains(codes, CaveatChainMethods) {
		t.Errorf("caveats %v lack %s (Domenico values of daughters)", codes, CaveatChainMethods)
	}
	for k, cst := range sc.Contaminants {
		one := demoScenario()
		one.Methods = sc.Methods
		one.Source.Concentration = cst.SourceConcentration
		one.Contaminant = Contaminant{Name: cst.Name, Retardation: cst.Retardation, HalfLife: cst.HalfLife}
		if *cst.SourceConcentration == 0 {
			one.Source.Concentration = f(1) // all zero through the chain; checked below
		}
		single := screenOK(t, one)
		for i, rr := range res.Receptors {
			for j, p := range rr.Compounds[k].Series {
				want := single.Receptors[i].Series[j]
				for _, m := range []string{MethodExact, MethodDomenico} {
					got, w := *MethodValue(m, p.Exact, p.Domenico, nil), *MethodValue(m, want.Exact, want.Domenico, nil)
					if *cst.SourceConcentration == 0 {
						w = 0
					}
					if math.Abs(got-w) > 1e-12*math.Max(math.Abs(w), 1e-12) {
						t.Errorf("%s %s %s t %g: %.15g in the chain, %.15g alone", rr.ID, cst.Name, m, p.Time, got, w)
					}
				}
			}
		}
	}
}

// A receptor's verdict over compounds: true if any compound exceeds, else
// null if any compound has no verdict, else false (issue 13).
func TestCompoundsAggregateVerdict(t *testing.T) {
	tr, fa := true, false
	cases := []struct {
		in   []*bool
		want *bool
	}{
		{[]*bool{&fa, &fa}, &fa},
		{[]*bool{&fa, nil}, nil},
		{[]*bool{nil, &tr}, &tr},
		{[]*bool{&fa, &tr, nil}, &tr},
		{[]*bool{nil}, nil},
	}
	for _, c := range cases {
		var cs []CompoundResult
		for _, v := range c.in {
			cs = append(cs, CompoundResult{ExceedsScreeningLevel: v})
		}
		if got := aggregateExceeds(cs); !sameBool(got, c.want) {
			t.Errorf("%v: %v, want %v", c.in, got, c.want)
		}
	}
	// End to end: a compound without a level (none given, not in the
	// table) makes a receptor's verdict null where no other exceeds.
	sc := chainScenario()
	sc.Contaminants[2] = Constituent{Name: "solvent X", SourceConcentration: f(0), Retardation: f(2), HalfLife: f(1500)}
	sc.Contaminants[1].DecaysTo, sc.Contaminants[1].Yield = "solvent X", f(0.5)
	sc.Contaminants[0].ScreeningLevel, sc.Contaminants[1].ScreeningLevel = f(1e6), f(1e6)
	res := screenOK(t, sc)
	for _, rr := range res.Receptors {
		if rr.Status == StatusModelled && rr.ExceedsScreeningLevel != nil {
			t.Errorf("%s: verdict %v with one compound not compared, want null", rr.ID, *rr.ExceedsScreeningLevel)
		}
	}
	found := false
	for _, c := range res.Caveats {
		found = found || c.Code == CaveatNoScreeningLevel && c.Compound == "solvent X"
	}
	if !found {
		t.Errorf("no %s caveat naming solvent X: %v", CaveatNoScreeningLevel, res.Caveats)
	}
}

// The demo's verdicts (testdata/demo/dry-cleaner.json, invented): the four
// compounds have distinct retardation factors, so the closed forms give
// only PCE (released at the source, no parent), and the numeric solution of
// the coupled equations decides for the daughters; vinyl chloride alone
// exceeds at the Orchard Lane well.
func TestDryCleanerVinylChlorideDecides(t *testing.T) {
	if testing.Short() {
		t.Skip("a 3D finite-volume run of four species")
	}
	// A tolerance of 0.01 % (the default is wider) so that the numeric
	// cross-check of PCE, the compound with a closed form, is compared and
	// its few-tenths-of-a-percent difference reported.
	res, err := Screen(context.Background(), dryCleaner(t), Options{NumericTolerance: 1e-4})
	if err != nil {
		t.Fatal(err)
	}
	var well *ReceptorResult
	for i := range res.Receptors {
		if res.Receptors[i].ID == "Orchard Lane well" {
			well = &res.Receptors[i]
		}
	}
	if well == nil || len(well.Compounds) != 4 {
		t.Fatalf("no Orchard Lane well with four compounds: %+v", well)
	}
	for _, c := range well.Compounds {
		exceeds := c.ExceedsScreeningLevel != nil && *c.ExceedsScreeningLevel
		if exceeds != (c.Name == "vinyl chloride") {
			t.Errorf("%s at the well: exceeds %v (peak %+v)", c.Name, c.ExceedsScreeningLevel, c.Peak)
		}
		if c.Name != "PCE" && (c.Series[0].Exact != nil || c.Peak == nil || c.Peak.Method != MethodNumeric) {
			t.Errorf("%s: exact %v, peak %+v; want null exact and a numeric peak", c.Name, c.Series[0].Exact, c.Peak)
		}
	}
	if well.ExceedsScreeningLevel == nil || !*well.ExceedsScreeningLevel {
		t.Errorf("well verdict %v, want true", well.ExceedsScreeningLevel)
	}
	// The daughters have no Domenico value either, so nothing is said
	// about a Domenico chain.
	codes := res.CaveatCodes("")
	if !contains(codes, CaveatClosedFormUnavailable) || contains(codes, CaveatChainMethods) {
		t.Errorf("caveats %v: want %s and not %s", codes, CaveatClosedFormUnavailable, CaveatChainMethods)
	}
	compared := false
	for _, c := range res.Caveats {
		if c.Code == CaveatNumericDisagreement {
			compared = true
			if c.Compound != "PCE" {
				t.Errorf("numeric disagreement reported for %q: only PCE has a closed form", c.Compound)
			}
		}
	}
	if !compared {
		t.Errorf("no %s caveat for PCE at a 0.01 %% tolerance", CaveatNumericDisagreement)
	}
	if res.Numeric == nil || res.Numeric.MassBalanceError > 1e-10 {
		t.Errorf("numeric report %+v: want the chain's budget closed to round-off", res.Numeric)
	}
}

func contains(xs []string, x string) bool {
	for _, y := range xs {
		if y == x {
			return true
		}
	}
	return false
}
