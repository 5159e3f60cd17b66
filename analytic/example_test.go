package analytic_test

import (
	"fmt"
	"math"

	"downgradient/analytic"
)

// A 1D column, 100 m long travel path, seepage velocity 0.1 m/d,
// longitudinal dispersivity 10 m (D = 1 m2/d), retardation 1.4 and a
// 720-day half-life acting on dissolved and sorbed mass alike.
func ExampleOgataBanks() {
	p := analytic.Params{V: 0.1, Dx: 1, R: 1.4, Mu: math.Ln2 / 720}
	for _, t := range []float64{365, 1825, 3650, math.Inf(1)} {
		fmt.Printf("t=%-5v C/C0=%.4g\n", t, analytic.OgataBanks(100, t, p))
	}
	// Output:
	// t=365   C/C0=0.0007072
	// t=1825  C/C0=0.2771
	// t=3650  C/C0=0.3001
	// t=+Inf  C/C0=0.3003
}

// At a Peclet number of 1e6 the textbook form overflows (exp(Vx/D) = +Inf
// times erfc = 0); the scaled evaluation keeps the far tail.
func ExampleOgataBanks_highPeclet() {
	p := analytic.Params{V: 1, Dx: 1e-6, R: 1}
	fmt.Printf("%.6g\n", analytic.OgataBanks(1, 0.99, p))
	// Output:
	// 5.97336e-13
}

// The exact solution and the Domenico approximation for a source 15 m wide
// and 3 m deep, at a well 210 m downgradient, 6 m off the axis, 2 m below the
// water table, at steady state.
func ExampleExact3D() {
	p := analytic.Params{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1.4, Mu: math.Ln2 / 720}
	s := analytic.Source{Width: 15, Depth: 3}
	inf := math.Inf(1)
	exact := analytic.Exact3D(210, 6, 2, inf, p, s)
	dom := analytic.Domenico(210, 6, 2, inf, p, s)
	fmt.Printf("exact %.4g, Domenico %.4g, deviation %+.1f%%\n", exact, dom, 100*analytic.RelativeDeviation(dom, exact))
	// Output:
	// exact 0.009436, Domenico 0.007476, deviation -20.8%
}

// A depth-averaged value over a well screen from 1 m to 6 m below the water
// table, for a source that was active for 5 years.
func ExampleExact3DAt() {
	p := analytic.Params{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1.4}
	s := analytic.Source{Width: 15, Depth: 3}
	pt := analytic.Point{X: 100, Y: 0, Top: 1, Bottom: 6}
	c := analytic.Exact3DAt(pt, 3650, p, s, analytic.History{Duration: 1825})
	fmt.Printf("%.4g\n", c)
	// Output:
	// 0.02136
}
