//go:build race

package api

// raceEnabled: the race detector changes what allocates (sync.Pool drops
// items at random under it), so allocation counts are not checked.
const raceEnabled = true
