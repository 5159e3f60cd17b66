//go:build !cgo

package crs

// openFrame without cgo: PROJ is a C library, so no CRS can be opened.
func openFrame(code string, _ int) (*Frame, error) {
	return nil, newError(ErrUnavailable, code, code+
		": coordinate reference systems need PROJ, and this program was built without cgo (CGO_ENABLED=0)")
}

// ProjVersion is empty: no PROJ library is linked.
func ProjVersion() string { return "" }
