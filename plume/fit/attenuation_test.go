package fit

import (
	"context"
	"math"
	"testing"

	"downgradient/plume"
)

// Buscheck & Alcantar (1995), in Hinchee, Wilson & Downey (eds.), Intrinsic
// Bioremediation, Battelle Press, pp. 109-116 (bibliographic details from
// memory), as quoted in Newell et al. (2002), US EPA Ground Water Issue
// EPA/540/S-02/500 "Calculation and Use of First-Order Rate Constants for
// Monitored Natural Attenuation Studies": lambda = v_c/(4 alpha_x)
// ([1 + 2 alpha_x (k/v_x)]^2 - 1). Values computed by hand from the equation.
func TestAttenuationBuscheckAlcantarHand(t *testing.T) {
	cases := []struct {
		kx, vc, alpha, want float64
	}{
		// v_x = 0.1 m/d, R = 2 -> v_c = 0.05 m/d; alpha_x = 10 m; k/v_x = 0.01 /m:
		// (1 + 2*10*0.01)^2 - 1 = 1.44 - 1 = 0.44; 0.05/40 = 0.00125; lambda = 0.00055 /d.
		{0.01, 0.05, 10, 0.00055},
		// v_c = 0.3 m/d, alpha_x = 5 m, k/v_x = 0.002 /m:
		// (1 + 0.02)^2 - 1 = 0.0404; 0.3/20 = 0.015; lambda = 0.000606 /d.
		{0.002, 0.3, 5, 0.000606},
		// Small alpha_x: lambda -> v_c k/v_x (pure advection); alpha_x = 1e-6 m:
		// (1 + 2e-8)^2 - 1 = 4e-8 + 4e-16; times 1/(4e-6) -> 0.01 + 1e-10; times v_c = 1.
		{0.01, 1, 1e-6, 0.0100000001},
	}
	for _, c := range cases {
		if got := BuscheckAlcantar(c.kx, c.vc, c.alpha); math.Abs(got-c.want) > 1e-9*c.want {
			t.Errorf("BuscheckAlcantar(%g, %g, %g) = %.12g, by hand %.12g", c.kx, c.vc, c.alpha, got, c.want)
		}
	}
}

// An identity of the mathematics: C = exp(-kx x) solves the steady 1D
// retarded equation (alpha v) C” - v C' - R lambda C = 0 exactly when
// lambda = BuscheckAlcantar(kx, v/R, alpha).
func TestAttenuationBuscheckAlcantarIdentity(t *testing.T) {
	for _, c := range []struct{ kx, v, r, alpha float64 }{{0.01, 0.1, 2, 10}, {0.05, 1.3, 1, 0.5}, {1e-4, 0.02, 7, 30}} {
		lam := BuscheckAlcantar(c.kx, c.v/c.r, c.alpha)
		// With C = exp(-kx x): C'' = kx^2 C, C' = -kx C.
		res := c.alpha*c.v*c.kx*c.kx + c.v*c.kx - c.r*lam
		if math.Abs(res) > 1e-14*c.v*c.kx {
			t.Errorf("%+v: residual %g", c, res)
		}
	}
}

// column1D is a 1D column scenario (Ogata-Banks, first-type inlet), invented numbers.
func column1D(halfLife float64) plume.Scenario {
	return plume.Scenario{
		Aquifer:     plume.Aquifer{SeepageVelocity: f(0.3), Dispersivity: &plume.Dispersivity{Longitudinal: f(5), Transverse: f(0.5), Vertical: f(0.05)}},
		Contaminant: plume.Contaminant{Name: "test compound", Retardation: f(1.5), HalfLife: f(halfLife), ScreeningLevel: f(0.005)},
		Source:      plume.Source{Concentration: f(10)},
		Receptors:   []plume.Receptor{{ID: "R", X: f(50), Y: f(0)}},
		Times:       []float64{20000},
		Methods:     []string{plume.MethodExact},
	}
}

// syntheticWells samples the scenario's exact solution at wells on the axis
// (steady state when time is +Inf, else at that time).
func syntheticWells(t *testing.T, sc plume.Scenario, xs []float64, time float64) []Observation {
	t.Helper()
	s := sc
	s.Receptors = nil
	for _, x := range xs {
		s.Receptors = append(s.Receptors, plume.Receptor{X: f(x), Y: f(0)})
	}
	s.Times = []float64{}
	if !math.IsInf(time, 1) {
		s.Times = []float64{time}
	}
	res, err := plume.Screen(context.Background(), s, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var obs []Observation
	for i, rr := range res.Receptors {
		c := *rr.SteadyState.Exact
		if !math.IsInf(time, 1) {
			c = *rr.Series[0].Exact
		}
		o := Observation{WellID: "MW-" + string(rune('A'+i)), X: f(xs[i]), Y: f(0), Concentration: f(c)}
		if !math.IsInf(time, 1) {
			o.Time = f(time)
		}
		obs = append(obs, o)
	}
	return obs
}

// Recovery of a known decay rate from synthetic data of the 1D solution
// (Ogata & Banks 1961 with first-order decay; its steady state with a
// first-type inlet is exactly C0 exp(-kx x), so the relation inverts it
// exactly), and from a late-time transient.
func TestAttenuationRecoversDecayRate(t *testing.T) {
	const hl = 400.0
	want := math.Ln2 / hl
	xs := []float64{10, 40, 80, 130, 200}
	cases := []struct {
		name string
		time float64
		tol  float64
	}{
		{"steady state", math.Inf(1), 1e-6},
		{"late transient (t = 20000 d)", 20000, 1e-3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sc := column1D(hl)
			obs := syntheticWells(t, sc, xs, c.time)
			req := AttenuationRequest{Scenario: sc, Observations: obs}
			if !math.IsInf(c.time, 1) {
				req.Time = f(c.time)
			}
			res, err := Attenuation(context.Background(), req)
			if err != nil {
				t.Fatal(err)
			}
			if res.BiodegradationRate == nil || math.Abs(*res.BiodegradationRate/want-1) > c.tol {
				t.Fatalf("lambda %v, want %g", res.BiodegradationRate, want)
			}
			if math.Abs(*res.HalfLife/hl-1) > c.tol {
				t.Errorf("half-life %g, want %g", *res.HalfLife, hl)
			}
			ci := res.BulkAttenuationRateCI
			if len(ci) != 2 || !(ci[0] <= res.BulkAttenuationRate && res.BulkAttenuationRate <= ci[1]) {
				t.Errorf("interval %v around %g", ci, res.BulkAttenuationRate)
			}
			if res.RSquared == nil || *res.RSquared < 0.999 {
				t.Errorf("r^2 %v", res.RSquared)
			}
			if len(res.WellsUsed) != len(xs) {
				t.Errorf("wells used %v", res.WellsUsed)
			}
		})
	}
}

// Non-detects are censored: they do not move the fit, and one that the
// fitted line overshoots raises a caveat; off-axis wells are left out.
func TestAttenuationCensoredAndOffAxis(t *testing.T) {
	sc := column1D(400)
	obs := syntheticWells(t, sc, []float64{10, 40, 80, 130}, math.Inf(1))
	base, err := Attenuation(context.Background(), AttenuationRequest{Scenario: sc, Observations: obs})
	if err != nil {
		t.Fatal(err)
	}
	nd := false
	obs = append(obs,
		Observation{WellID: "ND-far", X: f(400), Y: f(0), Detected: &nd, DetectionLimit: f(1e-9)}, // fit predicts ~1e-3: contradicts
		Observation{WellID: "ND-ok", X: f(300), Y: f(0), Detected: &nd, DetectionLimit: f(1)},     // consistent
		Observation{WellID: "off-axis", X: f(50), Y: f(60), Concentration: f(5)},
	)
	res, err := Attenuation(context.Background(), AttenuationRequest{Scenario: sc, Observations: obs})
	if err != nil {
		t.Fatal(err)
	}
	if res.BulkAttenuationRate != base.BulkAttenuationRate {
		t.Errorf("non-detects or off-axis wells moved the fit: %g vs %g", res.BulkAttenuationRate, base.BulkAttenuationRate)
	}
	uses := map[string]string{}
	for _, p := range res.Points {
		uses[p.WellID] = p.Use
	}
	if uses["ND-far"] != "non_detect_check" || uses["off-axis"] != "off_centreline" {
		t.Errorf("uses %v", uses)
	}
	var above []string
	for _, c := range res.Caveats {
		if c.Code == CaveatNonDetectAboveFit {
			above = append(above, c.ReceptorID)
		}
	}
	if len(above) != 1 || above[0] != "ND-far" {
		t.Errorf("non_detect_above_fit caveats for %v, want [ND-far]", above)
	}
}

// Too few wells near the centreline: refused naming the observations; two
// wells: a rate, no interval, and the caveat.
func TestAttenuationFewWells(t *testing.T) {
	sc := column1D(400)
	one := syntheticWells(t, sc, []float64{40}, math.Inf(1))
	_, err := Attenuation(context.Background(), AttenuationRequest{Scenario: sc, Observations: one})
	fe := plume.FieldsOf(err)
	if len(fe) == 0 || fe[0].Field != "observations" {
		t.Fatalf("err %v", err)
	}
	two := syntheticWells(t, sc, []float64{40, 90}, math.Inf(1))
	res, err := Attenuation(context.Background(), AttenuationRequest{Scenario: sc, Observations: two})
	if err != nil {
		t.Fatal(err)
	}
	if res.BulkAttenuationRateCI != nil || res.RSquared != nil {
		t.Errorf("interval %v r2 %v with two points", res.BulkAttenuationRateCI, res.RSquared)
	}
	found := false
	for _, c := range res.Caveats {
		found = found || c.Code == CaveatFewCentrelineWells
	}
	if !found {
		t.Error("no few_centreline_wells caveat")
	}
	// A round with no samples is refused naming time... by the observations check.
	_, err = Attenuation(context.Background(), AttenuationRequest{Scenario: sc, Observations: two, Time: f(100)})
	if len(plume.FieldsOf(err)) == 0 {
		t.Errorf("missing times: err %v", err)
	}
}
