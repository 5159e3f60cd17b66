//go:build !cgo

package crs

import (
	"errors"
	"testing"
)

// Without cgo there is no PROJ: Open says so for a well-formed code and
// still refuses a malformed one as malformed.
func TestOpenWithoutCgo(t *testing.T) {
	if _, err := Open("EPSG:32617"); !errors.Is(err, ErrUnavailable) {
		t.Errorf("Open without cgo: %v, want ErrUnavailable", err)
	}
	if _, err := Open("UTM17"); !errors.Is(err, ErrMalformedCode) {
		t.Errorf("Open(malformed) without cgo: %v, want ErrMalformedCode", err)
	}
}
