// Package contour draws the outlines of a level on a regular grid (marching
// squares) as RFC 7946 polygons; no kept Go library offers contouring to
// polygons with holes, so this is our own.
package contour

import (
	"math"
	"sort"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// Contour returns the region of g where the value is at or above level as
// closed polygons, by marching squares with linear interpolation along the
// cell edges (our own implementation):
//
//   - every ring is closed (first point = last point);
//   - outer rings run counter-clockwise and holes clockwise (RFC 7946
//     section 3.1.6) in g's right-handed frame;
//   - a region that reaches the edge of the grid is closed along the edge
//     (the grid is surrounded by a virtual ring of nodes below the level);
//   - a saddle cell (two opposite corners above, two below) is resolved by
//     the value at the cell centre, the mean of its corners (the bilinear
//     interpolant's value there): above joins the high corners, below
//     separates them;
//   - a hole is attached to the smallest outer ring that contains it.
//
// Polygons come largest first. A node equal to the level counts as above;
// a NaN node counts as below.
func Contour(g *Grid, level float64) orb.MultiPolygon {
	if g == nil || g.NX < 1 || g.NY < 1 || len(g.Values) < g.NX*g.NY || math.IsNaN(level) {
		return nil
	}
	ct := contourer{g: g, level: level, pnx: g.NX + 2, pny: g.NY + 2}
	next := make(map[int]int)
	var starts []int
	for J := 0; J < ct.pny-1; J++ {
		for I := 0; I < ct.pnx-1; I++ {
			ct.cell(I, J, next, &starts)
		}
	}
	var outers, holes []orb.Ring
	used := make(map[int]bool, len(next))
	for _, s := range starts {
		if used[s] {
			continue
		}
		var ring orb.Ring
		k := s
		for !used[k] {
			used[k] = true
			ring = append(ring, ct.point(k))
			nk, ok := next[k]
			if !ok {
				break // cannot happen: every crossing has a successor
			}
			k = nk
		}
		ring = tidyRing(ring)
		if len(ring) < 4 {
			continue
		}
		switch a := signedArea(ring); {
		case a > 0:
			outers = append(outers, ring)
		case a < 0:
			holes = append(holes, ring)
		}
	}
	return assemble(outers, holes)
}

// contourer holds the state of one Contour call. Nodes are indexed in the
// padded grid: padded (I, J) is real (I-1, J-1); the padding nodes sit at the
// position of the nearest real node and count as below the level.
type contourer struct {
	g        *Grid
	level    float64
	pnx, pny int
}

// value of padded node (I, J); padding and NaN are below the level.
func (c *contourer) value(I, J int) float64 {
	i, j := I-1, J-1
	if i < 0 || j < 0 || i >= c.g.NX || j >= c.g.NY {
		return c.below()
	}
	v := c.g.At(i, j)
	if math.IsNaN(v) {
		return c.below()
	}
	return v
}

// below is a finite value under the level.
func (c *contourer) below() float64 { return c.level - 1 - math.Abs(c.level) }

// loc is the position of padded node (I, J): the nearest real node.
func (c *contourer) loc(I, J int) orb.Point {
	i := min(max(I-1, 0), c.g.NX-1)
	j := min(max(J-1, 0), c.g.NY-1)
	return orb.Point{c.g.X(i), c.g.Y(j)}
}

// Edge keys: the horizontal edge from padded node (I, J) to (I+1, J) is
// 2*(J*pnx+I); the vertical edge from (I, J) to (I, J+1) is that plus 1.
func (c *contourer) hEdge(I, J int) int { return 2 * (J*c.pnx + I) }
func (c *contourer) vEdge(I, J int) int { return 2*(J*c.pnx+I) + 1 }

// point is the level crossing on edge k, linearly interpolated.
func (c *contourer) point(k int) orb.Point {
	n := k / 2
	I, J := n%c.pnx, n/c.pnx
	I2, J2 := I+1, J
	if k%2 == 1 {
		I2, J2 = I, J+1
	}
	a, b := c.value(I, J), c.value(I2, J2)
	pa, pb := c.loc(I, J), c.loc(I2, J2)
	t := 0.5
	if d := b - a; d != 0 {
		t = (c.level - a) / d
	}
	t = math.Min(math.Max(t, 0), 1)
	return orb.Point{pa[0] + t*(pb[0]-pa[0]), pa[1] + t*(pb[1]-pa[1])}
}

// cell adds the oriented segments of padded cell (I, J) to next (from the
// crossing where the counter-clockwise walk round the cell leaves the
// region above the level to one where it enters it, so that the region
// lies on the left of every segment).
func (c *contourer) cell(I, J int, next map[int]int, starts *[]int) {
	corner := [4][2]int{{I, J}, {I + 1, J}, {I + 1, J + 1}, {I, J + 1}}
	edge := [4]int{c.hEdge(I, J), c.vEdge(I+1, J), c.hEdge(I, J+1), c.vEdge(I, J)}
	var v [4]float64
	var up [4]bool
	n := 0
	for k := range corner {
		v[k] = c.value(corner[k][0], corner[k][1])
		up[k] = v[k] >= c.level
		if up[k] {
			n++
		}
	}
	if n == 0 || n == 4 {
		return
	}
	type crossing struct {
		edge  int
		start bool
	}
	var xs [4]crossing
	m := 0
	for k := range 4 {
		if up[k] != up[(k+1)%4] {
			xs[m] = crossing{edge[k], up[k]}
			m++
		}
	}
	link := func(a, b crossing) {
		next[a.edge] = b.edge
		*starts = append(*starts, a.edge)
	}
	if m == 2 {
		if xs[0].start {
			link(xs[0], xs[1])
		} else {
			link(xs[1], xs[0])
		}
		return
	}
	// Saddle: four crossings alternating start, end round the cell.
	centreUp := (v[0]+v[1]+v[2]+v[3])/4 >= c.level
	for k := range 4 {
		if !xs[k].start {
			continue
		}
		if centreUp {
			link(xs[k], xs[(k+1)%4]) // cut off the low corner ahead
		} else {
			link(xs[k], xs[(k+3)%4]) // cut off the high corner behind
		}
	}
}

// tidyRing drops repeated points and the middle of three points on one
// grid line, and closes the ring.
func tidyRing(r orb.Ring) orb.Ring {
	out := make(orb.Ring, 0, len(r)+1)
	for _, p := range r {
		if len(out) > 0 && out[len(out)-1] == p {
			continue
		}
		out = append(out, p)
	}
	for len(out) > 1 && out[0] == out[len(out)-1] {
		out = out[:len(out)-1]
	}
	// Drop the middle of three points on one axis-parallel line (runs
	// along the grid edge).
	keep := make(orb.Ring, 0, len(out)+1)
	for _, p := range out {
		for len(keep) >= 2 && axisCollinear(keep[len(keep)-2], keep[len(keep)-1], p) {
			keep = keep[:len(keep)-1]
		}
		keep = append(keep, p)
	}
	for len(keep) >= 3 && axisCollinear(keep[len(keep)-2], keep[len(keep)-1], keep[0]) {
		keep = keep[:len(keep)-1]
	}
	for len(keep) >= 3 && axisCollinear(keep[len(keep)-1], keep[0], keep[1]) {
		keep = keep[1:]
	}
	out = keep
	if len(out) < 3 {
		return nil
	}
	return append(out, out[0])
}

// axisCollinear reports three points on one line parallel to an axis.
func axisCollinear(a, b, c orb.Point) bool {
	return (a[0] == b[0] && b[0] == c[0]) || (a[1] == b[1] && b[1] == c[1])
}

// signedArea is the shoelace area of a closed ring: positive when it runs
// counter-clockwise.
func signedArea(r orb.Ring) float64 {
	s := 0.0
	for i := 0; i+1 < len(r); i++ {
		s += r[i][0]*r[i+1][1] - r[i+1][0]*r[i][1]
	}
	return s / 2
}

// assemble attaches each hole to the smallest outer ring containing it.
func assemble(outers, holes []orb.Ring) orb.MultiPolygon {
	sort.SliceStable(outers, func(a, b int) bool { return signedArea(outers[a]) > signedArea(outers[b]) })
	mp := make(orb.MultiPolygon, len(outers))
	for i, o := range outers {
		mp[i] = orb.Polygon{o}
	}
	for _, h := range holes {
		best := -1
		for i := len(outers) - 1; i >= 0; i-- { // smallest first
			if ringContainsRing(outers[i], h) {
				best = i
				break
			}
		}
		if best >= 0 {
			mp[best] = append(mp[best], h)
		}
	}
	return mp
}

// ringContainsRing reports whether inner lies in outer, judged by the
// majority of inner's vertices (rings of one level never cross; a vertex
// may touch only where both pass through a node equal to the level).
func ringContainsRing(outer, inner orb.Ring) bool {
	in, out := 0, 0
	for i := 0; i+1 < len(inner) && i < 8; i++ {
		if planar.RingContains(outer, inner[i]) {
			in++
		} else {
			out++
		}
	}
	return in > out
}
