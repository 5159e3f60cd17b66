package analytic

import "math"

// Exact3DRate returns the rate of change d(C/C0)/dt, 1/T, at pt and time t
// for the continuous constant planar source of Exact3DAt (no duration, no
// depletion): the integrand of Exact3D at tau = t, the response to the
// source's first instant after travelling for t,
//
//	x/(2 sqrt(pi D' t^3)) exp(-Mu t - (x - v' t)^2/(4 D' t)) Fy(t) Fz(t)
//
// (D' = Dx/R, v' = V/R; Fy, Fz the strip factors of Exact3D, Fz averaged
// over a well screen). With an infinite source it is the pulse response of
// the first-type 1D column. A root finder uses it to step along a
// breakthrough curve, which for this source rises monotonically. x <= 0,
// t <= 0 and t = +Inf give 0; the value underflows to 0 rather than
// overflowing.
func Exact3DRate(pt Point, t float64, p Params, s Source) float64 {
	x := pt.X
	if !(x > 0) || !(t > 0) || math.IsInf(t, 1) {
		return 0
	}
	dp, vp := p.Dx/p.R, p.V/p.R
	q := x - vp*t
	f := x / (2 * math.Sqrt(math.Pi*dp*t) * t) * math.Exp(-p.Mu*t-q*q/(4*dp*t))
	if f == 0 || math.IsNaN(f) {
		return 0
	}
	if !math.IsInf(s.Width, 1) {
		f *= strip(math.Abs(pt.Y), s.Width/2, 1/(2*math.Sqrt(p.Dy*t/p.R)))
	}
	if !math.IsInf(s.Depth, 1) {
		top, bot := screenDepths(pt)
		f *= stripAverage(top, bot, s.Depth, 1/(2*math.Sqrt(p.Dz*t/p.R)))
	}
	return f
}
