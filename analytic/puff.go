package analytic

import "math"

// Puff3D returns the dissolved concentration at (x, y, z) and time t > 0
// after an instantaneous release at t = 0 of a total mass (dissolved plus
// sorbed) at (0, 0, depth0) below the water table: the Gaussian puff
// (Baetsle 1969; see also Wexler 1992, USGS TWRI 3-B7) with retarded
// velocity and dispersion and the water table as a no-flux boundary (image
// release at -depth0):
//
//	C = mass/(n R) exp(-Mu t) Gx Gy Gz,
//	Gx = exp(-(x - V t/R)^2/(4 Dx t/R)) / sqrt(4 pi Dx t/R), Gy likewise with y and Dy,
//	Gz = [exp(-(z-depth0)^2/(4 Dz t/R)) + exp(-(z+depth0)^2/(4 Dz t/R))] / sqrt(4 pi Dz t/R).
//
// Units: mass in M, lengths in L, the result in M/L^3 of water. Its integral
// n R C over the aquifer (z >= 0) is mass exp(-Mu t). t <= 0 gives 0.
func Puff3D(x, y, z, t float64, p Params, mass, porosity, depth0 float64) float64 {
	if !(t > 0) || math.IsInf(t, 1) || z < 0 {
		return 0
	}
	return nonNegFinite(mass / (porosity * p.R) * math.Exp(-p.Mu*t) *
		gauss(x-p.V*t/p.R, p.Dx*t/p.R) * gauss(y, p.Dy*t/p.R) *
		(gauss(z-depth0, p.Dz*t/p.R) + gauss(z+depth0, p.Dz*t/p.R)))
}

// Puff2D is the puff of a release fully mixed over the aquifer thickness:
// massPerThickness in M/L, result in M/L^3 of water; its integral n R C over
// the plane is massPerThickness exp(-Mu t).
func Puff2D(x, y, t float64, p Params, massPerThickness, porosity float64) float64 {
	if !(t > 0) || math.IsInf(t, 1) {
		return 0
	}
	return nonNegFinite(massPerThickness / (porosity * p.R) * math.Exp(-p.Mu*t) *
		gauss(x-p.V*t/p.R, p.Dx*t/p.R) * gauss(y, p.Dy*t/p.R))
}

// Puff1D is the puff of a release spread over the cross-section of a column:
// massPerArea in M/L^2, result in M/L^3 of water; its integral n R C along
// the infinite line is massPerArea exp(-Mu t).
func Puff1D(x, t float64, p Params, massPerArea, porosity float64) float64 {
	if !(t > 0) || math.IsInf(t, 1) {
		return 0
	}
	return nonNegFinite(massPerArea / (porosity * p.R) * math.Exp(-p.Mu*t) * gauss(x-p.V*t/p.R, p.Dx*t/p.R))
}

// gauss returns exp(-d^2/(4 dt))/sqrt(4 pi dt): the 1D heat kernel with
// diffusivity times time dt.
func gauss(d, dt float64) float64 {
	return math.Exp(-d*d/(4*dt)) / math.Sqrt(4*math.Pi*dt)
}

func nonNegFinite(c float64) float64 {
	if !(c > 0) || math.IsInf(c, 0) {
		return 0
	}
	return c
}
