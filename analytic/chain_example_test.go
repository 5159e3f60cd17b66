package analytic_test

import (
	"fmt"
	"math"

	"downgradient/analytic"
)

// A chlorinated-ethene chain released as PCE only (invented numbers): PCE
// -> TCE -> cis-DCE -> VC with yields equal to the ratios of molar masses,
// all four with retardation 2 and the half-lives (days) below acting on
// dissolved and sorbed mass alike. Concentrations in mg/L at a well 210 m
// downgradient, 6 m off the axis, 2 m deep, after 10 years and at steady
// state, from the exact 3D solution.
func ExampleChainExact3DAt() {
	names := []string{"PCE", "TCE", "cis-DCE", "VC"}
	halfLife := []float64{720, 1100, 1800, 540}
	yield := []float64{131.39 / 165.83, 96.94 / 131.39, 62.50 / 96.94, 0}
	chain := make(analytic.Chain, 4)
	for i := range chain {
		chain[i] = analytic.Compound{
			R:        2,
			Mu:       analytic.RetardedDecayRate(math.Ln2/halfLife[i], 2, false),
			Daughter: i + 1,
			Yield:    yield[i],
		}
	}
	chain[3].Daughter = analytic.NoDaughter
	c0 := []float64{10, 0, 0, 0} // mg/L of each compound at the source

	p := analytic.Params{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01} // R and Mu come from the chain
	s := analytic.Source{Width: 15, Depth: 3}
	well := analytic.Point{X: 210, Y: 6, Top: 2, Bottom: 2}
	out := make([]float64, len(chain))
	for _, t := range []float64{3650, math.Inf(1)} {
		if err := analytic.ChainExact3DAt(well, t, p, s, analytic.History{}, chain, c0, out); err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("t=%v:", t)
		for i, c := range out {
			fmt.Printf(" %s %.4g", names[i], c)
		}
		fmt.Println()
	}
	// Output:
	// t=3650: PCE 0.03158 TCE 0.1079 cis-DCE 0.109 VC 0.01737
	// t=+Inf: PCE 0.03874 TCE 0.1601 cis-DCE 0.2134 VC 0.03843
}

// The decoupled form of a two-compound chain: the daughter is a
// combination of single-compound solutions with the two rates (distinct
// rates), or the first age moment of one (equal rates: the repeated-rate
// limit).
func ExampleChain_Terms() {
	for _, k2 := range []float64{5e-4, 2e-3} {
		c := analytic.Chain{
			{R: 1, Mu: 2e-3, Daughter: 1, Yield: 0.5},
			{R: 1, Mu: k2, Daughter: analytic.NoDaughter},
		}
		terms, _ := c.Terms([]float64{1, 0})
		for k, t := range terms[1] {
			if k > 0 {
				fmt.Print(" ")
			}
			fmt.Printf("%+.4g * M_%d(%g)", t.Coef, t.Order, t.Rate)
		}
		fmt.Println()
	}
	// Output:
	// -0.6667 * M_0(0.002) +0.6667 * M_0(0.0005)
	// +0.001 * M_1(0.002)
}

// A 1D column with distinct retardation factors (Laplace-domain solution):
// parent R 3, daughter R 1.2, the daughter's half-life acting on the
// dissolved phase only.
func ExampleChainColumnAt() {
	chain := analytic.Chain{
		{R: 3, Mu: math.Ln2 / 700, Daughter: 1, Yield: 0.8},
		{R: 1.2, Mu: analytic.RetardedDecayRate(math.Ln2/400, 1.2, true), Daughter: analytic.NoDaughter},
	}
	p := analytic.Params{V: 0.2, Dx: 2}
	out := make([]float64, 2)
	for _, t := range []float64{500, 2000, math.Inf(1)} {
		_ = analytic.ChainColumnAt(100, t, p, analytic.FirstType, analytic.History{}, chain, []float64{1, 0}, out)
		fmt.Printf("t=%v parent %.4g daughter %.4g\n", t, out[0], out[1])
	}
	// Output:
	// t=500 parent 0.004878 daughter 0.04012
	// t=2000 parent 0.2524 daughter 0.3334
	// t=+Inf parent 0.269 daughter 0.3444
}
