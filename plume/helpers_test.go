package plume

import "encoding/json"

// f is a test shorthand for a *float64.
func f(v float64) *float64 { return &v }

// demoScenario is invented test data (the example of DESIGN.md section 4):
// benzene from a tank, a well about 210 m downgradient.
func demoScenario() Scenario {
	return Scenario{
		Units: Units{Length: "m", Time: "d", Concentration: "mg/L"},
		Aquifer: Aquifer{
			HydraulicConductivity: f(8.6), HydraulicGradient: f(0.004), EffectivePorosity: f(0.28),
			BulkDensity: f(1.75), OrganicCarbonFraction: f(0.001),
			Dispersivity: &Dispersivity{Longitudinal: f(10), Transverse: f(1), Vertical: f(0.1)},
		},
		Contaminant: Contaminant{Name: "benzene", Koc: f(60), HalfLife: f(720), ScreeningLevel: f(0.005)},
		Source:      Source{X: f(0), Y: f(0), FlowAzimuthDeg: f(90), Concentration: f(12), Width: f(15), Depth: f(3), Start: f(0)},
		Receptors: []Receptor{
			{ID: "W-4", X: f(210), Y: f(6), Z: f(2)},
			{ID: "MW-1", X: f(60), Y: f(-3), ScreenTop: f(1), ScreenBottom: f(5)},
		},
		Times:   []float64{365, 1825, 3650},
		Methods: []string{"exact", "domenico"},
	}
}

func mustJSON(v any) string {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		panic(err)
	}
	return string(b)
}
