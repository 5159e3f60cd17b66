package plume

import (
	"context"
	"fmt"
	"reflect"
	"strings"
	"testing"
)

// layerReceptors is a layer of n invented receptors around the demo
// source: along and across the flow, upgradient, inside the source zone,
// points and screens, so that every status and most receptor caveats occur.
func layerReceptors(n int) []Receptor {
	rs := make([]Receptor, n)
	for i := range rs {
		x := -40 + float64(i%37)*17.5
		y := -30 + float64(i%11)*6
		r := Receptor{ID: fmt.Sprintf("L-%d", i), X: f(x), Y: f(y)}
		switch i % 5 {
		case 0:
			r.ScreenTop, r.ScreenBottom = f(1), f(2+float64(i%7))
		case 3:
			r.Z = f(float64(i%13) * 0.7) // some below the plume's reach
		default:
			r.Z = f(float64(i % 3))
		}
		if i%23 == 0 {
			r.ID = "" // default id R<i+1>
		}
		rs[i] = r
	}
	return rs
}

// screenLayer screens sc's receptors through a Layer in chunks of size k
// and returns the receptors, each chunk's own caveats, the tail and the head.
func screenLayer(t *testing.T, sc Scenario, k int) ([]ReceptorResult, []Caveat, Result, Result) {
	t.Helper()
	l, err := PrepareLayer(sc, Options{EngineVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	tally := NewTally(-1)
	var rrs []ReceptorResult
	var own []Caveat
	for first := 0; first < len(sc.Receptors); first += k {
		rs := sc.Receptors[first:min(first+k, len(sc.Receptors))]
		for i, r := range rs {
			if err := l.CheckReceptor(first+i, r); err != nil {
				t.Fatalf("receptor %d: %v", first+i, err)
			}
		}
		part, err := l.Screen(context.Background(), first, rs)
		if err != nil {
			t.Fatal(err)
		}
		tally.Add(part)
		rrs = append(rrs, part.Receptors...)
		own = append(own, l.OwnCaveats(part)...)
		// The part's caveats are the result-wide ones with the part's own,
		// in the order of a whole result.
		if got := part.CaveatCodes(part.Receptors[0].ID); len(got) == 0 || got[0] != CaveatScreeningEstimate {
			t.Errorf("part caveat codes %v", got)
		}
	}
	return rrs, own, l.Tail(tally), l.Head()
}

// A layer screened in chunks gives, receptor for receptor, what Screen gives
// for all of them at once (the same JSON), the same caveats in the same
// order (the result-wide ones, then each receptor's own), the same summary,
// derived parameters, transects and allowable scale factor; for every kind
// of scenario the per-receptor work differs in (one source; estimated
// dispersivity per receptor; several sources with contributions; several
// compounds; receptors by lon/lat in a CRS; a spill; a source that stops).
func TestLayerChunksEqualScreen(t *testing.T) {
	base := func(n int) Scenario {
		sc := demoScenario()
		sc.Receptors = layerReceptors(n)
		return sc
	}
	cases := []struct {
		name string
		sc   func() Scenario
	}{
		{"demo", func() Scenario { return base(120) }},
		{"dispersivity per receptor", func() Scenario {
			sc := base(60)
			sc.Aquifer.Dispersivity = nil
			return sc
		}},
		{"several sources", func() Scenario {
			sc := twoSources()
			sc.Receptors = layerReceptors(50)
			sc.Contributions = true
			sc.Methods = []string{"exact", "domenico"}
			return sc
		}},
		{"several compounds", func() Scenario {
			sc := chainScenario()
			sc.Receptors = layerReceptors(40)
			return sc
		}},
		{"lon/lat in a CRS", func() Scenario {
			sc := base(30)
			sc.CRS = "EPSG:32617"
			sc.Source.X, sc.Source.Y = f(512000), f(4181000)
			for i := range sc.Receptors {
				r := &sc.Receptors[i]
				r.X, r.Y = f(512000+*r.X), f(4181000+*r.Y)
				if i%2 == 0 {
					fr, err := siteCRS(sc)
					if err != nil {
						t.Skip("no PROJ:", err)
					}
					lon, lat, err := fr.ToLonLat(*r.X, *r.Y)
					if err != nil {
						t.Fatal(err)
					}
					r.X, r.Y, r.Lon, r.Lat = nil, nil, f(lon), f(lat)
				}
			}
			return sc
		}},
		{"spill", func() Scenario {
			sc := base(30)
			sc.Source.Concentration, sc.Source.Mass = nil, f(50)
			return sc
		}},
		{"a source of finite mass, drained before the last time", func() Scenario {
			sc := base(40)
			sc.Source.Mass, sc.Source.DepletionExponent = f(20), f(0.5)
			sc.Times = append(sc.Times, 10950)
			return sc
		}},
		{"finite duration, no screening level, feet and years", func() Scenario {
			sc := base(40)
			sc.Source.Duration = f(900)
			sc.Contaminant.ScreeningLevel = nil
			sc.Contaminant.Name = "not in the table"
			sc = toUnits(sc, 0.3048, 365.25, 1e-3)
			sc.Units = Units{Length: "ft", Time: "yr", Concentration: "ug/L"}
			return sc
		}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			sc := tc.sc()
			if len(sc.Methods) == 0 {
				sc.Methods = LayerMethods
			}
			whole := screenOK(t, sc)
			for _, k := range []int{1, 7, 64} {
				rrs, own, tail, head := screenLayer(t, sc, k)
				if got, want := mustJSON(rrs), mustJSON(whole.Receptors); got != want {
					t.Fatalf("chunks of %d: receptors differ from Screen's\n%s", k, firstDiff(got, want))
				}
				after := len(head.Caveats) - countAfter(head)
				caveats := append(append(append([]Caveat(nil), head.Caveats[:after]...), own...), head.Caveats[after:]...)
				if got, want := mustJSON(caveats), mustJSON(receptorsTogether(whole.Caveats, whole.Receptors)); got != want {
					t.Fatalf("chunks of %d: caveats differ\n%s", k, firstDiff(got, want))
				}
				tail.Engine.InputSHA256 = whole.Engine.InputSHA256
				tail.Caveats, tail.Receptors = whole.Caveats, whole.Receptors
				if got, want := mustJSON(tail), mustJSON(*whole); got != want {
					t.Fatalf("chunks of %d: tail differs\n%s", k, firstDiff(got, want))
				}
			}
		})
	}
}

// receptorsTogether is a whole result's caveats with the receptors' own
// (one run of caveats between the result-wide ones) ordered receptor by
// receptor, as a Layer gives them part by part: Model.Screen lists the
// allowances' caveats after every receptor's own.
func receptorsTogether(cs []Caveat, rrs []ReceptorResult) []Caveat {
	cs = append([]Caveat(nil), cs...)
	first, last := -1, -1
	for i, c := range cs {
		if c.ReceptorID != "" {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	if first >= 0 {
		byReceptor(cs[first:last+1], rrs)
	}
	return cs
}

// countAfter is the number of result-wide caveats that follow the
// receptors' own in a whole result (the source mass's and the
// projection's scale caveat).
func countAfter(head Result) int {
	n := 0
	for _, c := range head.Caveats {
		switch c.Code {
		case CaveatCRSScale, CaveatSourceMassInsufficient, CaveatSeparatePhaseLikely:
			n++
		}
	}
	return n
}

// firstDiff shows where two texts first differ.
func firstDiff(a, b string) string {
	i := 0
	for i < len(a) && i < len(b) && a[i] == b[i] {
		i++
	}
	lo := max(0, i-200)
	return fmt.Sprintf("got  ...%s\nwant ...%s", a[lo:min(len(a), i+200)], b[lo:min(len(b), i+200)])
}

// A layer refuses the numeric method (with every other bad field), runs
// exact and domenico when no method is named, and checks each receptor with
// Validate's messages under its own index.
func TestLayerInputs(t *testing.T) {
	sc := demoScenario()
	sc.Methods = []string{"exact", "numeric"}
	sc.Aquifer.EffectivePorosity = f(2)
	_, err := PrepareLayer(sc, Options{})
	fields := FieldsOf(err)
	var names []string
	for _, fe := range fields {
		names = append(names, fe.Field)
	}
	if !reflect.DeepEqual(names, []string{"methods[1]", "aquifer.effective_porosity"}) {
		t.Errorf("fields %v, want methods[1] and aquifer.effective_porosity: %v", names, err)
	}
	sc = demoScenario()
	sc.Methods = nil
	l, err := PrepareLayer(sc, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got := l.EvaluationsPerReceptor(); got != (len(sc.Times)+1)*2 {
		t.Errorf("evaluations per receptor %d", got)
	}
	part, err := l.Screen(context.Background(), 0, sc.Receptors)
	if err != nil {
		t.Fatal(err)
	}
	if s := part.Receptors[0].Series[0]; s.Exact == nil || s.Domenico == nil || s.Numeric != nil {
		t.Errorf("methods run by default: %+v", s)
	}
	for _, tc := range []struct {
		r     Receptor
		field string
	}{
		{Receptor{Y: f(1)}, "receptors[41].x"},
		{Receptor{X: f(1), Y: f(1), Z: f(-1)}, "receptors[41].z"},
		{Receptor{X: f(1), Y: f(1), ScreenTop: f(3), ScreenBottom: f(2)}, "receptors[41].screen_bottom"},
		{Receptor{ID: "a\x01b", X: f(1), Y: f(1)}, "receptors[41].id"},
		{Receptor{Lon: f(10), Lat: f(10)}, "receptors[41].lon"}, // no crs
		{Receptor{X: f(1e308), Y: f(-1e308)}, "receptors[41].x"},
	} {
		err := l.CheckReceptor(41, tc.r)
		if fs := FieldsOf(err); len(fs) == 0 || fs[0].Field != tc.field {
			t.Errorf("%+v: %v, want %s", tc.r, err, tc.field)
		}
	}
	// The same messages as Validate for the same receptor.
	sc.Receptors = []Receptor{{X: f(1), Y: f(1), ScreenTop: f(3), ScreenBottom: f(2)}}
	whole, part1 := FieldsOf(Validate(sc)), FieldsOf(l.CheckReceptor(0, sc.Receptors[0]))
	if !reflect.DeepEqual(whole, part1) {
		t.Errorf("Validate %v, CheckReceptor %v", whole, part1)
	}
}

// A chunk screened after its context ended returns the context's error.
func TestLayerContext(t *testing.T) {
	l, err := PrepareLayer(demoScenario(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := l.Screen(ctx, 0, layerReceptors(5)); err != context.Canceled {
		t.Errorf("err %v", err)
	}
}

// The tally caps the ids it lists per compound and says how many more.
func TestTallyCapsIDs(t *testing.T) {
	sc := chainScenario()
	sc.Receptors = layerReceptors(60)
	res := screenOK(t, sc)
	all := NewTally(-1)
	all.Add(res)
	capped := NewTally(3)
	capped.Add(res)
	a, c := all.summary(res, nil).Text, capped.summary(res, nil).Text
	if a != res.Summary.Text {
		t.Errorf("uncapped tally %q, Screen %q", a, res.Summary.Text)
	}
	if !strings.Contains(c, " more") || len(c) >= len(a) {
		t.Errorf("capped %q", c)
	}
}
