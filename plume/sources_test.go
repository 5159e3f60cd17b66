package plume

import (
	"context"
	"fmt"
	"math"
	"testing"
)

// twoSources is an invented site with two release areas 60 m apart across
// the flow and 25 m apart along it, both toward azimuth 110.
func twoSources() Scenario {
	sc := demoScenario()
	a := sc.Source
	a.ID = "tank farm"
	b := a
	b.ID = "loading bay"
	b.X, b.Y, b.Concentration, b.Width = f(20), f(-60), f(5), f(8)
	a.FlowAzimuthDeg, b.FlowAzimuthDeg = f(110), f(110)
	sc.Source = Source{}
	sc.Sources = []Source{a, b}
	sc.Receptors = []Receptor{
		{ID: "A", X: f(120), Y: f(-20), Z: f(1)},
		{ID: "B", X: f(200), Y: f(-90), Z: f(2)},
		{ID: "C", X: f(400), Y: f(-150), ScreenTop: f(1), ScreenBottom: f(6)},
	}
	sc.Times = []float64{365, 1825, 3650}
	return sc
}

// Superposition is exact for this linear equation: the closed forms of two
// sources give, bit for bit, the sum of the two single-source models'
// values at every receptor and time (the sources start together, so their
// clocks agree exactly). Screened results agree to the reporting floor
// (each single screening reports a part below its floor as 0).
func TestSeveralSourcesSuperpose(t *testing.T) {
	sc := twoSources()
	one := func(s Source) Scenario {
		x := sc
		x.Sources, x.Source = nil, s
		x.Source.ID = ""
		return x
	}
	md, err := Prepare(sc)
	if err != nil {
		t.Fatal(err)
	}
	ma, _ := Prepare(one(sc.Sources[0]))
	mb, _ := Prepare(one(sc.Sources[1]))
	taus := []float64{30, 365, 1825, 3650, math.Inf(1)}
	for i, p := range md.Receptors() {
		for _, tau := range taus {
			for _, m := range []string{MethodExact, MethodDomenico} {
				got := md.Value(m, p, tau)
				want := ma.Value(m, ma.Receptors()[i], tau) + mb.Value(m, mb.Receptors()[i], tau)
				if got != want {
					t.Errorf("%s %s tau=%g: %.17g, sum of single sources %.17g", p.ID, m, tau, got, want)
				}
			}
		}
	}
	both := screenOK(t, sc)
	a, b := screenOK(t, one(sc.Sources[0])), screenOK(t, one(sc.Sources[1]))
	floor := both.Derived.ConcentrationFloor
	for i, rr := range both.Receptors {
		for j, sp := range rr.Series {
			want := *a.Receptors[i].Series[j].Exact + *b.Receptors[i].Series[j].Exact
			if math.Abs(*sp.Exact-want) > floor {
				t.Errorf("%s t=%g: %.17g, sum of single screenings %.17g", rr.ID, sp.Time, *sp.Exact, want)
			}
		}
	}
	if len(both.Derived.Sources) != 2 || both.Derived.Sources[1].ID != "loading bay" || both.Derived.Sources[0].MassDischarge == nil {
		t.Errorf("derived sources %+v", both.Derived.Sources)
	}
}

// Each source's contribution, asked for with contributions: true, adds up
// to the receptor's value.
func TestSeveralSourcesContributions(t *testing.T) {
	sc := twoSources()
	sc.Contributions = true
	res := screenOK(t, sc)
	for _, rr := range res.Receptors {
		if len(rr.Contributions) != 2 || rr.Contributions[0].SourceID != "tank farm" {
			t.Fatalf("%s contributions %+v", rr.ID, rr.Contributions)
		}
		for j, sp := range rr.Series {
			sum := *rr.Contributions[0].Series[j].Exact + *rr.Contributions[1].Series[j].Exact
			if math.Abs(sum-*sp.Exact) > 1e-15**sp.Exact+2*res.Derived.ConcentrationFloor {
				t.Errorf("%s t=%g: contributions %g, value %g", rr.ID, sp.Time, sum, *sp.Exact)
			}
		}
	}
}

// The allowable source concentration is the one at which the receptor just
// reaches the level: screening again with it gives the level (linearity),
// at steady state and at the worst requested time; with several sources
// the common scale factor brings the worst receptor to the level.
func TestAllowableSourceConcentration(t *testing.T) {
	sc := demoScenario()
	res := screenOK(t, sc)
	for i, rr := range res.Receptors {
		a := rr.AllowableSourceConcentration
		if a == nil || a.SteadyState == nil || a.WithinTimes == nil {
			t.Fatalf("%s: allowable %+v", rr.ID, a)
		}
		x := sc
		x.Receptors = sc.Receptors[i : i+1]
		x.Source.Concentration = f(*a.SteadyState)
		if got := *screenOK(t, x).Receptors[0].SteadyState.Exact; math.Abs(got-0.005) > 1e-9*0.005 {
			t.Errorf("%s: steady state at the allowable concentration %.12g, want the level 0.005", rr.ID, got)
		}
		x.Source.Concentration = f(*a.WithinTimes)
		worst := 0.0
		for _, sp := range screenOK(t, x).Receptors[0].Series {
			worst = math.Max(worst, *sp.Exact)
		}
		if math.Abs(worst-0.005) > 1e-9*0.005 {
			t.Errorf("%s: worst value within the times %.12g, want 0.005", rr.ID, worst)
		}
		if d := rr.DilutionAttenuationFactor; d == nil || math.Abs(*d.SteadyState**rr.SteadyState.Exact-12) > 1e-12*12 {
			t.Errorf("%s: dilution attenuation factor %+v", rr.ID, d)
		}
	}
	two := twoSources()
	res = screenOK(t, two)
	k := res.AllowableScaleFactor
	if k == nil || k.SteadyState == nil {
		t.Fatalf("scale factor %+v", k)
	}
	for i := range two.Sources {
		two.Sources[i].Concentration = f(*two.Sources[i].Concentration * *k.SteadyState)
	}
	worst := 0.0
	for _, rr := range screenOK(t, two).Receptors {
		worst = math.Max(worst, *rr.SteadyState.Exact)
	}
	if math.Abs(worst-0.005) > 1e-9*0.005 {
		t.Errorf("worst receptor at the scaled sources %.12g, want 0.005", worst)
	}
}

// Bad input of issue 14: 422 naming the field.
func TestSeveralSourcesAndTransectsBadInput(t *testing.T) {
	tr := func(edit func(*Transect)) Scenario {
		sc := demoScenario()
		x := Transect{From: [2]float64{100, -50}, To: [2]float64{100, 50}, Bottom: f(10)}
		edit(&x)
		sc.Transects = []Transect{x}
		return sc
	}
	many := twoSources()
	for i := range 100 {
		s := many.Sources[0]
		s.ID, s.X = fmt.Sprintf("s%d", i), f(float64(i)*50)
		many.Sources = append(many.Sources, s)
	}
	cases := []struct {
		name  string
		sc    Scenario
		field string
	}{
		{"zero-length transect", tr(func(t *Transect) { t.To = t.From }), "transects[0].to"},
		{"stream flow 0", tr(func(t *Transect) { t.StreamFlow = f(0) }), "transects[0].stream_flow"},
		{"no bottom", tr(func(t *Transect) { t.Bottom = nil }), "transects[0].bottom"},
		{"both source and sources", func() Scenario { s := twoSources(); s.Source = s.Sources[0]; return s }(), "sources"},
		{"more than 100 sources", many, "sources"},
		{"overlapping sources", func() Scenario {
			s := twoSources()
			s.Sources[1].X, s.Sources[1].Y = f(3), f(2)
			return s
		}(), "sources[1]"},
		{"different flow directions", func() Scenario { s := twoSources(); s.Sources[1].FlowAzimuthDeg = f(100); return s }(), "sources[1].flow_azimuth_deg"},
		{"a spill among several", func() Scenario {
			s := twoSources()
			s.Sources[1].Concentration, s.Sources[1].Mass = nil, f(2)
			return s
		}(), "sources[1]"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Screen(context.Background(), tc.sc, Options{})
			found := false
			for _, e := range FieldsOf(err) {
				found = found || e.Field == tc.field
			}
			if !found {
				t.Errorf("err %v does not name %s", err, tc.field)
			}
		})
	}
}

// The numeric cross-check carries both sources on one grid and agrees with
// the superposed closed forms within its tolerance (issue 14).
func TestSeveralSourcesNumeric(t *testing.T) {
	if testing.Short() {
		t.Skip("a 3D finite-volume run")
	}
	sc := twoSources()
	sc.Receptors = sc.Receptors[:2]
	sc.Times = []float64{3650}
	sc.Methods = []string{MethodExact, MethodNumeric}
	res := screenOK(t, sc)
	if res.Numeric == nil {
		t.Fatalf("numeric not run: %+v", res.Caveats)
	}
	for _, rr := range res.Receptors {
		a := rr.NumericAgreement
		if a == nil || !a.WithinTolerance {
			t.Errorf("%s: agreement %+v", rr.ID, a)
		}
	}
}
