package plume

import (
	"math"
	"slices"
	"testing"
)

func TestValidateAcceptsDemo(t *testing.T) {
	if err := Validate(demoScenario()); err != nil {
		t.Fatal(err)
	}
}

func TestValidateNamesFields(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name   string
		edit   func(*Scenario)
		fields []string // every field that must be named, in order
	}{
		{"porosity 0", func(s *Scenario) { s.Aquifer.EffectivePorosity = f(0) }, []string{"aquifer.effective_porosity"}},
		{"porosity 1", func(s *Scenario) { s.Aquifer.EffectivePorosity = f(1) }, []string{"aquifer.effective_porosity"}},
		{"negative conductivity", func(s *Scenario) { s.Aquifer.HydraulicConductivity = f(-1) }, []string{"aquifer.hydraulic_conductivity"}},
		{"zero velocity", func(s *Scenario) { s.Aquifer.SeepageVelocity = f(0) }, []string{"aquifer.seepage_velocity"}},
		{"NaN gradient", func(s *Scenario) { s.Aquifer.HydraulicGradient = f(nan) }, []string{"aquifer.hydraulic_gradient"}},
		{"Inf bulk density", func(s *Scenario) { s.Aquifer.BulkDensity = f(inf) }, []string{"aquifer.bulk_density"}},
		{"foc above 1", func(s *Scenario) { s.Aquifer.OrganicCarbonFraction = f(1.5) }, []string{"aquifer.organic_carbon_fraction"}},
		{"dispersivities", func(s *Scenario) {
			s.Aquifer.Dispersivity = &Dispersivity{Longitudinal: f(0), Transverse: f(-1), Vertical: f(nan)}
		}, []string{"aquifer.dispersivity.longitudinal", "aquifer.dispersivity.transverse", "aquifer.dispersivity.vertical"}},
		{"negative diffusion", func(s *Scenario) { s.Aquifer.EffectiveDiffusion = f(-1e-5) }, []string{"aquifer.effective_diffusion"}},
		{"velocity underdetermined", func(s *Scenario) {
			s.Aquifer.HydraulicConductivity, s.Aquifer.HydraulicGradient = nil, nil
		}, []string{"aquifer.hydraulic_conductivity", "aquifer.hydraulic_gradient"}},
		{"velocity given, K and i not needed", func(s *Scenario) {
			s.Aquifer.HydraulicConductivity, s.Aquifer.HydraulicGradient = nil, nil
			s.Aquifer.SeepageVelocity = f(0.1)
		}, nil},
		{"retardation underdetermined", func(s *Scenario) {
			s.Contaminant.Name, s.Contaminant.Koc = "", nil
			s.Aquifer.BulkDensity, s.Aquifer.OrganicCarbonFraction = nil, nil
		}, []string{"contaminant.koc", "aquifer.organic_carbon_fraction", "aquifer.bulk_density"}},
		{"koc from the table", func(s *Scenario) { s.Contaminant.Koc = nil }, nil},
		{"retardation given", func(s *Scenario) {
			s.Contaminant.Name, s.Contaminant.Koc = "", nil
			s.Aquifer.BulkDensity, s.Aquifer.OrganicCarbonFraction = nil, nil
			s.Contaminant.Retardation = f(1.2)
		}, nil},
		{"retardation below 1", func(s *Scenario) { s.Contaminant.Retardation = f(0.5) }, []string{"contaminant.retardation"}},
		{"half-life zero", func(s *Scenario) { s.Contaminant.HalfLife = f(0) }, []string{"contaminant.half_life"}},
		{"half-life null is no decay", func(s *Scenario) { s.Contaminant.HalfLife = nil }, nil},
		{"screening level negative", func(s *Scenario) { s.Contaminant.ScreeningLevel = f(-0.005) }, []string{"contaminant.screening_level"}},
		{"decay convention", func(s *Scenario) { s.Contaminant.DecayAppliesTo = "sorbed" }, []string{"contaminant.decay_applies_to"}},
		{"units", func(s *Scenario) { s.Units = Units{Length: "km", Time: "s", Concentration: "ppm"} },
			[]string{"units.length", "units.time", "units.concentration"}},
		{"no source strength", func(s *Scenario) { s.Source.Concentration = nil }, []string{"source.concentration"}},
		{"mass with concentration: a source depleting by its mass", func(s *Scenario) { s.Source.Mass = f(10) }, nil},
		{"width without depth", func(s *Scenario) { s.Source.Depth = nil }, []string{"source.depth"}},
		{"flux inlet on a 3D source", func(s *Scenario) { s.Source.Inlet = InletFlux }, []string{"source.inlet"}},
		{"flux inlet on a column", func(s *Scenario) { s.Source.Inlet, s.Source.Width, s.Source.Depth = InletFlux, nil, nil }, nil},
		{"unknown inlet", func(s *Scenario) { s.Source.Inlet = "pulse"; s.Source.Width, s.Source.Depth = nil, nil }, []string{"source.inlet"}},
		{"source times", func(s *Scenario) {
			s.Source.Start, s.Source.Duration, s.Source.HalfLife = f(-1), f(0), f(inf)
		}, []string{"source.start", "source.duration", "source.half_life"}},
		{"NaN azimuth", func(s *Scenario) { s.Source.FlowAzimuthDeg = f(nan) }, []string{"source.flow_azimuth_deg"}},
		{"mass with duration", func(s *Scenario) {
			s.Source.Concentration, s.Source.Mass, s.Source.Duration = nil, f(5), f(10)
		}, []string{"source.duration"}},
		{"no receptors", func(s *Scenario) { s.Receptors = nil }, []string{"receptors"}},
		{"receptor fields", func(s *Scenario) {
			s.Receptors = append(s.Receptors, Receptor{ID: "W-4", Z: f(-1)}, Receptor{X: f(1), Y: f(inf), ScreenTop: f(5), ScreenBottom: f(2)})
		}, []string{"receptors[2].x", "receptors[2].y", "receptors[2].z", "receptors[2].id", "receptors[3].y", "receptors[3].screen_bottom"}},
		{"screen half given", func(s *Scenario) { s.Receptors[0].ScreenTop = f(1) }, []string{"receptors[0].screen_bottom"}},
		{"times", func(s *Scenario) { s.Times = []float64{1, -1, nan, inf} }, []string{"times[1]", "times[2]", "times[3]"}},
		{"methods", func(s *Scenario) { s.Methods = []string{"exact", "Exact", "monte carlo"} }, []string{"methods[1]", "methods[2]"}},
		{"many at once", func(s *Scenario) {
			s.Aquifer.EffectivePorosity = f(2)
			s.Contaminant.HalfLife = f(-3)
			s.Receptors[1].X = nil
			s.Times[0] = -5
		}, []string{"aquifer.effective_porosity", "contaminant.half_life", "receptors[1].x", "times[0]"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := demoScenario()
			tc.edit(&s)
			err := Validate(s)
			if len(tc.fields) == 0 {
				if err != nil {
					t.Fatalf("unexpected error: %v", err)
				}
				return
			}
			fe := FieldsOf(err)
			if e, ok := AsError(err); !ok || e.Kind != KindInvalid || len(fe) == 0 {
				t.Fatalf("want FieldErrors, got %v", err)
			}
			var got []string
			for _, e := range fe {
				got = append(got, e.Field)
				if e.Message == "" {
					t.Errorf("%s: empty message", e.Field)
				}
			}
			if !slices.Equal(got, tc.fields) {
				t.Errorf("fields %v, want %v\n%v", got, tc.fields, err)
			}
		})
	}
}

func TestFieldErrorsMessage(t *testing.T) {
	s := demoScenario()
	s.Aquifer.EffectivePorosity = f(1.2)
	err := Validate(s)
	want := "invalid scenario: aquifer.effective_porosity: must be in (0, 1), got 1.2"
	if err == nil || err.Error() != want {
		t.Errorf("got %v, want %s", err, want)
	}
}
