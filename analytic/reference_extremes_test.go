package analytic

import (
	"testing"
)

// Exact3DAt and DomenicoAt at the extremes, against
// testdata/reference/analytic_3d_extremes.json (gen_analytic.py 3dx):
// Peclet numbers 1e-2 and 1e6 at the receptor, values far below the source
// (the early tail, 60 and 100 m beside the source, 25 m below it, 1500 m
// downgradient), receptors inside the source's width and below its depth,
// well screens, finite-duration and depleting sources, early, at the travel
// time, late and steady. The exact values are the time integral of the
// point-source kernel (e.g. Wexler 1992, USGS TWRI 3-B7) with the vertical
// factor averaged over the screen and the history's weights, by mpmath at
// 40 digits with tanh-sinh and Gauss-Legendre rules agreeing to 1e-25; the
// Domenico (1987, J. Hydrol. 91, 49-58) values are its formula with
// DomenicoAt's history rules, at 80 digits. Tolerances: 1e-7 relative for
// the exact solution (issue 17), at every value however small; 1e-12 or
// 8 eps cond for Domenico.
func TestReferenceExact3DExtremes(t *testing.T) {
	var f struct {
		Cases []struct {
			Label      string `json:"label"`
			X          refNum `json:"x"`
			Y          refNum `json:"y"`
			Top        refNum `json:"top"`
			Bottom     refNum `json:"bottom"`
			T          refNum `json:"t"`
			V          refNum `json:"V"`
			Dx         refNum `json:"Dx"`
			Dy         refNum `json:"Dy"`
			Dz         refNum `json:"Dz"`
			R          refNum `json:"R"`
			Mu         refNum `json:"Mu"`
			Width      refNum `json:"Width"`
			Depth      refNum `json:"Depth"`
			Duration   refNum `json:"duration"`
			Depletion  refNum `json:"depletion"`
			Exact      refNum `json:"exact"`
			QuadAgreed refNum `json:"exact_quadrature_agreement"`
			Domenico   refNum `json:"domenico"`
			DomCond    refNum `json:"domenico_cond"`
		} `json:"cases"`
	}
	refLoad(t, "analytic_3d_extremes.json", &f)
	if len(f.Cases) < 100 {
		t.Fatalf("reference file too short: %d cases", len(f.Cases))
	}
	ex := newRefTracker("Exact3DAt")
	dm := newRefTracker("DomenicoAt")
	for _, c := range f.Cases {
		if c.QuadAgreed > 1e-20 {
			t.Fatalf("reference case %q: the generator's two quadratures agree only to %g", c.Label, c.QuadAgreed)
		}
		p := Params{V: float64(c.V), Dx: float64(c.Dx), Dy: float64(c.Dy), Dz: float64(c.Dz),
			R: float64(c.R), Mu: float64(c.Mu)}
		s := Source{Width: float64(c.Width), Depth: float64(c.Depth)}
		pt := Point{X: float64(c.X), Y: float64(c.Y), Top: float64(c.Top), Bottom: float64(c.Bottom)}
		h := History{Duration: float64(c.Duration), Depletion: float64(c.Depletion)}
		tt := float64(c.T)
		ex.check(t, c.Label, Exact3DAt(pt, tt, p, s, h), float64(c.Exact), 0, 1e-7)
		if c.Domenico > 1e-300 {
			dm.check(t, c.Label, DomenicoAt(pt, tt, p, s, h), float64(c.Domenico), float64(c.DomCond), 1e-12)
		}
	}
	ex.log(t)
	dm.log(t)
}
