package plume

import "math"

// DefaultFlowAzimuthDeg is the flow direction when none is given: 90 degrees
// clockwise from north, i.e. toward +x (east), so that with the source at the
// origin the site and plume frames coincide.
const DefaultFlowAzimuthDeg = 90.0

// Frame maps site coordinates (x east, y north) to the plume frame of a
// source at (X0, Y0) with flow toward azimuth AzimuthDeg (degrees clockwise
// from north). Lengths in any one unit; the map is a rigid motion.
type Frame struct {
	X0, Y0     float64 // site coordinates of the plume-frame origin (centre of the source's downgradient face)
	AzimuthDeg float64 // flow direction, degrees clockwise from north
}

// sincosDeg returns sin and cos of an angle in degrees, exact at multiples of 90.
func sincosDeg(deg float64) (s, c float64) {
	r := math.Mod(deg, 360)
	if r < 0 {
		r += 360
	}
	switch r {
	case 0:
		return 0, 1
	case 90:
		return 1, 0
	case 180:
		return 0, -1
	case 270:
		return -1, 0
	}
	return math.Sincos(r * math.Pi / 180)
}

// ToPlume returns the plume-frame coordinates of the site point (x, y):
// px along the flow from the origin, py transverse, positive to the left of
// the flow direction.
func (f Frame) ToPlume(x, y float64) (px, py float64) {
	s, c := sincosDeg(f.AzimuthDeg)
	// Unit vector of flow in (east, north): (sin a, cos a); to its left
	// (rotated 90 degrees counter-clockwise): (-cos a, sin a).
	dx, dy := x-f.X0, y-f.Y0
	px = dx*s + dy*c
	py = -dx*c + dy*s
	return px, py
}

// ToSite is the inverse of ToPlume.
func (f Frame) ToSite(px, py float64) (x, y float64) {
	s, c := sincosDeg(f.AzimuthDeg)
	x = f.X0 + px*s - py*c
	y = f.Y0 + px*c + py*s
	return x, y
}

// frameOf returns the frame of a canonical (or any single-unit) source.
func frameOf(s Source) Frame {
	f := Frame{AzimuthDeg: DefaultFlowAzimuthDeg}
	if s.X != nil {
		f.X0 = *s.X
	}
	if s.Y != nil {
		f.Y0 = *s.Y
	}
	if s.FlowAzimuthDeg != nil {
		f.AzimuthDeg = *s.FlowAzimuthDeg
	}
	return f
}
