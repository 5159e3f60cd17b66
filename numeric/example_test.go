package numeric_test

import (
	"context"
	"fmt"
	"math"

	"downgradient/numeric"
)

// A source 15 m wide and 3 m deep in an aquifer with seepage velocity
// 0.1 m/d and dispersivities 10, 1 and 0.1 m (invented values); the
// concentration relative to the source at a well 100 m downgradient on the
// plume axis, screened from 0 to 3 m, after 5 and 10 years and at steady
// state. (The exact solution, analytic.Exact3DAt, gives 0.208, 0.213, 0.213.)
func ExampleScreen3D() {
	p := numeric.Problem3D{
		V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1, // m/d, m^2/d
		Width: 15, Depth: 3, // m
		Receptors: []numeric.Receptor{{X: 100, Y: 0, Top: 0, Bottom: 3}},
		Times:     []float64{1825, 3650, math.Inf(1)}, // d
	}
	res, err := numeric.Screen3D(context.Background(), p)
	if err != nil {
		fmt.Println(err)
		return
	}
	for k, t := range p.Times {
		fmt.Printf("t = %v d: C/C0 = %.2f\n", t, res.C[0][k])
	}
	fmt.Printf("mass budget closes to 1e-10: %v\n", res.Budget.ClosureError <= 1e-10)
	// Output:
	// t = 1825 d: C/C0 = 0.21
	// t = 3650 d: C/C0 = 0.21
	// t = +Inf d: C/C0 = 0.21
	// mass budget closes to 1e-10: true
}

// A column 1 m/d, dispersion 0.5 m^2/d, retardation 2, with a first-type
// inlet: the concentration 10 m from the inlet after 20 days (Ogata-Banks:
// 0.562).
func ExampleScreen1D() {
	p := numeric.Problem1D{V: 1, Dx: 0.5, R: 2, Receptors: []float64{10}, Times: []float64{20}}
	res, err := numeric.Screen1D(context.Background(), p)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("C/C0 = %.3f on %d cells\n", res.C[0][0], res.Grid.Cells)
	// Output:
	// C/C0 = 0.560 on 53 cells
}
