package analytic

import (
	"math"
	"math/cmplx"
)

// Divided differences f[z_0, ..., z_m] of an analytic function f over
// complex points that may coincide or nearly coincide (the rates of a decay
// chain as functions of the Laplace variable, or the rates themselves).
//
// Method: the points are grouped into clusters (single linkage: two points
// join when they are close against the radius of convergence of f's Taylor
// series and f changes little between them, |z_a - z_b| |f'/f| <= 1). By
// the residue theorem,
//
//	f[z_0..z_m] = (1/2 pi i) contour integral f(z) / prod_r (z - z_r) dz
//	            = sum over clusters K of (f Q_K)[points in K],
//	Q_K(z) = prod over points r outside K of 1/(z - z_r),
//
// a lone point contributing f(z)/prod(z - z_r) (the Lagrange form, well
// conditioned because the other points are far or f differs much there),
// and a cluster the divided difference of the Taylor series of f Q_K about
// its centre c,
//
//	(f Q_K)[c+d_0..c+d_q] = sum_{n>=q} b_n h_{n-q}(d_0..d_q),
//
// h the complete homogeneous symmetric polynomials, which has no
// cancellation: coincident points (d = 0) take b_q, the q-th derivative over
// q!, the confluent limit.

// ddFunc is an analytic function known by its values and Taylor jets.
type ddFunc interface {
	// value returns f(z).
	value(z complex128) complex128
	// jet writes the first len(out) Taylor coefficients of u -> f(c + h u)
	// (h > 0 a scale that keeps them within the float64 range).
	jet(c complex128, h float64, out []complex128)
	// radius returns the radius of convergence of the Taylor series at c
	// (the distance to the nearest singularity).
	radius(c complex128) float64
	// scale returns an estimate of |f'(z)/f(z)| near z.
	scale(z complex128) float64
}

// ddLinkRadius is the fraction of the radius of convergence within which
// two points may join a cluster.
const ddLinkRadius = 0.3

// ddMaxTerms caps the Taylor series of a cluster.
const ddMaxTerms = 160

// ddSet holds the points of one evaluation, their clusters, and the values
// and jets computed so far.
type ddSet struct {
	f       ddFunc
	z       []complex128
	cl      [MaxCompounds]int // cluster of each point
	val     [MaxCompounds]complex128
	hasVal  [MaxCompounds]bool
	centre  [MaxCompounds]complex128
	spread  [MaxCompounds]float64 // largest |z - centre| in the cluster
	members [MaxCompounds]int
	jets    [MaxCompounds][]complex128
	// pool holds the jets' storage, kept across resets of the set.
	pool []complex128
	used int
}

// reset prepares the set for the points z (len <= MaxCompounds).
func (s *ddSet) reset(f ddFunc, z []complex128) {
	s.f, s.z = f, z
	s.used = 0
	n := len(z)
	for i := 0; i < n; i++ {
		s.cl[i] = i
		s.hasVal[i] = false
		s.jets[i] = nil
	}
	find := func(i int) int {
		for s.cl[i] != i {
			i = s.cl[i]
		}
		return i
	}
	var rad, sc [MaxCompounds]float64
	for i := 0; i < n; i++ {
		rad[i] = f.radius(z[i])
		sc[i] = f.scale(z[i])
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			d := cmplx.Abs(z[i] - z[j])
			if d <= ddLinkRadius*math.Min(rad[i], rad[j]) && d*math.Max(sc[i], sc[j]) <= 1 {
				a, b := find(i), find(j)
				if a != b {
					s.cl[b] = a
				}
			}
		}
	}
	// A point outside a cluster but within twice its spread of its centre
	// would make the Taylor series of f Q converge slowly (or not): it
	// joins the cluster, until none is left.
	for {
		s.centres(n, find)
		merged := false
		for j := 0; j < n; j++ {
			rj := find(j)
			for r := 0; r < n && !merged; r++ {
				if s.members[r] > 1 && r != rj && cmplx.Abs(z[j]-s.centre[r]) < 2*s.spread[r] {
					s.cl[rj] = r
					merged = true
				}
			}
		}
		if !merged {
			break
		}
	}
}

// centres resolves every point to its cluster's root and computes the
// clusters' sizes, centres and spreads.
func (s *ddSet) centres(n int, find func(int) int) {
	z := s.z
	for i := 0; i < n; i++ {
		s.members[i] = 0
		s.centre[i] = 0
		s.spread[i] = 0
	}
	for i := 0; i < n; i++ {
		r := find(i)
		s.cl[i] = r
		s.members[r]++
		s.centre[r] += z[i]
	}
	for i := 0; i < n; i++ {
		if s.members[i] > 0 {
			s.centre[i] /= complex(float64(s.members[i]), 0)
		}
	}
	for i := 0; i < n; i++ {
		r := s.cl[i]
		s.spread[r] = math.Max(s.spread[r], cmplx.Abs(z[i]-s.centre[r]))
	}
	// Jets depend on the centre: drop those of the previous clustering.
	for i := 0; i < n; i++ {
		s.jets[i] = nil
	}
	s.used = 0
}

func (s *ddSet) value(i int) complex128 {
	if !s.hasVal[i] {
		s.val[i] = s.f.value(s.z[i])
		s.hasVal[i] = true
	}
	return s.val[i]
}

// jet returns at least n Taylor coefficients of u -> f(c + h u) about the
// centre c of cluster r, with h its spread.
func (s *ddSet) jet(r, n int) []complex128 {
	if len(s.jets[r]) < n {
		if s.used+n > len(s.pool) {
			s.pool = make([]complex128, max(2*len(s.pool), s.used+n, 4*ddMaxTerms))
			s.used = 0
		}
		s.jets[r] = s.pool[s.used : s.used+n]
		s.used += n
		s.f.jet(s.centre[r], s.jetScale(r), s.jets[r])
	}
	return s.jets[r]
}

// jetScale is the variable scale of cluster r's series: its spread (1 for
// coincident points, where only the first terms are used).
func (s *ddSet) jetScale(r int) float64 {
	if s.spread[r] > 0 {
		return s.spread[r]
	}
	return 1
}

// divDiff returns f[z_idx[0], ..., z_idx[m]].
func (s *ddSet) divDiff(idx []int) complex128 {
	var total complex128
	var done [MaxCompounds]bool
	for a, i := range idx {
		r := s.cl[i]
		if done[r] {
			continue
		}
		done[r] = true
		var in, out [MaxCompounds]int
		nin, nout := 0, 0
		for _, j := range idx[a:] {
			if s.cl[j] == r {
				in[nin] = j
				nin++
			}
		}
		for _, j := range idx {
			if s.cl[j] != r {
				out[nout] = j
				nout++
			}
		}
		if nin == 1 {
			v := s.value(i)
			for _, j := range out[:nout] {
				v /= s.z[i] - s.z[j]
			}
			total += v
			continue
		}
		total += s.clusterTerm(r, in[:nin], out[:nout])
	}
	return total
}

// clusterTerm is (f Q)[points in] with Q = prod over out of 1/(z - z_j),
// from the Taylor series about the cluster's centre c in the scaled
// variable u = (z - c)/h (h the cluster's spread, so that |u| <= 1 at its
// points and the coefficients stay in range): with b_n the coefficients
// of f Q in u, the divided difference is h^-q sum_{n>=q} b_n h_{n-q}(u).
func (s *ddSet) clusterTerm(r int, in, out []int) complex128 {
	c := s.centre[r]
	h := s.jetScale(r)
	q := len(in) - 1
	// Radius of the series of f Q, in units of h.
	rad := s.f.radius(c)
	for _, j := range out {
		rad = math.Min(rad, cmplx.Abs(c-s.z[j]))
	}
	var spread float64
	for _, j := range in {
		spread = math.Max(spread, cmplx.Abs(s.z[j]-c))
	}
	n := q + 1
	if spread > 0 {
		ratio := math.Min(spread/rad, 0.95)
		// Terms fall like ratio^k C(k+q, q) and, within the cluster,
		// like (spread |f'/f|)^k / k! at worst.
		k := -40/math.Log(ratio) + 3*float64(q) + 4 + math.E*spread*s.f.scale(c)
		n += int(math.Min(k, ddMaxTerms))
	}
	if n > ddMaxTerms {
		n = ddMaxTerms
	}
	var b [ddMaxTerms]complex128
	copy(b[:n], s.jet(r, n))
	hc := complex(h, 0)
	for _, j := range out {
		// Divide by (d + h u): d c_k + h c_(k-1) = a_k.
		d := c - s.z[j]
		var prev complex128
		for k := 0; k < n; k++ {
			b[k] = (b[k] - hc*prev) / d
			prev = b[k]
		}
	}
	// h_k over the points' scaled offsets, k = 0..n-1-q.
	var hk [ddMaxTerms]complex128
	hk[0] = 1
	kmax := n - 1 - q
	for _, j := range in {
		u := (s.z[j] - c) / hc
		if u == 0 {
			continue
		}
		for k := 1; k <= kmax; k++ {
			hk[k] += u * hk[k-1]
		}
	}
	var sum complex128
	for k := 0; k <= kmax; k++ {
		sum += b[q+k] * hk[k]
	}
	return sum / complex(math.Pow(h, float64(q)), 0)
}

// Power series helpers: coefficients of a truncated series in delta.

// seriesExp writes exp(e) into out (len(out) <= len(e)).
func seriesExp(e, out []complex128) {
	out[0] = cmplx.Exp(e[0])
	for n := 1; n < len(out); n++ {
		var acc complex128
		for k := 1; k <= n; k++ {
			acc += complex(float64(k), 0) * e[k] * out[n-k]
		}
		out[n] = acc / complex(float64(n), 0)
	}
}

// seriesMul writes a*b into out (out may not alias a or b).
func seriesMul(a, b, out []complex128) {
	for n := range out {
		var acc complex128
		for k := 0; k <= n; k++ {
			acc += a[k] * b[n-k]
		}
		out[n] = acc
	}
}

// seriesRecip writes 1/a into out (a[0] != 0).
func seriesRecip(a, out []complex128) {
	out[0] = 1 / a[0]
	for n := 1; n < len(out); n++ {
		var acc complex128
		for k := 1; k <= n; k++ {
			acc += a[k] * out[n-k]
		}
		out[n] = -acc * out[0]
	}
}

// seriesSqrtLinear writes sqrt(a + b delta) into out, sqrt(a) = root (the
// branch chosen by the caller): root * sum binom(1/2, n) (b delta/a)^n.
func seriesSqrtLinear(root, a, b complex128, out []complex128) {
	r := b / a
	coef := complex(1, 0)
	pw := complex(1, 0)
	for n := range out {
		out[n] = root * coef * pw
		coef *= complex((0.5-float64(n))/float64(n+1), 0)
		pw *= r
	}
}
