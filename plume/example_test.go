package plume_test

import (
	"context"
	"fmt"
	"math"

	"downgradient/plume"
)

func fp(v float64) *float64 { return &v }

// Screening an invented benzene release (invented data): a well 210 m
// downgradient at 2 m depth, in the default units (m, d, mg/L).
func ExampleScreen() {
	sc := plume.Scenario{
		Aquifer: plume.Aquifer{
			HydraulicConductivity: fp(8.6), HydraulicGradient: fp(0.004), EffectivePorosity: fp(0.28),
			BulkDensity: fp(1.75), OrganicCarbonFraction: fp(0.001),
			Dispersivity: &plume.Dispersivity{Longitudinal: fp(10), Transverse: fp(1), Vertical: fp(0.1)},
		},
		Contaminant: plume.Contaminant{Name: "benzene", Koc: fp(60), HalfLife: fp(720), ScreeningLevel: fp(0.005)},
		Source:      plume.Source{Concentration: fp(12), Width: fp(15), Depth: fp(3)},
		Receptors:   []plume.Receptor{{ID: "W-4", X: fp(210), Y: fp(6), Z: fp(2)}},
		Times:       []float64{3650},
		Methods:     []string{plume.MethodExact},
	}
	res, err := plume.Screen(context.Background(), sc, plume.Options{EngineVersion: "example"})
	if err != nil {
		fmt.Println(err)
		return
	}
	d, w := res.Derived, res.Receptors[0]
	fmt.Printf("v = %.4f m/d, R = %.3f\n", d.SeepageVelocity, d.Retardation)
	fmt.Printf("after 10 years: %.3f mg/L; steady state %.3f mg/L\n", *w.Series[0].Exact, *w.SteadyState.Exact)
	fmt.Printf("exceeds 0.005 mg/L: %v, first after %.0f days\n", *w.ExceedsScreeningLevel, *w.FirstExceedanceTime)
	fmt.Println(res.Caveats[0].Code)
	// Output:
	// v = 0.1229 m/d, R = 1.375
	// after 10 years: 0.175 mg/L; steady state 0.175 mg/L
	// exceeds 0.005 mg/L: true, first after 1057 days
	// screening_estimate_only
}

// Validation names every bad field by its JSON path.
func ExampleValidate() {
	sc := plume.Scenario{
		Aquifer:     plume.Aquifer{SeepageVelocity: fp(0.1), EffectivePorosity: fp(1.3)},
		Contaminant: plume.Contaminant{Retardation: fp(1)},
		Source:      plume.Source{Concentration: fp(-1)},
		Receptors:   []plume.Receptor{{Y: fp(0)}},
	}
	for _, e := range plume.FieldsOf(plume.Validate(sc)) {
		fmt.Printf("%s: %s\n", e.Field, e.Message)
	}
	// Output:
	// aquifer.effective_porosity: must be in (0, 1), got 1.3
	// source.concentration: must be > 0, got -1
	// receptors[0].x: required: site x (east) of the receptor (or lon and lat with a crs)
}

// Flow toward the north-east (azimuth 45): a point 10 m north-east of the
// source is 10 m downgradient on the plume axis.
func ExampleFrame_ToPlume() {
	fr := plume.Frame{X0: 100, Y0: 200, AzimuthDeg: 45}
	px, py := fr.ToPlume(100+7.0710678118654755, 200+7.0710678118654755)
	fmt.Printf("along flow %.6f m, across %.6f m\n", px, math.Abs(py))
	// Output: along flow 10.000000 m, across 0.000000 m
}

// Xu & Eckstein (1995): the longitudinal dispersivity estimated for a
// travel distance of 100 m.
func ExampleLongitudinalDispersivity() {
	fmt.Printf("%.3f m\n", plume.LongitudinalDispersivity(100))
	// Output: 4.423 m
}
