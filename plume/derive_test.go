package plume

import (
	"math"
	"testing"
)

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

func TestDerivedFormulas(t *testing.T) {
	tests := []struct {
		name      string
		got, want float64
	}{
		// Darcy's law for the average linear velocity v = K i / n_e
		// (Freeze & Cherry 1979, Groundwater, eq. 2.82); hand calculation
		// 8.6 * 0.004 / 0.28 = 0.122857142857... (mpmath, 30 digits).
		{"darcy", SeepageVelocity(8.6, 0.004, 0.28), 0.122857142857142857142857142857},
		// R = 1 + (rho_b / n) Kd (Freeze & Cherry 1979, eq. 9.14) with
		// Kd = Koc foc (Karickhoff et al. 1979): 1 + 1.75*60*0.001/0.28 = 1.375.
		{"retardation", Retardation(1.75, 60, 0.001, 0.28), 1.375},
		// No organic carbon: no sorption.
		{"retardation foc 0", Retardation(1.6, 500, 0, 0.3), 1},
		// Decay rate ln 2 / half-life: ln 2 / 720 = 9.627044174443685e-4.
		{"decay rate", DecayRate(720), math.Ln2 / 720},
		// Xu & Eckstein (1995), Ground Water 33(6): alpha_L = 0.83 (log10 L)^2.414;
		// values from mpmath at 30 digits: 0.83*power(log10(L), 2.414).
		{"xu eckstein 100 m", LongitudinalDispersivity(100), 4.42348441930551206717609724764},
		{"xu eckstein 1000 m", LongitudinalDispersivity(1000), 11.7719606378186534764461191633},
		{"xu eckstein 250 m", LongitudinalDispersivity(250), 6.85500509381760496876965741847},
		{"xu eckstein 10 m", LongitudinalDispersivity(10), 0.83},
		// Below MinTravelDistance (2 m) the relation is evaluated at 2 m.
		{"xu eckstein floor", LongitudinalDispersivity(0.5), 0.045755371180277023144896710624},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if e := relErr(tc.got, tc.want); e > 1e-14 {
				t.Errorf("got %.17g, want %.17g (rel err %.2g)", tc.got, tc.want, e)
			}
		})
	}
}

func TestDeriveModel(t *testing.T) {
	base := func() Scenario { return toCanonical(demoScenario()) }
	tests := []struct {
		name  string
		edit  func(*Scenario)
		maxX  float64
		check func(t *testing.T, m *model)
	}{
		{"darcy and sorption", nil, 210, func(t *testing.T, m *model) {
			if relErr(m.v, 8.6*0.004/0.28) > 1e-15 || relErr(m.r, 1.375) > 1e-15 {
				t.Errorf("v=%g R=%g", m.v, m.r)
			}
			if m.derived.SeepageVelocitySource != OriginDarcy || m.derived.RetardationSource != OriginSorption {
				t.Errorf("sources %q %q", m.derived.SeepageVelocitySource, m.derived.RetardationSource)
			}
			// D_i = alpha_i v + D_e (DESIGN.md section 3), D_e = 0 here.
			if relErr(m.disp[0], 10*m.v) > 1e-15 || relErr(m.disp[1], 1*m.v) > 1e-15 || relErr(m.disp[2], 0.1*m.v) > 1e-15 {
				t.Errorf("disp %v", m.disp)
			}
		}},
		{"given velocity and retardation win", func(s *Scenario) {
			s.Aquifer.SeepageVelocity = f(0.3)
			s.Contaminant.Retardation = f(2.5)
		}, 210, func(t *testing.T, m *model) {
			if m.v != 0.3 || m.r != 2.5 || m.derived.SeepageVelocitySource != OriginGiven || m.derived.RetardationSource != OriginGiven {
				t.Errorf("v=%g R=%g", m.v, m.r)
			}
		}},
		{"decay total", nil, 210, func(t *testing.T, m *model) {
			if m.mu != math.Ln2/720 || m.derived.DecayAppliesTo != DecayTotal {
				t.Errorf("mu=%g %q", m.mu, m.derived.DecayAppliesTo)
			}
		}},
		{"decay dissolved divides by R", func(s *Scenario) { s.Contaminant.DecayAppliesTo = DecayDissolved }, 210, func(t *testing.T, m *model) {
			if relErr(m.mu, math.Ln2/720/1.375) > 1e-15 || m.lambda != math.Ln2/720 {
				t.Errorf("mu=%g lambda=%g", m.mu, m.lambda)
			}
		}},
		{"no decay", func(s *Scenario) { s.Contaminant.HalfLife = nil }, 210, func(t *testing.T, m *model) {
			if m.mu != 0 || m.derived.HalfLife != nil {
				t.Errorf("mu=%g", m.mu)
			}
		}},
		{"estimated dispersivity", func(s *Scenario) { s.Aquifer.Dispersivity = nil; s.Aquifer.DispersivityScale = f(100) }, 100, func(t *testing.T, m *model) {
			want := 4.42348441930551206717609724764 // Xu & Eckstein (1995) at 100 m, mpmath
			if relErr(m.alpha[0], want) > 1e-14 || relErr(m.alpha[1], want/10) > 1e-14 || relErr(m.alpha[2], want/100) > 1e-14 {
				t.Errorf("alpha %v", m.alpha)
			}
			if !m.derived.DispersivityEstimated || m.derived.DispersivityRelation == "" || len(m.derived.Estimated) != 3 {
				t.Errorf("derived %+v", m.derived)
			}
		}},
		{"partial dispersivity", func(s *Scenario) { s.Aquifer.Dispersivity = &Dispersivity{Longitudinal: f(5)} }, 100, func(t *testing.T, m *model) {
			if m.alpha != [3]float64{5, 0.5, 0.05} || m.travel != nil || len(m.derived.Estimated) != 2 {
				t.Errorf("alpha %v estimated %v", m.alpha, m.derived.Estimated)
			}
		}},
		{"koc and screening level from the table", func(s *Scenario) {
			s.Contaminant.Koc = nil
			s.Contaminant.ScreeningLevel = nil
			s.Contaminant.HalfLife = nil
			s.Contaminant.UseTableHalfLife = true
		}, 210, func(t *testing.T, m *model) {
			ref, _ := LookupContaminant("benzene")
			lvl, _ := ref.ScreeningLevel()
			if *m.derived.Koc != ref.Koc.Value || *m.screening != lvl.Value || relErr(m.lambda, math.Ln2/ref.HalfLife.High) > 1e-15 {
				t.Errorf("koc %g level %g lambda %g", *m.derived.Koc, *m.screening, m.lambda)
			}
			want := []string{"contaminant.koc", "contaminant.half_life", "contaminant.screening_level", "contaminant.solubility"}
			if len(m.derived.FromReferenceTable) != len(want) {
				t.Fatalf("from table %v", m.derived.FromReferenceTable)
			}
			for i := range want {
				if m.derived.FromReferenceTable[i] != want[i] {
					t.Errorf("from table %v, want %v", m.derived.FromReferenceTable, want)
				}
			}
		}},
		{"unknown compound uses given values only", func(s *Scenario) { s.Contaminant.Name = "invented-compound-x" }, 210, func(t *testing.T, m *model) {
			if len(m.derived.FromReferenceTable) != 0 || m.solubility != nil {
				t.Errorf("from table %v", m.derived.FromReferenceTable)
			}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := base()
			if tc.edit != nil {
				tc.edit(&s)
			}
			if err := Validate(s); err != nil {
				t.Fatal(err)
			}
			tc.check(t, derive(s))
		})
	}
}
