package numeric_test

import (
	"context"
	"fmt"
	"math"

	"downgradient/numeric"
)

// Two release areas on one site (invented values): a tank farm 15 m wide
// and 3 m deep at the origin of the plume frame, held at the reference
// concentration, and a smaller spill 40 m downgradient and 12 m to the
// left of the plume axis at half of it whose dissolvable mass drains with
// the power-law source function (exponent 1, depletion rate 5e-4 per
// day); a well 150 m downgradient, screened 0 to 3 m, after 10 years and
// at steady state, and the advective discharge through the whole plane
// 100 m downgradient (times the effective porosity and the reference
// concentration, a mass rate). At steady state only the tank farm remains,
// and with no decay its discharge is V W Z = 4.5 m3/d. (On the default
// grid: 0.151 and 0.144; 4.63 and 4.50.)
func ExampleScreen3D_sources() {
	inf := math.Inf(1)
	p := numeric.Problem3D{
		V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1, // m/d, m^2/d
		Sources: []numeric.SourceFace{
			{X: 0, Y: 0, Width: 15, Depth: 3, Strength: 1},
			{X: 40, Y: 12, Width: 6, Depth: 2, Strength: 0.5, History: numeric.History{Rate: 5e-4, Exponent: 1}},
		},
		Receptors: []numeric.Receptor{{X: 150, Y: 3, Top: 0, Bottom: 3}},
		Transects: []numeric.Transect{{X: 100, YMin: -inf, YMax: inf, Top: 0, Bottom: inf}},
		Times:     []float64{3650, inf}, // d
		Refine:    0.5,                  // a grid twice as coarse as the default, enough here
	}
	res, err := numeric.Screen3D(context.Background(), p)
	if err != nil {
		fmt.Println(err)
		return
	}
	for k, t := range p.Times {
		fmt.Printf("t = %v d: C/Cref = %.3f, V x integral of C/Cref over the plane = %.2f m3/d\n", t, res.C[0][k], res.Discharge[0][k])
	}
	fmt.Printf("whole width: %v, mass budget closes to 1e-10: %v\n", res.Grid.FullWidth, res.Budget.ClosureError <= 1e-10)
	// Output:
	// t = 3650 d: C/Cref = 0.152, V x integral of C/Cref over the plane = 4.62 m3/d
	// t = +Inf d: C/Cref = 0.146, V x integral of C/Cref over the plane = 4.49 m3/d
	// whole width: true, mass budget closes to 1e-10: true
}
