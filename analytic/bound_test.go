package analytic

import (
	"math"
	"testing"
)

// The exact 3D value of a planar source never exceeds the 1D first-type
// column of a constant, never-ending source with the same transport
// parameters (Ogata & Banks 1961, USGS Prof. Paper 411-A): the 3D value is
// the time integral of the column's pulse response times transverse and
// vertical factors in [0, 1] and the source's relative strength in
// [0, 1] (Wexler 1992, USGS TWRI 3-B7). Package plume skips the 3D
// integral where this bound is negligible; the test sweeps on-axis,
// off-axis, deep, early, late and steady cases and every kind of history.
func TestExact3DBelowColumn(t *testing.T) {
	src := Source{Width: 12, Depth: 3}
	histories := []History{{}, {Duration: 400}, {Depletion: 1e-3}, {Rate: 2e-4, Exponent: 0.5}, {Rate: 1e-3, Exponent: 2}}
	params := []Params{
		{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1.4, Mu: math.Ln2 / 720},
		{V: 0.5, Dx: 0.05, Dy: 0.005, Dz: 0.0005, R: 2, Mu: 0},
		{V: 0.01, Dx: 0.5, Dy: 0.2, Dz: 0.1, R: 1, Mu: 1e-4},
	}
	n := 0
	for _, p := range params {
		for _, h := range histories {
			for _, x := range []float64{1, 10, 50, 200, 1000} {
				for _, y := range []float64{0, 5, 30, 120} {
					for _, z := range []float64{0, 1, 6} {
						for _, tau := range []float64{1, 30, 365, 3650, 36500, math.Inf(1)} {
							pt := Point{X: x, Y: y, Top: z, Bottom: z}
							e := Exact3DAt(pt, tau, p, src, h)
							c := OgataBanksAt(x, tau, p, FirstType, History{})
							if e > c*(1+1e-9)+1e-300 {
								t.Errorf("%+v %+v x=%g y=%g z=%g t=%g: exact 3D %.17g above the column %.17g", p, h, x, y, z, tau, e, c)
							}
							n++
						}
					}
				}
			}
		}
	}
	if n < 5000 {
		t.Fatalf("only %d cases", n)
	}
}
