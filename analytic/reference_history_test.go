package analytic

import (
	"math"
	"testing"
)

// OgataBanksAt for finite-duration and depleting sources, both inlets,
// against testdata/reference/analytic_1d_history.json: exp(-g t) [F(t) -
// F(t - duration)] with F the closed forms of Ogata & Banks (1961, USGS
// Prof. Paper 411-A) and van Genuchten & Alves (1982, USDA Tech. Bull.
// 1661) at decay Mu - g, evaluated by mpmath at 120 and 200 digits (so the
// subtraction loses nothing) and checked against the time integral of the
// impulse response over the ages the source was active
// (testdata/reference/gen_analytic.py 1dhist). The cases include an
// outside audit's (v 0.3, alpha_L 5, R 1.5, half-life 365, 300 days,
// receptors long after the pulse with values down to 1e-40). Tolerance:
// 1e-10 relative, or 8 eps cond where the function itself is worse
// conditioned.
func TestReferenceOgataBanksHistory(t *testing.T) {
	var f struct {
		Cases []struct {
			Label     string `json:"label"`
			Inlet     string `json:"inlet"`
			X         refNum `json:"x"`
			T         refNum `json:"t"`
			V         refNum `json:"V"`
			Dx        refNum `json:"Dx"`
			R         refNum `json:"R"`
			Mu        refNum `json:"Mu"`
			Duration  refNum `json:"duration"`
			Depletion refNum `json:"depletion"`
			Value     refNum `json:"value"`
			Cond      refNum `json:"cond"`
			Check     string `json:"independent_check"`
		} `json:"cases"`
	}
	refLoad(t, "analytic_1d_history.json", &f)
	if len(f.Cases) < 60 {
		t.Fatalf("reference file too short: %d cases", len(f.Cases))
	}
	first := newRefTracker("1D history c")
	third := newRefTracker("1D history flux")
	for _, c := range f.Cases {
		if c.Check != "ok" {
			t.Fatalf("reference case %q failed its independent check in the generator", c.Label)
		}
		p := Params{V: float64(c.V), Dx: float64(c.Dx), R: float64(c.R), Mu: float64(c.Mu)}
		h := History{Duration: float64(c.Duration), Depletion: float64(c.Depletion)}
		if math.IsInf(h.Duration, 1) {
			h.Duration = 0
		}
		inlet, tr := FirstType, first
		if c.Inlet == "third" {
			inlet, tr = ThirdType, third
		}
		got := OgataBanksAt(float64(c.X), float64(c.T), p, inlet, h)
		tr.check(t, c.Label, got, float64(c.Value), float64(c.Cond), 1e-10)
	}
	first.log(t)
	third.log(t)
}
