//go:build !race

package api

// raceEnabled: see race_on_test.go.
const raceEnabled = false
