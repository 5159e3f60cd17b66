package crs

import (
	"fmt"
	"math"
	"sync"
)

// DistortionCaveat is the relative distance distortion (|scale - 1|) above
// which a caller should warn that distances measured in the site frame
// differ from true distances: 0.1 %.
const DistortionCaveat = 0.001

// roundTripTolerance is the largest distance, in metres, by which a point
// taken through the projection and back may miss itself before the point is
// refused as outside the projection's domain.
const roundTripTolerance = 0.001

// Unit is the linear unit of a projected CRS's axes.
type Unit struct {
	// Name as the EPSG dataset spells it: "metre", "US survey foot",
	// "foot" (the international foot), ...
	Name string
	// Code, "EPSG:9001" (metre), "EPSG:9003" (US survey foot), "EPSG:9002"
	// (foot); empty when the dataset gives none.
	Code string
	// ToMetres: metres per unit (1, 1200/3937, 0.3048, ...).
	ToMetres float64
}

// Area is a CRS's area of use as the EPSG dataset gives it: a box in
// degrees of longitude and latitude (West may exceed East for a box across
// the antimeridian) and a description.
type Area struct {
	West, South, East, North float64
	Name                     string
}

// Contains reports whether the point (lon, lat), in degrees, lies in the
// box.
func (a Area) Contains(lon, lat float64) bool {
	if lat < a.South || lat > a.North {
		return false
	}
	if a.West <= a.East {
		return lon >= a.West && lon <= a.East
	}
	return lon >= a.West || lon <= a.East
}

// Scale describes the projection's distortion at one point. Scales are
// ratios of a short distance in the projected plane to the same distance
// on the ellipsoid; 1 is no distortion.
type Scale struct {
	// Meridional is the scale along the meridian (h), Parallel along the
	// parallel (k); equal for a conformal projection (Transverse Mercator,
	// Lambert Conic Conformal).
	Meridional, Parallel float64
	// Max and Min are the largest and smallest scale over all directions
	// (Tissot's semi-axes).
	Max, Min float64
	// Convergence is the meridian convergence in degrees: the azimuth of
	// grid north (the +y axis) measured clockwise from true north, in
	// (-180, 180]; positive east of a Transverse Mercator's central
	// meridian in the northern hemisphere. A direction at azimuth A from
	// grid north (as the site frame's flow azimuth is) has azimuth
	// A + Convergence from true north.
	Convergence float64
}

// Distortion is the largest relative error of a distance measured in the
// projected plane at this point: max(|Max - 1|, |Min - 1|). Compare it
// with DistortionCaveat.
func (s Scale) Distortion() float64 {
	return math.Max(math.Abs(s.Max-1), math.Abs(s.Min-1))
}

// Operation names the coordinate operation PROJ used between the site
// frame and WGS 84 at a point, and its accuracy.
type Operation struct {
	// Name, e.g. "Inverse of UTM zone 17N" or "Inverse of SPCS83
	// Pennsylvania South zone (US Survey feet) + NAD83 to WGS 84 (1)".
	Name string
	// Accuracy in metres as the EPSG dataset gives it; negative when
	// unknown (a "ballpark" datum shift).
	Accuracy float64
	// Ballpark is true when PROJ had no published transformation between
	// the datums and assumed them equal.
	Ballpark bool
}

// Frame is a validated projected CRS used as a site frame. It is safe for
// concurrent use; Open returns one shared Frame per code.
type Frame struct {
	code       string
	name       string
	geodetic   string
	unit       Unit
	area       Area
	deprecated bool
	eng        engine
}

// engine is the PROJ side of a Frame (proj.go with cgo).
type engine interface {
	toLonLat(x, y float64) (lon, lat float64, err error)
	fromLonLat(lon, lat float64) (x, y float64, err error)
	toGeodetic(x, y float64) (lon, lat float64, err error)
	fromGeodetic(lon, lat float64) (x, y float64, err error)
	geodesic(lon1, lat1, lon2, lat2 float64) (s, az1, az2 float64, err error)
	operation(x, y float64) (Operation, error)
}

// Code is the canonical code, "EPSG:32617".
func (f *Frame) Code() string { return f.code }

// Name is the CRS's name in the EPSG dataset, "WGS 84 / UTM zone 17N".
func (f *Frame) Name() string { return f.name }

// GeodeticCRS is the name of the CRS's base geodetic CRS ("NAD83",
// "WGS 84", "OSGB36"), whose longitude/latitude ToGeodetic returns.
func (f *Frame) GeodeticCRS() string { return f.geodetic }

// Unit is the linear unit of the site coordinates.
func (f *Frame) Unit() Unit { return f.unit }

// Area is the CRS's area of use.
func (f *Frame) Area() Area { return f.area }

// Deprecated reports whether the EPSG dataset marks the CRS deprecated
// (it still works; a caller may say so).
func (f *Frame) Deprecated() bool { return f.deprecated }

// ToLonLat converts site coordinates (easting x, northing y, in the CRS's
// unit) to WGS 84 longitude and latitude in degrees.
func (f *Frame) ToLonLat(x, y float64) (lon, lat float64, err error) {
	if err := checkFinite(x, y); err != nil {
		return 0, 0, err
	}
	lon, lat, err = f.eng.toLonLat(x, y)
	if err != nil {
		return 0, 0, err
	}
	return lon, lat, f.checkResultLonLat(x, y, lon, lat)
}

// FromLonLat converts WGS 84 longitude and latitude in degrees to site
// coordinates (easting, northing in the CRS's unit).
func (f *Frame) FromLonLat(lon, lat float64) (x, y float64, err error) {
	if err := checkLonLat(lon, lat); err != nil {
		return 0, 0, err
	}
	x, y, err = f.eng.fromLonLat(lon, lat)
	if err != nil {
		return 0, 0, err
	}
	return x, y, f.checkResultXY(lon, lat, x, y)
}

// ToGeodetic converts site coordinates to longitude and latitude in
// degrees in the CRS's own geodetic CRS (GeodeticCRS): the projection
// alone, with no datum shift.
func (f *Frame) ToGeodetic(x, y float64) (lon, lat float64, err error) {
	if err := checkFinite(x, y); err != nil {
		return 0, 0, err
	}
	lon, lat, err = f.eng.toGeodetic(x, y)
	if err != nil {
		return 0, 0, err
	}
	return lon, lat, f.checkResultLonLat(x, y, lon, lat)
}

// FromGeodetic converts longitude and latitude in degrees in the CRS's own
// geodetic CRS to site coordinates: the projection alone.
func (f *Frame) FromGeodetic(lon, lat float64) (x, y float64, err error) {
	if err := checkLonLat(lon, lat); err != nil {
		return 0, 0, err
	}
	x, y, err = f.eng.fromGeodetic(lon, lat)
	if err != nil {
		return 0, 0, err
	}
	return x, y, f.checkResultXY(lon, lat, x, y)
}

// Operation reports the operation PROJ uses from the site frame to WGS 84
// at the site point (x, y), with its accuracy.
func (f *Frame) Operation(x, y float64) (Operation, error) {
	if _, _, err := f.ToLonLat(x, y); err != nil {
		return Operation{}, err
	}
	return f.eng.operation(x, y)
}

func checkFinite(x, y float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
		return newError(ErrNotFinite, "", fmt.Sprintf("site coordinates (%g, %g) are not finite numbers", x, y))
	}
	return nil
}

func checkLonLat(lon, lat float64) error {
	if math.IsNaN(lon) || math.IsInf(lon, 0) || math.IsNaN(lat) || math.IsInf(lat, 0) {
		return newError(ErrNotFinite, "", fmt.Sprintf("longitude/latitude (%g, %g) are not finite numbers", lon, lat))
	}
	if lon < -180 || lon > 180 {
		return newError(ErrOutOfRange, "", fmt.Sprintf("longitude %g is outside [-180, 180] degrees", lon))
	}
	if lat < -90 || lat > 90 {
		return newError(ErrOutOfRange, "", fmt.Sprintf("latitude %g is outside [-90, 90] degrees", lat))
	}
	return nil
}

// checkResultLonLat guards what PROJ returned for the site point (x, y).
func (f *Frame) checkResultLonLat(x, y, lon, lat float64) error {
	if math.IsNaN(lon) || math.IsInf(lon, 0) || math.IsNaN(lat) || math.IsInf(lat, 0) ||
		lon < -180 || lon > 180 || lat < -90 || lat > 90 {
		return f.outside(fmt.Sprintf("site point (%g, %g)", x, y))
	}
	return nil
}

// checkResultXY guards what PROJ returned for the point (lon, lat).
func (f *Frame) checkResultXY(lon, lat, x, y float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
		return f.outside(fmt.Sprintf("longitude/latitude (%g, %g)", lon, lat))
	}
	return nil
}

func (f *Frame) outside(what string) *Error {
	return newError(ErrOutsideProjection, f.code, fmt.Sprintf(
		"%s cannot be converted in %s (%s) to within 1 mm: it lies far outside the projection's domain (area of use: %s)",
		what, f.code, f.name, f.area.Name))
}

// frames caches the Frames opened, by canonical code; at most cacheSize,
// an arbitrary one dropped when full (its PROJ objects are freed once no
// caller holds it).
var frames = struct {
	sync.Mutex
	m map[string]*Frame
}{m: map[string]*Frame{}}

const cacheSize = 64

// Open validates an EPSG code for a site frame and returns its Frame. The
// errors, all *Error: ErrMalformedCode (not "EPSG:NNNN"), ErrUnknownCode
// (no such CRS in the EPSG dataset), ErrNotProjected (geographic in
// degrees, compound, vertical, ...), ErrUnsupportedAxes (not an easting and
// a northing in one linear unit), ErrUnavailable (built without cgo).
func Open(code string) (*Frame, error) {
	canonical, number, err := ParseCode(code)
	if err != nil {
		return nil, err
	}
	frames.Lock()
	f, ok := frames.m[canonical]
	frames.Unlock()
	if ok {
		return f, nil
	}
	f, err = openFrame(canonical, number)
	if err != nil {
		return nil, err
	}
	frames.Lock()
	defer frames.Unlock()
	if old, ok := frames.m[canonical]; ok {
		return old, nil
	}
	if len(frames.m) >= cacheSize {
		for k := range frames.m {
			delete(frames.m, k)
			break
		}
	}
	frames.m[canonical] = f
	return f, nil
}
