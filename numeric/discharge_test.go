package numeric

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"

	"downgradient/analytic"
)

// TestDischargeWidePlane: the advective discharge through a plane across
// the whole plume equals V W Z C_1D(x, t) (times n_e C0 for a mass rate),
// with C_1D the first-type Ogata-Banks column with the same retardation,
// decay and history (Ogata & Banks 1961, analytic.OgataBanksAt): the
// lateral and vertical parts of the exact solution of the rectangular
// source integrate to W and Z (Wexler 1992; the water table is no-flux).
// With several sources, the sum of Strength V W_i Z_i C_1D(x - X_i).
// Asserted within the 5 % cross-check tolerance where C_1D > 1e-3, on the
// automatic grid coarsened by 2 to keep the test fast (measured worst
// 3.1 %, at the young front; 1.3 % on the default grid). On the face of
// the first source the discharge is the source's own, V W Z Cs (Q C0 for a
// constant source), to 1e-12.
func TestDischargeWidePlane(t *testing.T) {
	inf := math.Inf(1)
	whole := func(x float64) Transect { return Transect{X: x, YMin: -inf, YMax: inf, Top: 0, Bottom: inf} }
	base := Problem3D{V: 1, Dx: 2, Dy: 0.5, Dz: 0.2, R: 1.5, Mu: 0.005, Receptors: []Receptor{{X: 10}},
		Transects: []Transect{whole(10), whole(25), whole(0)}, Times: []float64{10, 20, 40, inf}, Refine: 0.5}
	for _, tc := range []struct {
		name string
		mod  func(*Problem3D)
	}{
		{"one source", func(p *Problem3D) { p.Width, p.Depth = 6, 3 }},
		{"one source switched off", func(p *Problem3D) { p.Width, p.Depth, p.History = 6, 3, History{Duration: 12} }},
		{"two sources, one off the axis", func(p *Problem3D) {
			p.Sources = []SourceFace{{Width: 6, Depth: 3, Strength: 1}, {X: 5, Y: 4, Width: 2, Depth: 2, Strength: 0.5, History: History{Rate: 0.05, Exponent: 1}}}
			p.Times = []float64{20, inf}
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := base
			tc.mod(&p)
			res, err := Screen3D(context.Background(), p)
			if err != nil {
				t.Fatal(err)
			}
			ss := p.Sources
			if len(ss) == 0 {
				ss = []SourceFace{{Width: p.Width, Depth: p.Depth, Strength: 1, History: p.History}}
			}
			ap := analytic.Params{V: p.V, Dx: p.Dx, R: p.R, Mu: p.Mu}
			worst := 0.0
			for q, tr := range p.Transects {
				for k, tt := range p.Times {
					want, scale := 0.0, 0.0
					for _, s := range ss {
						h := analytic.History{Duration: s.History.Duration, Depletion: s.History.Depletion + s.History.Rate}
						flow := s.Strength * p.V * s.Width * s.Depth
						want += flow * analytic.OgataBanksAt(tr.X-s.X, tt, ap, analytic.FirstType, h)
						scale += flow
					}
					got := res.Discharge[q][k]
					if tr.X == 0 {
						// The source's own discharge, V W Z Cs(t).
						h := ss[0].History
						want = ss[0].Strength * p.V * ss[0].Width * ss[0].Depth * h.value(tt)
						if math.IsInf(tt, 1) && !h.fades() {
							want = ss[0].Strength * p.V * ss[0].Width * ss[0].Depth
						}
						if math.Abs(got-want) > 1e-12*scale {
							t.Errorf("on the source face, t=%g: discharge %.17g, V W Z Cs %.17g", tt, got, want)
						}
						continue
					}
					if want > 1e-3*scale {
						rel := math.Abs(got-want) / want
						worst = math.Max(worst, rel)
						if rel > 0.05 {
							t.Errorf("x=%g t=%g: discharge %.6g, V W Z C_1D %.6g (%.3g)", tr.X, tt, got, want, rel)
						}
					} else if got > 2e-3*scale {
						t.Errorf("x=%g t=%g: discharge %.6g where V W Z C_1D is %.3g", tr.X, tt, got, want)
					}
				}
			}
			t.Logf("worst relative difference %.3g (%d x %d x %d cells)", worst, res.Grid.NX, res.Grid.NY, res.Grid.NZ)
		})
	}
}

// TestDischargeRectangle: the discharge through finite rectangles (one
// across part of the plume, off the axis; one straddling the axis) against
// V times the integral over the rectangle of the exact solution
// (analytic.Exact3DAt, Wexler 1992), by 24 x 24-point Gauss-Legendre
// quadrature (gonum integrate/quad) on each piece between the source
// edges; within the 5 % cross-check tolerance (measured worst 1.6 %, on
// the automatic grid coarsened by 2).
func TestDischargeRectangle(t *testing.T) {
	p := Problem3D{V: 1, Dx: 2, Dy: 0.5, Dz: 0.2, R: 1.5, Mu: 0.005, Width: 6, Depth: 3,
		Receptors: []Receptor{{X: 10}},
		Transects: []Transect{{X: 15, YMin: 1, YMax: 4.5, Top: 1, Bottom: 2.5}, {X: 10, YMin: -2, YMax: 3, Top: 0, Bottom: 4}},
		Times:     []float64{20, math.Inf(1)}, Refine: 0.5}
	res, err := Screen3D(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	ap := analytic.Params{V: p.V, Dx: p.Dx, Dy: p.Dy, Dz: p.Dz, R: p.R, Mu: p.Mu}
	src := analytic.Source{Width: p.Width, Depth: p.Depth}
	worst := 0.0
	for q, tr := range p.Transects {
		for k, tt := range p.Times {
			want := p.V * integrate2(tr.YMin, tr.YMax, []float64{-3, 3}, tr.Top, tr.Bottom, []float64{3}, func(y, z float64) float64 {
				return analytic.Exact3DAt(analytic.Point{X: tr.X, Y: y, Top: z, Bottom: z}, tt, ap, src, analytic.History{})
			})
			rel := math.Abs(res.Discharge[q][k]-want) / want
			worst = math.Max(worst, rel)
			if rel > 0.05 {
				t.Errorf("%+v t=%g: discharge %.6g, quadrature of the exact solution %.6g (%.3g)", tr, tt, res.Discharge[q][k], want, rel)
			}
		}
	}
	t.Logf("worst relative difference %.3g", worst)
}

// integrate2 is the integral of f over [y0, y1] x [z0, z1] by
// Gauss-Legendre quadrature on each piece between the break points.
func integrate2(y0, y1 float64, yb []float64, z0, z1 float64, zb []float64, f func(y, z float64) float64) float64 {
	pieces := func(a, b float64, br []float64) [][2]float64 {
		var ps [][2]float64
		lo := a
		for _, x := range br {
			if x > lo && x < b {
				ps = append(ps, [2]float64{lo, x})
				lo = x
			}
		}
		return append(ps, [2]float64{lo, b})
	}
	total := 0.0
	for _, py := range pieces(y0, y1, yb) {
		for _, pz := range pieces(z0, z1, zb) {
			total += quad.Fixed(func(y float64) float64 {
				return quad.Fixed(func(z float64) float64 { return f(y, z) }, pz[0], pz[1], 24, quad.Legendre{}, 0)
			}, py[0], py[1], 24, quad.Legendre{}, 0)
		}
	}
	return total
}

// TestDischargeInvalid: bad transects are refused naming the field.
func TestDischargeInvalid(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	for _, tc := range []struct {
		tr    Transect
		field string
	}{
		{Transect{X: -1, YMin: -1, YMax: 1, Bottom: 1}, "Problem3D.Transects[0].X"},
		{Transect{X: nan, YMin: -1, YMax: 1, Bottom: 1}, "Problem3D.Transects[0].X"},
		{Transect{X: inf, YMin: -1, YMax: 1, Bottom: 1}, "Problem3D.Transects[0].X"},
		{Transect{X: 5, YMin: 1, YMax: 1, Bottom: 1}, "Problem3D.Transects[0].YMax"},
		{Transect{X: 5, YMin: nan, YMax: 1, Bottom: 1}, "Problem3D.Transects[0].YMax"},
		{Transect{X: 5, YMin: -1, YMax: 1, Top: -1, Bottom: 1}, "Problem3D.Transects[0].Top"},
		{Transect{X: 5, YMin: -1, YMax: 1, Top: 2, Bottom: 2}, "Problem3D.Transects[0].Bottom"},
		{Transect{X: 5, YMin: -1, YMax: 1, Top: 0, Bottom: nan}, "Problem3D.Transects[0].Bottom"},
	} {
		p := goodProblem3D()
		p.Transects = []Transect{tc.tr}
		_, err := Screen3D(context.Background(), p)
		if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), tc.field) {
			t.Errorf("%+v: error %v, want ErrInvalid naming %s", tc.tr, err, tc.field)
		}
	}
	p := goodProblem3D()
	p.Grid = &Grid3D{X: UniformAxis(120, 12), Y: UniformAxis(20, 4), Z: UniformAxis(10, 5)}
	p.Transects = []Transect{{X: 130, YMin: -1, YMax: 1, Bottom: 1}}
	if _, err := Screen3D(context.Background(), p); !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), "Problem3D.Transects[0].X") {
		t.Errorf("transect beyond the given grid: %v", err)
	}
	p.Sources = []SourceFace{{Width: 15, Depth: 3, Strength: 1}}
	p.Width, p.Depth = 0, 0
	if _, err := Screen3D(context.Background(), p); !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), "Problem3D.Transects[0].X") {
		t.Errorf("transect beyond the given grid, with Sources: %v", err)
	}
}
