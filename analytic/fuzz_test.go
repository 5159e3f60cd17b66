package analytic

import (
	"math"
	"testing"
)

// FuzzClosedForms feeds arbitrary valid coefficients to every closed form
// and fails on NaN, Inf, a negative value or a relative value above the
// source. Seeds are in testdata/fuzz/FuzzClosedForms; run longer with
// go test ./analytic -run XXX -fuzz FuzzClosedForms -fuzztime 5m.
func FuzzClosedForms(f *testing.F) {
	f.Add(0.1, 1.0, 0.1, 0.01, 1.4, 1e-3, 15.0, 3.0, 210.0, 6.0, 2.0, 3650.0, 0.0, 0.0)
	f.Add(1.0, 1e-6, 1e-7, 1e-8, 1.0, 0.0, 1.0, 1.0, 1.0, 0.0, 0.0, 0.99, 0.0, 0.0)
	f.Add(1e-4, 100.0, 10.0, 1.0, 50.0, 1.0, 0.1, 0.1, 1e4, 1e3, 100.0, 1e-3, 10.0, 0.1)
	f.Fuzz(func(t *testing.T, v, dx, dy, dz, r, mu, w, depth, x, y, z, tt, dur, dep float64) {
		p := Params{V: v, Dx: dx, Dy: dy, Dz: dz, R: r, Mu: mu}
		if p.Validate(true) != nil || !(w > 0) || !(depth > 0) || math.IsNaN(x+y+z+tt+dur+dep) ||
			math.IsInf(x, 0) || math.IsInf(y, 0) || math.IsInf(z, 0) || dur < 0 || dep < 0 || math.IsInf(dep, 0) ||
			z < 0 || z > 1e6 || math.Abs(y) > 1e9 || x > 1e9 || tt > 1e12 || w > 1e9 || depth > 1e9 {
			return
		}
		s := Source{Width: w, Depth: depth}
		h := History{Duration: dur, Depletion: dep}
		pt := Point{X: x, Y: y, Top: z, Bottom: z}
		for name, c := range map[string]float64{
			"OgataBanks":     OgataBanks(x, tt, p),
			"OgataBanksFlux": OgataBanksFlux(x, tt, p),
			"OgataBanksAt":   OgataBanksAt(x, tt, p, ThirdType, h),
			"Exact3DAt":      Exact3DAt(pt, tt, p, s, h),
			"DomenicoAt":     DomenicoAt(pt, tt, p, s, h),
		} {
			if math.IsNaN(c) || c < 0 || c > 1 {
				t.Fatalf("%s = %v for %+v %+v %+v t=%v %+v", name, c, p, s, pt, tt, h)
			}
		}
		if d := DomenicoDeviation(x, y, z, tt, p, s); math.IsNaN(d) || math.IsInf(d, 0) {
			t.Fatalf("DomenicoDeviation = %v", d)
		}
	})
}
