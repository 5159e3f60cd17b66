package crs

import "math"

// scaleStep is the half-length, in metres, of the grid steps whose images
// on the ellipsoid give the projection's local scale: short enough that
// the error of the central difference (about scaleStep^2/(6 R^2), R the
// Earth's radius) is below 1e-12, long enough that the rounding of
// latitudes and longitudes (about 1e-9 m) stays below 1e-10 relative.
const scaleStep = 10.0

// ScaleAt returns the projection's scale and meridian convergence at the
// site point (x, y). A caller adds a caveat where Distortion() exceeds
// DistortionCaveat.
//
// Method: the local Jacobian of the projection, by central differences of
// PROJ's inverse projection over steps of 20 m east and north, each step's
// image measured on the ellipsoid by PROJ's geodesic (length and
// azimuth). The scale in a direction is grid length over ground length;
// its extremes are the singular values of the inverse Jacobian (Tissot's
// indicatrix). For a conformal projection Meridional, Parallel, Max and Min
// agree to about 1e-9 (the precision of a 20 m geodesic and of the
// coordinates). PROJ's own proj_factors is not used: in PROJ 9.1, given a
// projected CRS in US survey feet (EPSG:2272) it returns scales near 2e7.
func (f *Frame) ScaleAt(x, y float64) (Scale, error) {
	if _, _, err := f.ToGeodetic(x, y); err != nil {
		return Scale{}, err
	}
	d := scaleStep / f.unit.ToMetres
	east, err := f.groundStep(x-d, y, x+d, y)
	if err != nil {
		return Scale{}, err
	}
	north, err := f.groundStep(x, y-d, x, y+d)
	if err != nil {
		return Scale{}, err
	}
	return scaleFromJacobian(east, north), nil
}

// groundVector is a displacement on the ellipsoid in local metres east
// and north, with the azimuth (degrees clockwise from true north) of its
// direction.
type groundVector struct {
	e, n, azimuth float64
}

// groundStep returns the ground displacement, per metre of grid
// displacement, of the grid step from (x1, y1) to (x2, y2) of length
// 2*scaleStep metres.
func (f *Frame) groundStep(x1, y1, x2, y2 float64) (groundVector, error) {
	lon1, lat1, err := f.ToGeodetic(x1, y1)
	if err != nil {
		return groundVector{}, err
	}
	lon2, lat2, err := f.ToGeodetic(x2, y2)
	if err != nil {
		return groundVector{}, err
	}
	s, az1, az2, err := f.eng.geodesic(lon1, lat1, lon2, lat2)
	if err != nil {
		return groundVector{}, err
	}
	az := meanAzimuth(az1, az2)
	per := s / (2 * scaleStep)
	rad := az * math.Pi / 180
	return groundVector{e: per * math.Sin(rad), n: per * math.Cos(rad), azimuth: az}, nil
}

// meanAzimuth is the azimuth halfway between two azimuths in degrees (the
// azimuth at the midpoint of a short geodesic), in (-180, 180].
func meanAzimuth(a1, a2 float64) float64 {
	diff := math.Remainder(a2-a1, 360)
	return normaliseDegrees(a1 + diff/2)
}

func normaliseDegrees(a float64) float64 {
	a = math.Remainder(a, 360)
	if a <= -180 {
		a += 360
	}
	return a
}

// scaleFromJacobian turns the ground images of unit grid steps east
// (column 1) and north (column 2) into scales: J maps grid metres to
// ground metres, so the scale (grid over ground) in a ground direction u
// is |J^-1 u|.
func scaleFromJacobian(east, north groundVector) Scale {
	a, b := east.e, north.e
	c, d := east.n, north.n
	det := a*d - b*c
	// J^-1 = [d -b; -c a] / det.
	ia, ib, ic, id := d/det, -b/det, -c/det, a/det
	smax, smin := singularValues(ia, ib, ic, id)
	return Scale{
		Meridional:  math.Hypot(ib, id), // J^-1 (0, 1): a ground step north
		Parallel:    math.Hypot(ia, ic), // J^-1 (1, 0): a ground step east
		Max:         smax,
		Min:         smin,
		Convergence: north.azimuth,
	}
}

// singularValues of the 2x2 matrix [a b; c d], largest first, in the form
// that stays accurate when they are nearly equal (a nearly conformal map):
// the matrix is the sum of a scaled rotation, of scale q, and a scaled
// reflection, of scale r, and its singular values are q + r and |q - r|.
func singularValues(a, b, c, d float64) (float64, float64) {
	q := math.Hypot(a+d, c-b) / 2
	r := math.Hypot(a-d, b+c) / 2
	return q + r, math.Abs(q - r)
}
