package plume

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"math"
	"slices"
	"testing"

	"downgradient/analytic"
	"downgradient/internal/plumetest"
)

func screenOK(t *testing.T, sc Scenario) *Result {
	t.Helper()
	r, err := Screen(context.Background(), sc, Options{EngineVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// The service's values are the closed forms' at the same inputs: the demo's
// parameters are worked out by hand here (Darcy, Freeze & Cherry R, ln 2 /
// half-life) and passed straight to package analytic.
func TestScreenEqualsAnalytic(t *testing.T) {
	v := 8.6 * 0.004 / 0.28
	p := analytic.Params{V: v, Dx: 10 * v, Dy: 1 * v, Dz: 0.1 * v, R: 1 + 1.75*60*0.001/0.28, Mu: math.Ln2 / 720}
	src := analytic.Source{Width: 15, Depth: 3}
	pts := []analytic.Point{{X: 210, Y: 6, Top: 2, Bottom: 2}, {X: 60, Y: -3, Top: 1, Bottom: 5}}
	r := screenOK(t, demoScenario())
	for i, rr := range r.Receptors {
		for j, sp := range rr.Series {
			// Values below the documented floor are reported as 0.
			fl := r.Derived.ConcentrationFloor
			e := FloorConcentration(12*analytic.Exact3DAt(pts[i], sp.Time, p, src, analytic.History{}), fl)
			d := FloorConcentration(12*analytic.DomenicoAt(pts[i], sp.Time, p, src, analytic.History{}), fl)
			if relErr(*sp.Exact, e) > 1e-13 || relErr(*sp.Domenico, d) > 1e-13 {
				t.Errorf("%s[%d]: got %g %g, want %g %g", rr.ID, j, *sp.Exact, *sp.Domenico, e, d)
			}
		}
		inf := math.Inf(1)
		e := 12 * analytic.Exact3DAt(pts[i], inf, p, src, analytic.History{})
		if relErr(*rr.SteadyState.Exact, e) > 1e-13 {
			t.Errorf("%s steady: got %g, want %g", rr.ID, *rr.SteadyState.Exact, e)
		}
		// A constant continuous source rises monotonically: its peak is the steady state.
		if rr.Peak.Time != nil || rr.Peak.Concentration != *rr.SteadyState.Exact {
			t.Errorf("%s peak %+v", rr.ID, rr.Peak)
		}
		// First exceedance: C(t) equals the screening level there.
		if rr.FirstExceedanceTime == nil {
			t.Fatalf("%s: no exceedance", rr.ID)
		}
		te := *rr.FirstExceedanceTime
		if c := 12 * analytic.Exact3DAt(pts[i], te, p, src, analytic.History{}); relErr(c, 0.005) > 1e-6 {
			t.Errorf("%s: C(%g) = %g, want 0.005", rr.ID, te, c)
		}
	}
}

func TestScreenOtherSources(t *testing.T) {
	v := 0.25
	p := analytic.Params{V: v, Dx: 2 * v, Dy: 0.2 * v, Dz: 0.02 * v, R: 2, Mu: math.Ln2 / 1000}
	base := func() Scenario {
		return Scenario{
			Aquifer:     Aquifer{SeepageVelocity: f(v), EffectivePorosity: f(0.3), Dispersivity: &Dispersivity{f(2), f(0.2), f(0.02)}},
			Contaminant: Contaminant{Retardation: f(2), HalfLife: f(1000), ScreeningLevel: f(0.01)},
			Source:      Source{Concentration: f(5)},
			Receptors:   []Receptor{{ID: "A", X: f(40), Y: f(0)}, {ID: "B", X: f(120), Y: f(2), Z: f(1)}},
			Times:       []float64{50, 200, 800},
			Methods:     []string{MethodExact},
		}
	}
	tests := []struct {
		name string
		edit func(*Scenario)
		want func(x, y, z, tau float64) float64
	}{
		{"1D concentration inlet", nil, func(x, y, z, tau float64) float64 {
			return 5 * analytic.OgataBanksAt(x, tau, p, analytic.FirstType, analytic.History{Duration: math.Inf(1)})
		}},
		{"1D flux inlet", func(s *Scenario) { s.Source.Inlet = InletFlux }, func(x, y, z, tau float64) float64 {
			return 5 * analytic.OgataBanksAt(x, tau, p, analytic.ThirdType, analytic.History{Duration: math.Inf(1)})
		}},
		{"3D finite duration, started later", func(s *Scenario) {
			s.Source.Width, s.Source.Depth, s.Source.Duration, s.Source.Start = f(10), f(2), f(150), f(20)
		}, func(x, y, z, tau float64) float64 {
			return 5 * analytic.Exact3DAt(analytic.Point{X: x, Y: y, Top: z, Bottom: z}, tau-20, p,
				analytic.Source{Width: 10, Depth: 2}, analytic.History{Duration: 150})
		}},
		{"3D depleting", func(s *Scenario) {
			s.Source.Width, s.Source.Depth, s.Source.HalfLife = f(10), f(2), f(300)
		}, func(x, y, z, tau float64) float64 {
			return 5 * analytic.Exact3DAt(analytic.Point{X: x, Y: y, Top: z, Bottom: z}, tau, p,
				analytic.Source{Width: 10, Depth: 2}, analytic.History{Duration: math.Inf(1), Depletion: math.Ln2 / 300})
		}},
		{"instantaneous mass", func(s *Scenario) {
			s.Source.Concentration, s.Source.Mass, s.Source.ReleaseDepth = nil, f(2), f(0.5)
		}, func(x, y, z, tau float64) float64 {
			// 2 kg = 2000 g; g/m^3 = mg/L.
			return analytic.Puff3D(x, y, z, tau, p, 2000, 0.3, 0.5)
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sc := base()
			if tc.edit != nil {
				tc.edit(&sc)
			}
			r := screenOK(t, sc)
			for i, rr := range r.Receptors {
				rc := sc.Receptors[i]
				z := 0.0
				if rc.Z != nil {
					z = *rc.Z
				}
				for _, sp := range rr.Series {
					// Values below the documented floor are reported as 0.
					want := FloorConcentration(tc.want(*rc.X, *rc.Y, z, sp.Time), r.Derived.ConcentrationFloor)
					if relErr(*sp.Exact, want) > 1e-13 {
						t.Errorf("%s t=%g: got %g, want %g", rr.ID, sp.Time, *sp.Exact, want)
					}
				}
				if sc.Source.Duration == nil && sc.Source.HalfLife == nil && sc.Source.Mass == nil {
					continue
				}
				// Transient source: steady state 0, peak against a dense scan.
				if *rr.SteadyState.Exact != 0 || rr.Peak.Time == nil {
					t.Fatalf("%s: steady %g peak %+v", rr.ID, *rr.SteadyState.Exact, rr.Peak)
				}
				best, bestT := 0.0, 0.0
				for k := 1; k <= 4000; k++ {
					tt := float64(k) * 2
					if c := tc.want(*rc.X, *rc.Y, z, tt); c > best {
						best, bestT = c, tt
					}
				}
				if rr.Peak.Concentration < best*(1-1e-12) || rr.Peak.Concentration > best*(1+1e-3) {
					t.Errorf("%s: peak %g at %g, scan %g at %g", rr.ID, rr.Peak.Concentration, *rr.Peak.Time, best, bestT)
				}
				if got := tc.want(*rc.X, *rc.Y, z, *rr.Peak.Time); relErr(got, rr.Peak.Concentration) > 1e-12 {
					t.Errorf("%s: peak value %g != C(peak time) %g", rr.ID, rr.Peak.Concentration, got)
				}
				if rr.FirstExceedanceTime != nil {
					te := *rr.FirstExceedanceTime
					if c := tc.want(*rc.X, *rc.Y, z, te); relErr(c, 0.01) > 1e-6 {
						t.Errorf("%s: C(first exceedance %g) = %g, want 0.01", rr.ID, te, c)
					}
					for k := 1; float64(k)*0.5 < te*(1-1e-9); k++ {
						if c := tc.want(*rc.X, *rc.Y, z, float64(k)*0.5); c >= 0.01 {
							t.Fatalf("%s: C(%g) = %g already above the level before %g", rr.ID, float64(k)*0.5, c, te)
						}
					}
				}
				if rr.ExceedsScreeningLevel == nil || *rr.ExceedsScreeningLevel != (rr.Peak.Concentration >= 0.01) {
					t.Errorf("%s: flag %v with peak %g", rr.ID, rr.ExceedsScreeningLevel, rr.Peak.Concentration)
				}
			}
		})
	}
}

// The same scenario in feet, years and ug/L gives the same answers,
// converted (1 ft = 0.3048 m exactly, NIST SP 811; 1 yr = 365.25 d).
func TestScreenUnitsEquivalent(t *testing.T) {
	variants := []struct {
		name string
		edit func(*Scenario)
	}{
		{"3D continuous", nil},
		{"3D finite duration, estimated dispersivity, diffusion", func(s *Scenario) {
			s.Source.Duration = f(900)
			s.Aquifer.Dispersivity = nil
			s.Aquifer.EffectiveDiffusion = f(1e-5)
		}},
		{"1D flux", func(s *Scenario) { s.Source.Width, s.Source.Depth, s.Source.Inlet = nil, nil, InletFlux }},
		{"spill", func(s *Scenario) {
			s.Source.Concentration, s.Source.Width, s.Source.Depth, s.Source.Mass = nil, nil, nil, f(3)
		}},
	}
	const L, T, C = 0.3048, 365.25, 0.001
	for _, vt := range variants {
		t.Run(vt.name, func(t *testing.T) {
			m := demoScenario()
			m.Source.X, m.Source.Y, m.Source.FlowAzimuthDeg = f(30), f(-20), f(70)
			if vt.edit != nil {
				vt.edit(&m)
			}
			ft := toUnits(m, L, T, C)
			ft.Units = Units{Length: "ft", Time: "yr", Concentration: "ug/L"}
			rm, rf := screenOK(t, m), screenOK(t, ft)
			if want := (Units{Length: "ft", Time: "yr", Concentration: "ug/L", Conductivity: "ft/yr", MassDischarge: "kg/yr"}); rf.Units != want {
				t.Errorf("units not echoed: %+v", rf.Units)
			}
			near := func(what string, gotFt, wantM, k, tol float64) {
				t.Helper()
				if e := relErr(gotFt*k, wantM); e > tol && math.Abs(gotFt*k-wantM) > 1e-300 {
					t.Errorf("%s: %g (converted %g) vs %g, rel err %.2g", what, gotFt, gotFt*k, wantM, e)
				}
			}
			dm, df := rm.Derived, rf.Derived
			near("velocity", df.SeepageVelocity, dm.SeepageVelocity, L/T, 1e-12)
			near("decay rate", df.DecayRate, dm.DecayRate, 1/T, 1e-12)
			if dm.Dispersivity != nil {
				near("alpha_L", df.Dispersivity.Longitudinal, dm.Dispersivity.Longitudinal, L, 1e-12)
				near("D_x", df.Dispersion.Longitudinal, dm.Dispersion.Longitudinal, L*L/T, 1e-12)
			}
			for i, a := range rm.Receptors {
				if a.Dispersivity != nil {
					near("receptor alpha_L", rf.Receptors[i].Dispersivity.Longitudinal, a.Dispersivity.Longitudinal, L, 1e-12)
				}
			}
			for i := range rm.Receptors {
				a, b := rm.Receptors[i], rf.Receptors[i]
				near("plume_x", b.PlumeX, a.PlumeX, L, 1e-12)
				near("plume_y", b.PlumeY, a.PlumeY, L, 1e-12)
				for j := range a.Series {
					near("time", b.Series[j].Time, a.Series[j].Time, T, 1e-15)
					near("exact", *b.Series[j].Exact, *a.Series[j].Exact, C, 1e-9)
					if a.Series[j].Domenico != nil {
						near("domenico", *b.Series[j].Domenico, *a.Series[j].Domenico, C, 1e-9)
					}
				}
				near("steady", *b.SteadyState.Exact, *a.SteadyState.Exact, C, 1e-9)
				near("peak", b.Peak.Concentration, a.Peak.Concentration, C, 1e-9)
				if (a.Peak.Time == nil) != (b.Peak.Time == nil) {
					t.Fatalf("peak time %v vs %v", a.Peak.Time, b.Peak.Time)
				}
				if a.Peak.Time != nil {
					// The location of a smooth maximum is determined only to
					// about sqrt(machine epsilon) relative; 1e-6 allows for it.
					near("peak time", *b.Peak.Time, *a.Peak.Time, T, 1e-6)
				}
				if (a.FirstExceedanceTime == nil) != (b.FirstExceedanceTime == nil) {
					t.Fatalf("exceedance %v vs %v", a.FirstExceedanceTime, b.FirstExceedanceTime)
				}
				if a.FirstExceedanceTime != nil {
					near("first exceedance", *b.FirstExceedanceTime, *a.FirstExceedanceTime, T, 1e-6)
				}
				if (a.ExceedsScreeningLevel == nil) != (b.ExceedsScreeningLevel == nil) || a.ExceedsScreeningLevel != nil && *a.ExceedsScreeningLevel != *b.ExceedsScreeningLevel {
					t.Errorf("flags differ")
				}
			}
			if len(rm.Caveats) != len(rf.Caveats) {
				t.Errorf("caveats differ: %d vs %d", len(rm.Caveats), len(rf.Caveats))
			}
		})
	}
}

// toUnits expresses a scenario given in m, d, mg/L in other units (factors
// to canonical L, T, C).
func toUnits(sc Scenario, L, T, C float64) Scenario {
	b, _ := json.Marshal(sc)
	var out Scenario
	_ = json.Unmarshal(b, &out)
	div := func(p *float64, k float64) {
		if p != nil {
			*p /= k
		}
	}
	a := &out.Aquifer
	div(a.HydraulicConductivity, L/T)
	div(a.SeepageVelocity, L/T)
	div(a.EffectiveDiffusion, L*L/T)
	if d := a.Dispersivity; d != nil {
		div(d.Longitudinal, L)
		div(d.Transverse, L)
		div(d.Vertical, L)
	}
	c := &out.Contaminant
	div(c.HalfLife, T)
	div(c.ScreeningLevel, C)
	div(c.Solubility, C)
	s := &out.Source
	for _, p := range []*float64{s.X, s.Y, s.Width, s.Depth, s.ReleaseDepth} {
		div(p, L)
	}
	for _, p := range []*float64{s.Start, s.Duration, s.HalfLife} {
		div(p, T)
	}
	div(s.Concentration, C)
	for i := range out.Receptors {
		r := &out.Receptors[i]
		for _, p := range []*float64{r.X, r.Y, r.Z, r.ScreenTop, r.ScreenBottom} {
			div(p, L)
		}
	}
	for i := range out.Times {
		out.Times[i] /= T
	}
	return out
}

// Rotating the site and the flow azimuth together changes nothing.
func TestScreenRotationInvariant(t *testing.T) {
	base := demoScenario()
	base.Times = append(base.Times, 0, 20000)
	r0 := screenOK(t, base)
	for _, phi := range []float64{30, 90, 180, 233.7, -45} {
		sc := demoScenario()
		sc.Times = base.Times
		s, c := math.Sincos(phi * math.Pi / 180)
		rot := func(x, y *float64) (*float64, *float64) {
			return f(*x*c + *y*s), f(-*x*s + *y*c) // clockwise by phi about the origin
		}
		sc.Source.X, sc.Source.Y = rot(f(12), f(-7))
		base2 := base
		base2.Source.X, base2.Source.Y = f(12), f(-7)
		for i := range sc.Receptors {
			x, y := *base.Receptors[i].X+12, *base.Receptors[i].Y-7
			sc.Receptors[i].X, sc.Receptors[i].Y = rot(&x, &y)
		}
		sc.Source.FlowAzimuthDeg = f(90 + phi)
		r := screenOK(t, sc)
		for i := range r.Receptors {
			a, b := r0.Receptors[i], r.Receptors[i]
			if math.Abs(a.PlumeX-b.PlumeX) > 1e-9 || math.Abs(a.PlumeY-b.PlumeY) > 1e-9 {
				t.Errorf("phi %g: plume position (%g,%g) vs (%g,%g)", phi, a.PlumeX, a.PlumeY, b.PlumeX, b.PlumeY)
			}
			for j := range a.Series {
				if relErr(*b.Series[j].Exact, *a.Series[j].Exact) > 1e-9 {
					t.Errorf("phi %g: exact %g vs %g", phi, *b.Series[j].Exact, *a.Series[j].Exact)
				}
			}
		}
	}
}

func TestScreenCaveats(t *testing.T) {
	type want struct{ code, severity, receptor string }
	tests := []struct {
		name string
		edit func(*Scenario)
		want []want
	}{
		{"demo", nil, []want{
			{CaveatScreeningEstimate, SeverityCaution, ""},
			{CaveatDecayConvention, SeverityNote, ""},
			{CaveatDomenicoDeviation, SeverityWarning, "W-4"},
		}},
		{"no decay", func(s *Scenario) { s.Contaminant.HalfLife = nil }, []want{{CaveatDecayConvention, SeverityNote, ""}}},
		{"estimated dispersivity", func(s *Scenario) { s.Aquifer.Dispersivity = nil }, []want{{CaveatDispersivityEstimated, SeverityCaution, ""}}},
		{"above solubility", func(s *Scenario) { s.Source.Concentration = f(2000) }, []want{{CaveatAboveSolubility, SeverityWarning, ""}}},
		{"upgradient and inside", func(s *Scenario) {
			s.Receptors = append(s.Receptors, Receptor{ID: "UP", X: f(-50), Y: f(30)}, Receptor{ID: "IN", X: f(-2), Y: f(3)})
		}, []want{{CaveatReceptorUpgradient, SeverityWarning, "UP"}, {CaveatReceptorInsideSource, SeverityWarning, "IN"}}},
		{"slow velocity", func(s *Scenario) { s.Aquifer.HydraulicConductivity = f(1e-4) }, []want{{CaveatImplausibleVelocity, SeverityCaution, ""}}},
		{"fast velocity", func(s *Scenario) { s.Aquifer.SeepageVelocity = f(50) }, []want{{CaveatImplausibleVelocity, SeverityCaution, ""}}},
		{"deep receptor", func(s *Scenario) {
			s.Receptors = append(s.Receptors, Receptor{ID: "DEEP", X: f(50), Y: f(0), ScreenTop: f(40), ScreenBottom: f(45)})
		}, []want{{CaveatBelowPlumeReach, SeverityCaution, "DEEP"}}},
		{"no screening level", func(s *Scenario) { s.Contaminant.Name, s.Contaminant.ScreeningLevel = "", nil }, []want{{CaveatNoScreeningLevel, SeverityWarning, ""}}},
		{"table values", func(s *Scenario) { s.Contaminant.ScreeningLevel = nil }, []want{{CaveatReferenceValues, SeverityNote, ""}}},
		{"spill", func(s *Scenario) { s.Source.Concentration, s.Source.Mass = nil, f(1) }, []want{
			{CaveatMethodNotApplicable, SeverityNote, ""}, {CaveatGeometryIgnored, SeverityNote, ""},
		}},
		{"1D column off axis", func(s *Scenario) { s.Source.Width, s.Source.Depth = nil, nil }, []want{{CaveatOneDimensional, SeverityNote, ""}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sc := demoScenario()
			if tc.edit != nil {
				tc.edit(&sc)
			}
			r := screenOK(t, sc)
			if r.Caveats[0].Code != CaveatScreeningEstimate {
				t.Errorf("first caveat %q, want the general caution", r.Caveats[0].Code)
			}
			for _, w := range tc.want {
				if !slices.ContainsFunc(r.Caveats, func(c Caveat) bool {
					return c.Code == w.code && c.Severity == w.severity && c.ReceptorID == w.receptor && c.Message != ""
				}) {
					t.Errorf("missing %+v in %+v", w, r.Caveats)
				}
			}
		})
	}
}

func TestScreenReceptorsOutsideTheModel(t *testing.T) {
	sc := demoScenario()
	sc.Receptors = []Receptor{{ID: "UP", X: f(-50), Y: f(30)}, {ID: "IN", X: f(-2), Y: f(3)}}
	r := screenOK(t, sc)
	up, in := r.Receptors[0], r.Receptors[1]
	// Not modelled: no comparison is made (issue 11: nothing reads as clean
	// unless it was modelled and compared).
	if *up.SteadyState.Exact != 0 || up.Peak.Concentration != 0 || up.ExceedsScreeningLevel != nil || up.Status != StatusUpgradient {
		t.Errorf("upgradient: %+v", up)
	}
	if *in.SteadyState.Exact != 12 || *in.Series[0].Exact != 12 || in.Peak.Concentration != 12 || *in.FirstExceedanceTime != 0 || in.Status != StatusInsideSource || in.ExceedsScreeningLevel == nil || !*in.ExceedsScreeningLevel {
		t.Errorf("inside: %+v", in)
	}
}

func TestScreenInputHash(t *testing.T) {
	sc := demoScenario()
	b, _ := json.Marshal(sc)
	sum := sha256.Sum256(b)
	r := screenOK(t, sc)
	if r.Engine.InputSHA256 != hex.EncodeToString(sum[:]) || r.Engine.Version != "test" {
		t.Errorf("engine %+v", r.Engine)
	}
	sc.Times[0]++
	if InputSHA256(sc) == r.Engine.InputSHA256 {
		t.Error("hash unchanged by a changed input")
	}
}

func TestScreenContext(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Screen(ctx, demoScenario(), Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("got %v, want context.Canceled", err)
	}
}

func TestScreenValidationError(t *testing.T) {
	sc := demoScenario()
	sc.Aquifer.EffectivePorosity = f(0)
	_, err := Screen(context.Background(), sc, Options{})
	fe := FieldsOf(err)
	if len(fe) == 0 || fe[0].Field != "aquifer.effective_porosity" {
		t.Errorf("got %v", err)
	}
}

// f is a test shorthand for a *float64.
func f(v float64) *float64 { return &v }

// demoScenario is the invented demo of package plumetest.
func demoScenario() Scenario {
	var sc Scenario
	if err := json.Unmarshal([]byte(plumetest.DemoJSON), &sc); err != nil {
		panic(err)
	}
	return sc
}

func mustJSON(v any) string {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		panic(err)
	}
	return string(b)
}

// Issue 11: a disagreement between the numeric cross-check and the exact
// solution counts only where either value matters relative to the screening
// level (ComparisonLevelFraction of it): 89 % between 4e-6 and 4.8e-5 mg/L
// against a 0.005 mg/L level is noise, not a finding.
func TestNumericDisagreementOnlyWhereItMatters(t *testing.T) {
	md, err := Prepare(demoScenario())
	if err != nil {
		t.Fatal(err)
	}
	m := md.m
	pts := md.Receptors()[:1]
	for _, tc := range []struct {
		exact, numeric float64
		caveat         bool
	}{
		{4e-6, 4.8e-5, false},   // both below 10 % of the level
		{4e-6, 6e-4, true},      // the numeric value reaches 12 % of the level
		{0.0100, 0.0102, false}, // 2 % apart: within the 5 % tolerance
		{0.0100, 0.0120, true},  // 20 % apart above the level
	} {
		res := &Result{Receptors: []ReceptorResult{{ID: pts[0].ID, Series: []SeriesPoint{{Time: 1, Exact: Ptr(tc.exact)}}}}}
		nr := &numericRun{values: [][]float64{{tc.numeric}}}
		m.attachNumeric(res, nr, pts, []float64{1}, []float64{1}, m.comparisonFloor(), DefaultNumericTolerance)
		got := false
		for _, c := range res.Caveats {
			got = got || c.Code == CaveatNumericDisagreement
		}
		if got != tc.caveat {
			t.Errorf("exact %g numeric %g: caveat %v, want %v", tc.exact, tc.numeric, got, tc.caveat)
		}
	}
}
