package plume

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestFrameCases(t *testing.T) {
	tests := []struct {
		name         string
		fr           Frame
		x, y, px, py float64
	}{
		// Azimuth 90 with the source at the origin: the identity (DESIGN.md section 3).
		{"identity", Frame{AzimuthDeg: 90}, 210, 6, 210, 6},
		{"identity negative", Frame{AzimuthDeg: 90}, -3.5, -7.25, -3.5, -7.25},
		// Flow to the north: a point north is downgradient, a point west is to the left.
		{"north flow", Frame{AzimuthDeg: 0}, -5, 10, 10, 5},
		// Flow to the south: east is to the left of flow.
		{"south flow", Frame{AzimuthDeg: 180}, 4, -10, 10, 4},
		// Flow to the west: south is to the left.
		{"west flow", Frame{AzimuthDeg: 270}, -10, -2, 10, -2 * -1},
		// Source offset.
		{"offset", Frame{X0: 100, Y0: 50, AzimuthDeg: 90}, 130, 40, 30, -10},
		// Flow to the north-east, point 10 m along it.
		{"north-east", Frame{AzimuthDeg: 45}, 10 / math.Sqrt2, 10 / math.Sqrt2, 10, 0},
		// Azimuths beyond a turn are the same direction.
		{"450 is 90", Frame{AzimuthDeg: 450}, 3, 4, 3, 4},
		{"-270 is 90", Frame{AzimuthDeg: -270}, 3, 4, 3, 4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			px, py := tc.fr.ToPlume(tc.x, tc.y)
			if math.Abs(px-tc.px) > 1e-12 || math.Abs(py-tc.py) > 1e-12 {
				t.Errorf("ToPlume(%g,%g) = (%g,%g), want (%g,%g)", tc.x, tc.y, px, py, tc.px, tc.py)
			}
			x, y := tc.fr.ToSite(px, py)
			if math.Abs(x-tc.x) > 1e-12 || math.Abs(y-tc.y) > 1e-12 {
				t.Errorf("ToSite round trip (%g,%g), want (%g,%g)", x, y, tc.x, tc.y)
			}
		})
	}
}

func TestFrameIdentityIsExact(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	fr := Frame{AzimuthDeg: DefaultFlowAzimuthDeg}
	for range 1000 {
		x, y := r.NormFloat64()*1e4, r.NormFloat64()*1e4
		if px, py := fr.ToPlume(x, y); px != x || py != y {
			t.Fatalf("(%g,%g) -> (%g,%g)", x, y, px, py)
		}
	}
}

// Rotating the site (source, receptors) about any point and turning the flow
// azimuth by the same angle leaves the plume-frame coordinates unchanged.
func TestFrameRotationInvariance(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for range 500 {
		fr := Frame{X0: r.NormFloat64() * 100, Y0: r.NormFloat64() * 100, AzimuthDeg: r.Float64() * 360}
		x, y := r.NormFloat64()*500, r.NormFloat64()*500
		phi := r.Float64()*720 - 360 // clockwise rotation, degrees
		cx, cy := r.NormFloat64()*50, r.NormFloat64()*50
		rot := func(x, y float64) (float64, float64) {
			s, c := math.Sincos(phi * math.Pi / 180)
			dx, dy := x-cx, y-cy
			return cx + dx*c + dy*s, cy - dx*s + dy*c // clockwise
		}
		px, py := fr.ToPlume(x, y)
		fr2 := fr
		fr2.X0, fr2.Y0 = rot(fr.X0, fr.Y0)
		fr2.AzimuthDeg = fr.AzimuthDeg + phi
		x2, y2 := rot(x, y)
		qx, qy := fr2.ToPlume(x2, y2)
		if math.Abs(px-qx) > 1e-9 || math.Abs(py-qy) > 1e-9 {
			t.Fatalf("rotation by %g changed (%g,%g) to (%g,%g)", phi, px, py, qx, qy)
		}
	}
}
