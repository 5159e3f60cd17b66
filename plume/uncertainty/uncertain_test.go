package uncertainty

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"downgradient/internal/plumetest"
	"downgradient/plume"
)

// uncertainDemo is the invented demo scenario (package plumetest) with ten
// receptors and ten times, as the screening benchmark uses.
func uncertainDemo() plume.Scenario {
	var sc plume.Scenario
	if err := json.Unmarshal([]byte(plumetest.DemoJSON), &sc); err != nil {
		panic(err)
	}
	sc.Receptors = nil
	for i := range 10 {
		x, y, z := plumetest.BenchReceptor(i)
		sc.Receptors = append(sc.Receptors, plume.Receptor{ID: fmt.Sprintf("W%d", i), X: f(x), Y: f(y), Z: f(z)})
	}
	sc.Times = plumetest.BenchTimes()
	sc.Methods = []string{plume.MethodExact}
	return sc
}

// f is a test shorthand for a *float64.
var f = plumetest.F

// param parses a parameter path.
func param(t testing.TB, path string) plume.Param {
	t.Helper()
	p, err := plume.ParseParam(path)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// Probability of exceedance against a closed form: with only the source
// concentration uncertain and log-normal, the concentration at a receptor is
// C0 f with f fixed, so P(C >= L) = P(C0 >= L/f) = 1 - Phi((ln(L/f) - mu)/sigma)
// (log-normal distribution: ln C0 ~ N(mu, sigma^2)); Phi from gonum
// distuv.UnitNormal. One parameter and a monotone response: the Latin
// hypercube puts exactly one draw in each of n strata, so the count of
// exceedances is within 1 of n P (McKay et al. 1979).
func TestUncertainExceedanceClosedForm(t *testing.T) {
	sc := uncertainDemo()
	sc.Receptors = sc.Receptors[6:7]
	sc.Times = []float64{1825}
	unit := sc
	unit.Source.Concentration = f(1)
	res, err := plume.Screen(context.Background(), unit, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	fac := *res.Receptors[0].Series[0].Exact
	level := 15 * fac
	sc.Contaminant.ScreeningLevel = f(level)
	d := Distribution{Kind: DistLognormal, P05: 2, P95: 40}
	sc.Source.Concentration = f(d.Median())
	const n = 1000
	ur, err := RunUncertainty(context.Background(), UncertaintyRequest{Template: sc, Parameters: []UncertainParameter{{Param: param(t, "source.concentration"), Dist: d}}, Realizations: n, Seed: 3}, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	mu, sigma := d.lognormalParams()
	want := 1 - distuv.UnitNormal.CDF((math.Log(level/fac)-mu)/sigma)
	got := ur.Receptors[0].Series[0].ExceedanceProbability
	if got == nil || math.Abs(*got-want) > 1.5/n {
		t.Fatalf("P = %v, closed form %g", got, want)
	}
	ci := ur.Receptors[0].Series[0].ExceedanceProbabilityCI
	if !(ci[0] <= want && want <= ci[1]) {
		t.Errorf("interval %v excludes %g", ci, want)
	}
	// Mean of C = f E[C0] = f exp(mu + sigma^2/2) within the sampling error.
	if m := ur.Receptors[0].Series[0].Mean; math.Abs(m/(fac*d.Mean())-1) > 0.03 {
		t.Errorf("mean %g, want %g", m, fac*d.Mean())
	}
	// Median of C is f times the median of C0 (a monotone map keeps quantiles).
	if p50 := ur.Receptors[0].Series[0].Percentiles.P50; math.Abs(p50/(fac*d.Median())-1) > 0.01 {
		t.Errorf("p50 %g, want %g", p50, fac*d.Median())
	}
	if dr := ur.Receptors[0].Drivers; len(dr) != 1 || math.Abs(dr[0].RankCorrelation-1) > 1e-12 {
		t.Errorf("drivers %v, want source.concentration with rho 1 (a monotone response)", dr)
	}
}

// A seed reproduces a run bit for bit, whatever the number of workers.
func TestUncertainReproducible(t *testing.T) {
	sc := uncertainDemo()
	params := []UncertainParameter{
		{Param: param(t, "aquifer.hydraulic_conductivity"), Dist: Distribution{Kind: DistLognormal, P05: 3, P95: 25}},
		{Param: param(t, "contaminant.half_life"), Dist: Distribution{Kind: DistTriangular, Min: 200, Mode: 720, Max: 1500}},
		{Param: param(t, "aquifer.dispersivity.longitudinal"), Dist: Distribution{Kind: DistLogUniform, Min: 3, Max: 30}},
	}
	run := func(workers int, seed uint64) []byte {
		r, err := RunUncertainty(context.Background(), UncertaintyRequest{Template: sc, Parameters: params, Realizations: 60, Seed: seed, Workers: workers}, plume.Options{})
		if err != nil {
			t.Fatal(err)
		}
		b, _ := json.Marshal(r)
		return b
	}
	a, b, c := run(1, 11), run(2, 11), run(2, 12)
	if string(a) != string(b) {
		t.Error("same seed, different results with 1 and 2 workers")
	}
	if string(a) == string(c) {
		t.Error("different seeds, same results")
	}
	var r UncertaintyResult
	_ = json.Unmarshal(a, &r)
	// Faster flow and slower decay raise concentrations downgradient: at the
	// farthest receptor conductivity and half-life correlate positively with
	// the peak (physics of advection with first-order decay).
	far := r.Receptors[len(r.Receptors)-1]
	for _, d := range far.Drivers {
		if (d.Parameter == "aquifer.hydraulic_conductivity" || d.Parameter == "contaminant.half_life") && !(d.RankCorrelation > 0.2) {
			t.Errorf("driver %s rho %g, want clearly positive", d.Parameter, d.RankCorrelation)
		}
	}
}

// Bad settings and distributions reaching outside a field's range are
// reported against the field.
func TestUncertainRefusals(t *testing.T) {
	sc := uncertainDemo()
	cases := []struct {
		name  string
		req   UncertaintyRequest
		field string
	}{
		{"numeric above the limit", UncertaintyRequest{Template: sc, Realizations: 21, Methods: []string{"exact", "numeric"}}, "realizations"},
		{"too many realizations", UncertaintyRequest{Template: sc, Realizations: MaxRealizations + 1}, "realizations"},
		{"unknown method", UncertaintyRequest{Template: sc, Methods: []string{"magic"}}, "methods[0]"},
		{"porosity beyond 1", UncertaintyRequest{Template: sc, Realizations: 200, Parameters: []UncertainParameter{
			{Param: param(t, "aquifer.effective_porosity"), Dist: Distribution{Kind: DistLognormal, P05: 0.1, P95: 0.9}}}}, "aquifer.effective_porosity"},
		{"negative conductivity", UncertaintyRequest{Template: sc, Realizations: 50, Parameters: []UncertainParameter{
			{Param: param(t, "aquifer.hydraulic_conductivity"), Dist: Distribution{Kind: DistUniform, Min: -1, Max: 10}}}}, "aquifer.hydraulic_conductivity"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := RunUncertainty(context.Background(), tc.req, plume.Options{})
			fe := plume.FieldsOf(err)
			if len(fe) == 0 {
				t.Fatalf("err %v, want FieldErrors", err)
			}
			found := false
			for _, e := range fe {
				found = found || e.Field == tc.field
			}
			if !found {
				t.Errorf("errors %v lack %s", fe, tc.field)
			}
		})
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := RunUncertainty(ctx, UncertaintyRequest{Template: sc, Realizations: 10}, plume.Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: err %v", err)
	}
}

// Every number of a result is finite, also with a far receptor and early times.
func TestUncertainFinite(t *testing.T) {
	sc := uncertainDemo()
	sc.Receptors = append(sc.Receptors, plume.Receptor{ID: "far", X: f(5000), Y: f(0), Z: f(0)}, plume.Receptor{ID: "up", X: f(-50), Y: f(0)})
	sc.Times = []float64{0, 1e-6, 365}
	r, err := RunUncertainty(context.Background(), UncertaintyRequest{Template: sc, Realizations: 30, Seed: 1, Methods: []string{"exact", "domenico"},
		Parameters: []UncertainParameter{{Param: param(t, "aquifer.seepage_velocity"), Dist: Distribution{Kind: DistLognormal, P05: 0.01, P95: 5}}}}, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := json.Marshal(r); err != nil {
		t.Fatalf("not encodable (NaN or Inf?): %v", err)
	}
	if got := fmt.Sprint(len(r.Receptors[0].Series)); got != "6" {
		t.Errorf("series items %s, want 3 times x 2 methods", got)
	}
}

// BenchmarkUncertaintyDemo: 1,000 realizations of the demo scenario (10
// receptors, 10 times, exact method) with four uncertain parameters, on
// every core. Target (issue 5): under 1 s on the 2-core machine.
func BenchmarkUncertaintyDemo(b *testing.B) {
	sc := uncertainDemo()
	params := []UncertainParameter{
		{Param: param(b, "aquifer.hydraulic_conductivity"), Dist: Distribution{Kind: DistLognormal, P05: 3, P95: 25}},
		{Param: param(b, "contaminant.half_life"), Dist: Distribution{Kind: DistTriangular, Min: 200, Mode: 720, Max: 1500}},
		{Param: param(b, "aquifer.dispersivity.longitudinal"), Dist: Distribution{Kind: DistLogUniform, Min: 3, Max: 30}},
		{Param: param(b, "source.concentration"), Dist: Distribution{Kind: DistUniform, Min: 8, Max: 16}},
	}
	for b.Loop() {
		if _, err := RunUncertainty(context.Background(), UncertaintyRequest{Template: sc, Parameters: params, Realizations: 1000, Seed: 7}, plume.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// A compound of a chain (invented, equal retardation): the daughter's
// concentration is linear in the parent's source concentration when the
// daughter has no source of its own, so the exceedance probability of TCE
// with contaminants[0].source_concentration log-normal has the closed form
// of TestUncertainExceedanceClosedForm (issue 13).
func TestUncertainCompoundOfChain(t *testing.T) {
	sc := uncertainDemo()
	sc.Receptors = sc.Receptors[6:7]
	sc.Times = []float64{1825}
	sc.Contaminant = plume.Contaminant{}
	sc.Source.Concentration = nil
	sc.Contaminants = []plume.Constituent{
		{Name: "PCE", SourceConcentration: f(1), Retardation: f(1.5), HalfLife: f(400), DecaysTo: "TCE"},
		{Name: "TCE", SourceConcentration: f(0), Retardation: f(1.5), HalfLife: f(900)},
	}
	md, err := plume.Prepare(sc)
	if err == nil {
		md, err = md.Focus("TCE")
	}
	if err != nil {
		t.Fatal(err)
	}
	fac := md.Value(plume.MethodExact, md.Receptors()[0], md.Elapsed(1825))
	level := 15 * fac
	sc.Contaminants[1].ScreeningLevel = f(level)
	d := Distribution{Kind: DistLognormal, P05: 2, P95: 40}
	sc.Contaminants[0].SourceConcentration = f(d.Median())
	const n = 1000
	req := UncertaintyRequest{Template: sc, Parameters: []UncertainParameter{{Param: param(t, "contaminants[0].source_concentration"), Dist: d}},
		Realizations: n, Seed: 3, Compound: "TCE"}
	ur, err := RunUncertainty(context.Background(), req, plume.Options{})
	if err != nil {
		t.Fatal(err)
	}
	mu, sigma := d.lognormalParams()
	want := 1 - distuv.UnitNormal.CDF((math.Log(level/fac)-mu)/sigma)
	if got := ur.Receptors[0].Series[0].ExceedanceProbability; got == nil || math.Abs(*got-want) > 1.5/n {
		t.Fatalf("P = %v, closed form %g", got, want)
	}
	req.Compound = ""
	if _, err := RunUncertainty(context.Background(), req, plume.Options{}); len(plume.FieldsOf(err)) == 0 || plume.FieldsOf(err)[0].Field != "compound" {
		t.Errorf("no compound named: err %v, want one naming compound", err)
	}
}
