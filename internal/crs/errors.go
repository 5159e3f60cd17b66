package crs

import "errors"

// The kinds of error Open and the conversions return; test with errors.Is.
// Every one but ErrUnavailable is a fault of the input (an HTTP API maps
// them to 422 naming the field); ErrUnavailable is the server's.
var (
	// ErrMalformedCode: the string is not of the form "EPSG:NNNN".
	ErrMalformedCode = errors.New("malformed CRS code")
	// ErrUnknownCode: the EPSG dataset has no CRS with that code.
	ErrUnknownCode = errors.New("unknown CRS code")
	// ErrNotProjected: the CRS exists but is not a projected CRS (for
	// example geographic, in degrees, or compound).
	ErrNotProjected = errors.New("CRS is not a projected CRS")
	// ErrUnsupportedAxes: a projected CRS whose axes are not an easting
	// and a northing in one linear unit (south- or west-oriented grids,
	// polar grids, three axes).
	ErrUnsupportedAxes = errors.New("CRS axes not supported")
	// ErrOutOfRange: longitude outside [-180, 180] or latitude outside
	// [-90, 90] degrees.
	ErrOutOfRange = errors.New("longitude or latitude out of range")
	// ErrNotFinite: a coordinate is NaN or infinite.
	ErrNotFinite = errors.New("coordinate not finite")
	// ErrOutsideProjection: PROJ cannot convert the point to within 1 mm
	// (far outside the projection's domain).
	ErrOutsideProjection = errors.New("point outside the projection's domain")
	// ErrUnavailable: the program was built without cgo, so without PROJ,
	// or PROJ failed on a CRS it had validated (an installation fault such
	// as a missing proj.db, not the input's).
	ErrUnavailable = errors.New("coordinate reference systems unavailable")
)

// Error is the error every function of the package returns: Kind is one of
// the Err values above (errors.Is matches it), Code the CRS code as given
// (empty for a point error), Message a sentence for a person.
type Error struct {
	Kind    error
	Code    string
	Message string
}

func (e *Error) Error() string { return e.Message }

// Unwrap lets errors.Is(err, ErrUnknownCode) and the like match.
func (e *Error) Unwrap() error { return e.Kind }

func newError(kind error, code, message string) *Error {
	return &Error{Kind: kind, Code: code, Message: message}
}
