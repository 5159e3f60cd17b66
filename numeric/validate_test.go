package numeric

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
	"time"
)

func goodProblem3D() Problem3D {
	return Problem3D{V: 0.1, Dx: 1, Dy: 0.1, Dz: 0.01, R: 1, Width: 15, Depth: 3,
		Receptors: []Receptor{{X: 100}}, Times: []float64{365}}
}

// TestInvalidInput: bad input returns an error that wraps ErrInvalid (or
// ErrBudget) and names the field.
func TestInvalidInput(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases3 := []struct {
		name  string
		mod   func(*Problem3D)
		field string
		kind  error
	}{
		{"NaN velocity", func(p *Problem3D) { p.V = nan }, "Problem3D.V", ErrInvalid},
		{"zero velocity", func(p *Problem3D) { p.V = 0 }, "Problem3D.V", ErrInvalid},
		{"negative Dy", func(p *Problem3D) { p.Dy = -1 }, "Problem3D.Dy", ErrInvalid},
		{"infinite Dz", func(p *Problem3D) { p.Dz = inf }, "Problem3D.Dz", ErrInvalid},
		{"R below 1", func(p *Problem3D) { p.R = 0.5 }, "Problem3D.R", ErrInvalid},
		{"negative decay", func(p *Problem3D) { p.Mu = -0.1 }, "Problem3D.Mu", ErrInvalid},
		{"zero width", func(p *Problem3D) { p.Width = 0 }, "Problem3D.Width", ErrInvalid},
		{"NaN depth", func(p *Problem3D) { p.Depth = nan }, "Problem3D.Depth", ErrInvalid},
		{"negative duration", func(p *Problem3D) { p.History.Duration = -1 }, "Problem3D.History.Duration", ErrInvalid},
		{"no receptors", func(p *Problem3D) { p.Receptors = nil }, "Problem3D.Receptors", ErrInvalid},
		{"upgradient receptor", func(p *Problem3D) { p.Receptors = append(p.Receptors, Receptor{X: -5}) }, "Problem3D.Receptors[1].X = -5", ErrInvalid},
		{"NaN receptor", func(p *Problem3D) { p.Receptors[0].Y = nan }, "Problem3D.Receptors[0].Y", ErrInvalid},
		{"inverted screen", func(p *Problem3D) { p.Receptors[0] = Receptor{X: 5, Top: 4, Bottom: 2} }, "Problem3D.Receptors[0].Bottom", ErrInvalid},
		{"no times", func(p *Problem3D) { p.Times = nil }, "Problem3D.Times", ErrInvalid},
		{"descending times", func(p *Problem3D) { p.Times = []float64{10, 5} }, "Problem3D.Times[1]", ErrInvalid},
		{"NaN time", func(p *Problem3D) { p.Times = []float64{nan} }, "Problem3D.Times[0]", ErrInvalid},
		{"Courant above 1", func(p *Problem3D) { p.Courant = 1.5 }, "Problem3D.Courant", ErrInvalid},
		{"negative budget", func(p *Problem3D) { p.CellBudget = -3 }, "Problem3D.CellBudget", ErrInvalid},
		{"negative work budget", func(p *Problem3D) { p.WorkBudget = -1 }, "Problem3D.WorkBudget", ErrInvalid},
		{"NaN work budget", func(p *Problem3D) { p.WorkBudget = nan }, "Problem3D.WorkBudget", ErrInvalid},
		{"infinite work budget", func(p *Problem3D) { p.WorkBudget = inf }, "Problem3D.WorkBudget", ErrInvalid},
		{"work budget exceeded", func(p *Problem3D) { p.WorkBudget = 1000 }, "Problem3D.WorkBudget", ErrWorkBudget},
		{"zero cells", func(p *Problem3D) {
			p.Grid = &Grid3D{X: Axis{Faces: []float64{0}}, Y: UniformAxis(10, 5), Z: UniformAxis(5, 5)}
		}, "Problem3D.Grid.X", ErrInvalid},
		{"non-positive spacing", func(p *Problem3D) {
			p.Grid = &Grid3D{X: Axis{Faces: []float64{0, 50, 50, 200}}, Y: UniformAxis(10, 5), Z: UniformAxis(5, 5)}
		}, "Problem3D.Grid.X.Faces[2]", ErrInvalid},
		{"NaN face", func(p *Problem3D) {
			p.Grid = &Grid3D{X: UniformAxis(200, 5), Y: Axis{Faces: []float64{0, nan, 10}}, Z: UniformAxis(5, 5)}
		}, "Problem3D.Grid.Y.Faces[1]", ErrInvalid},
		{"grid short of receptor", func(p *Problem3D) {
			p.Grid = &Grid3D{X: UniformAxis(50, 5), Y: UniformAxis(10, 5), Z: UniformAxis(5, 5)}
		}, "Problem3D.Grid.X", ErrInvalid},
		{"budget exceeded", func(p *Problem3D) { p.CellBudget = 1000 }, "Problem3D.CellBudget", ErrBudget},
	}
	for _, tc := range cases3 {
		t.Run(tc.name, func(t *testing.T) {
			p := goodProblem3D()
			tc.mod(&p)
			res, err := Screen3D(context.Background(), p)
			if err == nil || res != nil {
				t.Fatalf("want an error, got %v, %v", res, err)
			}
			if !errors.Is(err, tc.kind) {
				t.Errorf("error %q does not wrap %v", err, tc.kind)
			}
			if !strings.Contains(err.Error(), tc.field) {
				t.Errorf("error %q does not name %s", err, tc.field)
			}
		})
	}
	cases1 := []struct {
		name  string
		mod   func(*Problem1D)
		field string
		kind  error
	}{
		{"NaN Dx", func(p *Problem1D) { p.Dx = nan }, "Problem1D.Dx", ErrInvalid},
		{"Dm above Dx", func(p *Problem1D) { p.Dm = 2 }, "Problem1D.Dm", ErrInvalid},
		{"bad inlet", func(p *Problem1D) { p.Inlet = 7 }, "Problem1D.Inlet", ErrInvalid},
		{"negative receptor", func(p *Problem1D) { p.Receptors = []float64{-1} }, "Problem1D.Receptors[0]", ErrInvalid},
		{"negative area", func(p *Problem1D) { p.Area = func(x float64) float64 { return 1 - x } }, "Problem1D.Area", ErrInvalid},
		{"non-positive spacing", func(p *Problem1D) { p.Grid = Axis{Faces: []float64{0, 1, 0.5, 20}} }, "Problem1D.Grid.Faces[2]", ErrInvalid},
		{"zero cells", func(p *Problem1D) { p.Grid = Axis{Faces: []float64{0}} }, "Problem1D.Grid", ErrInvalid},
		{"PecletMax zero-range", func(p *Problem1D) { p.PecletMax = -2 }, "Problem1D.PecletMax", ErrInvalid},
		{"budget exceeded", func(p *Problem1D) { p.CellBudget = 10 }, "Problem1D.CellBudget", ErrBudget},
		{"work budget above 1e15", func(p *Problem1D) { p.WorkBudget = 2e15 }, "Problem1D.WorkBudget", ErrInvalid},
		{"work budget exceeded", func(p *Problem1D) { p.WorkBudget = 10 }, "Problem1D.WorkBudget", ErrWorkBudget},
	}
	for _, tc := range cases1 {
		t.Run(tc.name, func(t *testing.T) {
			p := Problem1D{V: 1, Dx: 1, R: 1, Receptors: []float64{5}, Times: []float64{10}}
			tc.mod(&p)
			_, err := Screen1D(context.Background(), p)
			if err == nil {
				t.Fatal("want an error")
			}
			if !errors.Is(err, tc.kind) {
				t.Errorf("error %q does not wrap %v", err, tc.kind)
			}
			if !strings.Contains(err.Error(), tc.field) {
				t.Errorf("error %q does not name %s", err, tc.field)
			}
		})
	}
}

// TestBudgetMessage: the budget error says what the budget fits.
func TestBudgetMessage(t *testing.T) {
	p := goodProblem3D()
	p.CellBudget = 5000
	_, err := Screen3D(context.Background(), p)
	if !errors.Is(err, ErrBudget) {
		t.Fatalf("want ErrBudget, got %v", err)
	}
	for _, want := range []string{"budget is 5000", "a budget of 5000 fits grid Peclet <="} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("message %q lacks %q", err, want)
		}
	}
	t.Log(err)
}

// TestContextStops: a cancelled or expired context stops the run with an
// error wrapping ctx.Err().
func TestContextStops(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Screen3D(ctx, goodProblem3D()); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: got %v", err)
	}
	ctx2, cancel2 := context.WithTimeout(context.Background(), 20*time.Millisecond)
	defer cancel2()
	p := goodProblem3D()
	p.Times = []float64{3650}
	p.Refine = 3
	if _, err := Screen3D(ctx2, p); !errors.Is(err, context.DeadlineExceeded) {
		t.Errorf("deadline: got %v", err)
	}
	if _, err := Screen1D(ctx, Problem1D{V: 1, Dx: 1, R: 1, Receptors: []float64{5}, Times: []float64{10}}); !errors.Is(err, context.Canceled) {
		t.Errorf("1D cancelled: got %v", err)
	}
}
