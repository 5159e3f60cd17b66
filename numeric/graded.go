package numeric

import (
	"math"
	"sort"
)

// refinePoint asks for cell size h at position at.
type refinePoint struct{ at, h float64 }

// gradedAxis builds faces on [0, hi] whose cell sizes follow
// h(x) = scale * min(hmax, min_p (p.h + growth |x - p.at|)) (so a smaller
// scale refines the whole axis uniformly, as a convergence study needs; the
// ratio of neighbouring cells is about 1 + scale*growth), with every break point
// inside (0, hi) a face. Cells are placed by equidistributing the integral of
// 1/h over each segment between break points, so sizes vary smoothly.
func gradedAxis(hi float64, breaks []float64, pts []refinePoint, hmax, growth, scale float64) Axis {
	size := func(x float64) float64 {
		h := hmax
		for _, p := range pts {
			h = math.Min(h, p.h+growth*math.Abs(x-p.at))
		}
		return scale * h
	}
	bs := []float64{0}
	sorted := append([]float64(nil), breaks...)
	sort.Float64s(sorted)
	for _, b := range sorted {
		if b > bs[len(bs)-1]*(1+1e-12) && b < hi*(1-1e-9) {
			bs = append(bs, b)
		}
	}
	bs = append(bs, hi)
	// First count the cells (the integral of 1/size over each segment,
	// rounded up), so that an axis beyond maxAxisCells is never built.
	const samples = 512
	total := 0.0
	for s := 0; s+1 < len(bs); s++ {
		a, b := bs[s], bs[s+1]
		var phi float64
		prev := 1 / size(a)
		for k := 1; k <= samples; k++ {
			x := a + (b-a)*float64(k)/samples
			cur := 1 / size(x)
			phi += 0.5 * (prev + cur) * (b - a) / samples
			prev = cur
		}
		total += math.Max(math.Ceil(phi-1e-9), 1)
	}
	if !(total <= maxAxisCells) {
		return Axis{oversize: int(math.Min(total, math.MaxInt32)), oversizeLength: hi}
	}
	faces := []float64{0}
	xs := make([]float64, samples+1)
	phi := make([]float64, samples+1)
	for s := 0; s+1 < len(bs); s++ {
		a, b := bs[s], bs[s+1]
		prev := 1 / size(a)
		xs[0], phi[0] = a, 0
		for k := 1; k <= samples; k++ {
			x := a + (b-a)*float64(k)/samples
			cur := 1 / size(x)
			xs[k] = x
			phi[k] = phi[k-1] + 0.5*(prev+cur)*(x-xs[k-1])
			prev = cur
		}
		n := int(math.Ceil(phi[samples] - 1e-9))
		if n < 1 {
			n = 1
		}
		k := 0
		for m := 1; m < n; m++ {
			target := phi[samples] * float64(m) / float64(n)
			for phi[k+1] < target {
				k++
			}
			w := (target - phi[k]) / (phi[k+1] - phi[k])
			faces = append(faces, xs[k]+w*(xs[k+1]-xs[k]))
		}
		faces = append(faces, b)
	}
	return Axis{Faces: faces}
}
