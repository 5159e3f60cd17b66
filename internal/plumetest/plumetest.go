// Package plumetest holds the invented test scenarios shared by the tests
// of plume and its capability packages, as JSON so that it imports nothing
// of the project (plume's own tests decode it too, without an import cycle).
package plumetest

// DemoJSON is invented test data (the example of DESIGN.md section 4):
// benzene from a tank, a well about 210 m downgradient and a screened
// monitoring well.
const DemoJSON = `{
  "units": {"length": "m", "time": "d", "concentration": "mg/L"},
  "aquifer": {"hydraulic_conductivity": 8.6, "hydraulic_gradient": 0.004, "effective_porosity": 0.28,
              "bulk_density": 1.75, "organic_carbon_fraction": 0.001,
              "dispersivity": {"longitudinal": 10, "transverse": 1, "vertical": 0.1}},
  "contaminant": {"name": "benzene", "koc": 60, "half_life": 720, "screening_level": 0.005},
  "source": {"x": 0, "y": 0, "flow_azimuth_deg": 90, "concentration": 12, "width": 15, "depth": 3, "start": 0},
  "receptors": [{"id": "W-4", "x": 210, "y": 6, "z": 2},
                {"id": "MW-1", "x": 60, "y": -3, "screen_top": 1, "screen_bottom": 5}],
  "times": [365, 1825, 3650],
  "methods": ["exact", "domenico"]
}`

// BenchReceptor returns receptor i (0..9) of the benchmark layout: ten
// receptors 20 m to 290 m downgradient, near the axis, at increasing depth
// (invented), as (x, y, z) in metres.
func BenchReceptor(i int) (x, y, z float64) {
	return 20 + 30*float64(i), float64(i%4) - 1.5, 1 + 0.3*float64(i)
}

// BenchTimes are the ten benchmark times, 1 to 10 years in days.
func BenchTimes() []float64 {
	ts := make([]float64, 10)
	for i := range ts {
		ts[i] = 365 * float64(i+1)
	}
	return ts
}

// F is a shorthand for a *float64.
func F(v float64) *float64 { return &v }
