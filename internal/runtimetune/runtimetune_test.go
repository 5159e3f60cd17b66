package runtimetune

import (
	"fmt"
	"math"
	"runtime"
	"runtime/debug"
	"slices"
	"testing"
)

// restoreRuntime puts GOMAXPROCS, the collector's target and the memory
// limit back as they were when the test ends (Apply changes the process).
func restoreRuntime(t *testing.T) {
	t.Helper()
	procs := runtime.GOMAXPROCS(0)
	gogc, limit := current()
	t.Cleanup(func() {
		runtime.GOMAXPROCS(procs)
		debug.SetGCPercent(int(gogc))
		debug.SetMemoryLimit(limit)
	})
}

// fakeEnv makes lookupEnv see only the variables in env.
func fakeEnv(t *testing.T, env map[string]string) {
	t.Helper()
	saved := lookupEnv
	lookupEnv = func(k string) (string, bool) { v, ok := env[k]; return v, ok }
	t.Cleanup(func() { lookupEnv = saved })
}

func TestApply(t *testing.T) {
	cores := runtime.GOMAXPROCS(0)
	tests := []struct {
		name      string
		env       map[string]string
		s         Settings
		procs     int
		gcPercent int
		limitMiB  int64
		fromEnv   []string
	}{
		{
			name:      "defaults: one processor beyond the slots",
			s:         Settings{Slots: cores, SpareProcs: DefaultSpareProcs, GCPercent: DefaultGCPercent, MemoryLimitMiB: DefaultMemoryLimitMiB},
			procs:     cores + 1,
			gcPercent: 400,
			limitMiB:  384,
		},
		{
			name:      "fewer slots than processors: GOMAXPROCS never lowered",
			s:         Settings{Slots: 1, SpareProcs: 1, GCPercent: 150, MemoryLimitMiB: 100},
			procs:     max(cores, 2),
			gcPercent: 150,
			limitMiB:  100,
		},
		{
			name:      "zeros leave the runtime's values",
			s:         Settings{Slots: cores},
			procs:     cores,
			gcPercent: 100,
			limitMiB:  -1,
		},
		{
			name:      "the environment wins",
			env:       map[string]string{"GOMAXPROCS": "1", "GOGC": "50", "GOMEMLIMIT": "1GiB"},
			s:         Settings{Slots: cores, SpareProcs: 3, GCPercent: 400, MemoryLimitMiB: 384},
			procs:     cores,
			gcPercent: 100,
			limitMiB:  -1,
			fromEnv:   []string{"GOMAXPROCS", "GOGC", "GOMEMLIMIT"},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			restoreRuntime(t)
			// Each case starts from the runtime's own values (the
			// variables of fakeEnv are only seen by Apply).
			runtime.GOMAXPROCS(cores)
			debug.SetGCPercent(100)
			debug.SetMemoryLimit(math.MaxInt64) // no limit
			fakeEnv(t, tc.env)
			got := Apply(tc.s)
			if got.Procs != tc.procs || runtime.GOMAXPROCS(0) != tc.procs {
				t.Errorf("GOMAXPROCS: reported %d, runtime %d, want %d", got.Procs, runtime.GOMAXPROCS(0), tc.procs)
			}
			gogc, limit := current()
			if got.GCPercent != tc.gcPercent || int(gogc) != tc.gcPercent {
				t.Errorf("GC percent: reported %d, runtime %d, want %d", got.GCPercent, gogc, tc.gcPercent)
			}
			wantLimit := int64(math.MaxInt64)
			if tc.limitMiB >= 0 {
				wantLimit = tc.limitMiB << 20
			}
			if got.MemoryLimitMiB != tc.limitMiB || limit != wantLimit {
				t.Errorf("memory limit: reported %d MiB, runtime %d bytes, want %d MiB", got.MemoryLimitMiB, limit, tc.limitMiB)
			}
			if !slices.Equal(got.FromEnv, tc.fromEnv) {
				t.Errorf("left to the environment: %v, want %v", got.FromEnv, tc.fromEnv)
			}
		})
	}
}

// The service's start: two slots on a two-core machine run on three Go
// processors.
func ExampleApply() {
	saved := lookupEnv
	lookupEnv = func(string) (string, bool) { return "", false }
	defer func() { lookupEnv = saved }()
	procs := runtime.GOMAXPROCS(2)
	defer runtime.GOMAXPROCS(procs)
	gogc, limit := current()
	defer debug.SetGCPercent(int(gogc))
	defer debug.SetMemoryLimit(limit)

	a := Apply(Settings{Slots: 2, SpareProcs: DefaultSpareProcs, GCPercent: DefaultGCPercent, MemoryLimitMiB: DefaultMemoryLimitMiB})
	fmt.Println(a.Procs, a.GCPercent, a.MemoryLimitMiB)
	// Output: 3 400 384
}
