package crs

import (
	"fmt"
	"strconv"
	"strings"
)

// maxEPSGCode bounds the numeric part of a code. EPSG codes are positive
// integers below 1,000,000 (the dataset's largest are six digits); a longer
// number is malformed rather than unknown.
const maxEPSGCode = 999999

// ParseCode checks that s names an EPSG CRS as "EPSG:NNNN" (the authority
// in any letter case, no spaces, a positive integer without sign or leading
// zero) and returns its canonical form "EPSG:NNNN" and its number. It does
// not look the code up: Open does.
func ParseCode(s string) (canonical string, number int, err error) {
	authority, digits, found := strings.Cut(s, ":")
	if !found || !strings.EqualFold(authority, "EPSG") {
		return "", 0, malformed(s, "it must be an EPSG code such as \"EPSG:32617\"")
	}
	if digits == "" || len(digits) > 6 || digits[0] == '0' {
		return "", 0, malformed(s, "the part after \"EPSG:\" must be a positive whole number of at most 6 digits")
	}
	for _, r := range digits {
		if r < '0' || r > '9' {
			return "", 0, malformed(s, "the part after \"EPSG:\" must be a positive whole number of at most 6 digits")
		}
	}
	n, convErr := strconv.Atoi(digits)
	if convErr != nil || n <= 0 || n > maxEPSGCode {
		return "", 0, malformed(s, "the part after \"EPSG:\" must be a positive whole number of at most 6 digits")
	}
	return "EPSG:" + digits, n, nil
}

func malformed(s, why string) *Error {
	shown := s
	if len(shown) > 40 {
		shown = shown[:40] + "..."
	}
	return newError(ErrMalformedCode, s, fmt.Sprintf("%q is not a CRS code: %s", shown, why))
}
