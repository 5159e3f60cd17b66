package numeric

import (
	"fmt"
	"math"
	"sort"
)

// Axis is a partition of one coordinate direction into cells, lengths in L.
// Faces are strictly ascending; cell i spans [Faces[i], Faces[i+1]].
type Axis struct {
	Faces []float64
}

// UniformAxis divides [0, length] into n equal cells.
func UniformAxis(length float64, n int) Axis {
	f := make([]float64, n+1)
	for i := range f {
		f[i] = length * float64(i) / float64(n)
	}
	f[n] = length
	return Axis{Faces: f}
}

// N is the number of cells.
func (a Axis) N() int { return len(a.Faces) - 1 }

// Width of cell i, L.
func (a Axis) Width(i int) float64 { return a.Faces[i+1] - a.Faces[i] }

// Center of cell i, L.
func (a Axis) Center(i int) float64 { return 0.5 * (a.Faces[i] + a.Faces[i+1]) }

// Length is the extent covered, L.
func (a Axis) Length() float64 { return a.Faces[len(a.Faces)-1] - a.Faces[0] }

func (a Axis) widths() []float64 {
	w := make([]float64, a.N())
	for i := range w {
		w[i] = a.Width(i)
	}
	return w
}

func (a Axis) centers() []float64 {
	c := make([]float64, a.N())
	for i := range c {
		c[i] = a.Center(i)
	}
	return c
}

// minMax returns the smallest and largest cell width.
func (a Axis) minMax() (lo, hi float64) {
	lo, hi = math.Inf(1), 0
	for i := 0; i+1 < len(a.Faces); i++ {
		w := a.Width(i)
		lo = math.Min(lo, w)
		hi = math.Max(hi, w)
	}
	return lo, hi
}

// validate checks that the axis starts at 0, has at least one cell and has
// finite strictly ascending faces.
func (a Axis) validate(field string) error {
	if len(a.Faces) < 2 {
		return invalid(field, "need at least 1 cell (2 faces), got %d faces", len(a.Faces))
	}
	if a.Faces[0] != 0 {
		return invalid(field+".Faces[0]", "must be 0, got %g", a.Faces[0])
	}
	for i := 1; i < len(a.Faces); i++ {
		f := a.Faces[i]
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return invalid(fmt.Sprintf("%s.Faces[%d]", field, i), "must be finite, got %g", f)
		}
		if !(f > a.Faces[i-1]) {
			return invalid(fmt.Sprintf("%s.Faces[%d]", field, i), "cell spacing must be > 0: face %g does not exceed the previous face %g", f, a.Faces[i-1])
		}
	}
	return nil
}

// locate returns the cell-centre interval holding p: i such that
// center(i) <= p < center(i+1) and the weight of center(i+1). Below the
// first centre it returns i = -1; above the last, i = n-1 with weight 0.
func locate(centers []float64, p float64) (int, float64) {
	n := len(centers)
	if p < centers[0] {
		return -1, 0
	}
	if p >= centers[n-1] {
		return n - 1, 0
	}
	i := sort.SearchFloat64s(centers, p)
	// centers[i-1] <= p < centers[i] (SearchFloat64s gives the first >= p).
	if centers[i] == p {
		return i, 0
	}
	i--
	return i, (p - centers[i]) / (centers[i+1] - centers[i])
}
