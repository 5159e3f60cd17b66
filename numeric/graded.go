package numeric

import (
	"math"
	"sort"
)

// refinePoint asks for cell size h at position at.
type refinePoint struct{ at, h float64 }

// gradedSamples is the number of trapezoid intervals per segment on which
// the cell density 1/h is integrated.
const gradedSamples = 512

// gradedAxis describes an axis on [0, hi] whose cell sizes follow
// h(x) = scale * min(hmax, min_p (p.h + growth |x - p.at|)) (so a smaller
// scale refines the whole axis uniformly, as a convergence study needs; the
// ratio of neighbouring cells is about 1 + scale*growth), with every break
// point inside (0, hi) a face. Cells are placed by equidistributing the
// integral of 1/h over each segment between break points, so sizes vary
// smoothly.
//
// The axis is counted (count, in float64, whatever the inputs) before it is
// built (build), so a design far beyond any budget costs neither memory nor
// time: counting costs gradedSamples evaluations of h per segment.
type gradedAxis struct {
	bs                  []float64 // segment ends: 0, the break points inside (0, hi), hi
	pts                 []refinePoint
	hmax, growth, scale float64
	cells               float64   // number of cells, sum over segments of ceil(integral of 1/h), >= 1 each
	segCells            []float64 // cells of each segment
}

func newGradedAxis(hi float64, breaks []float64, pts []refinePoint, hmax, growth, scale float64) gradedAxis {
	g := gradedAxis{pts: pts, hmax: hmax, growth: growth, scale: scale}
	g.bs = []float64{0}
	sorted := append([]float64(nil), breaks...)
	sort.Float64s(sorted)
	for _, b := range sorted {
		if b > g.bs[len(g.bs)-1]*(1+1e-12) && b < hi*(1-1e-9) {
			g.bs = append(g.bs, b)
		}
	}
	g.bs = append(g.bs, hi)
	var xs, phi [gradedSamples + 1]float64
	for s := 0; s+1 < len(g.bs); s++ {
		n := g.segment(s, xs[:], phi[:])
		g.segCells = append(g.segCells, n)
		g.cells += n
	}
	return g
}

// cellsFrom is the number of cells from the segment end nearest to x to
// the end of the axis (x a break point: the cells downstream of it).
func (g *gradedAxis) cellsFrom(x float64) float64 {
	best := 0
	for s := 1; s+1 < len(g.bs); s++ {
		if math.Abs(g.bs[s]-x) < math.Abs(g.bs[best]-x) {
			best = s
		}
	}
	n := 0.0
	for _, c := range g.segCells[best:] {
		n += c
	}
	return n
}

func (g *gradedAxis) size(x float64) float64 {
	h := g.hmax
	for _, p := range g.pts {
		h = math.Min(h, p.h+g.growth*math.Abs(x-p.at))
	}
	return g.scale * h
}

// segment fills xs and phi (gradedSamples+1 values) with the sample points
// of segment s and the running integral of 1/h over them, and returns the
// number of cells of the segment (at least 1).
func (g *gradedAxis) segment(s int, xs, phi []float64) float64 {
	a, b := g.bs[s], g.bs[s+1]
	prev := 1 / g.size(a)
	xs[0], phi[0] = a, 0
	for k := 1; k <= gradedSamples; k++ {
		x := a + (b-a)*float64(k)/gradedSamples
		cur := 1 / g.size(x)
		xs[k] = x
		phi[k] = phi[k-1] + 0.5*(prev+cur)*(x-xs[k-1])
		prev = cur
	}
	return math.Max(math.Ceil(phi[gradedSamples]-1e-9), 1)
}

// length is the extent of the axis.
func (g *gradedAxis) length() float64 { return g.bs[len(g.bs)-1] }

// build places the faces. Call it only for an axis whose count fits a
// budget: it allocates one float64 per cell.
func (g *gradedAxis) build() Axis {
	faces := make([]float64, 1, int(g.cells)+1)
	var xs, phi [gradedSamples + 1]float64
	for s := 0; s+1 < len(g.bs); s++ {
		n := int(g.segment(s, xs[:], phi[:]))
		total := phi[gradedSamples]
		k := 0
		for m := 1; m < n; m++ {
			target := total * float64(m) / float64(n)
			for phi[k+1] < target {
				k++
			}
			w := (target - phi[k]) / (phi[k+1] - phi[k])
			faces = append(faces, xs[k]+w*(xs[k+1]-xs[k]))
		}
		faces = append(faces, g.bs[s+1])
	}
	return Axis{Faces: faces}
}

// maxWidth is the largest cell width: measured on the built axis when it
// has at most limit cells, otherwise (not built) the mean width.
func (g *gradedAxis) maxWidth(limit float64) float64 {
	if g.cells <= limit {
		_, hi := g.build().minMax()
		return hi
	}
	return g.length() / g.cells
}
