// Package runtimetune sets the Go runtime for the service's load: requests
// whose work is almost all CPU, queued first come, first served for a few
// computation slots (one per core).
//
// Two settings matter under load (measured with 32 clients on 2 cores; see
// docs/performance.md, "Load"):
//
//   - A spare processor. When every Go processor (GOMAXPROCS) runs a
//     computation, the runtime looks for network input only from its
//     background monitor, about every 10 ms, or when a garbage collection
//     stops the world; requests that arrive meanwhile wait unseen and then
//     enter the scheduler together, in no particular order, and the slowest
//     1 % take 4 times the median. With one processor more than there are
//     slots, one is nearly always free to read new requests at once, so
//     they join the slots' first-come queue in arrival order.
//   - A less eager garbage collector. Each request allocates about 70 kB
//     and keeps almost nothing, so the live heap is a few MiB and the
//     default target (GOGC 100) collects about 30 times a second. A higher
//     target collects less often; a soft memory limit (GOMEMLIMIT) makes the
//     collector work harder again as the heap nears it, so that a large
//     request does not grow the process to a multiple of its live data.
//
// Settings given in the environment (GOMAXPROCS, GOGC, GOMEMLIMIT) win:
// Apply leaves each of them as the runtime already set it.
package runtimetune

import (
	"math"
	"os"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
)

// Defaults of the service (the flags of the downgradient command).
const (
	// DefaultSpareProcs is the number of Go processors beyond the
	// computation slots.
	DefaultSpareProcs = 1
	// DefaultGCPercent is the garbage collector's target: the heap may
	// grow by this percentage of the live heap between collections.
	DefaultGCPercent = 400
	// DefaultMemoryLimitMiB is the soft memory limit of the Go runtime,
	// MiB; it stays under the 500 MiB that the worst-case requests of the
	// load tests may take (docs/operations.md).
	DefaultMemoryLimitMiB = 384
)

// Settings are what Apply sets.
type Settings struct {
	// Slots is the number of computation slots (requests computing at
	// once), at least 1.
	Slots int
	// SpareProcs is the number of Go processors beyond Slots: GOMAXPROCS
	// becomes max(its current value, Slots+SpareProcs). 0 or less leaves
	// it as it is.
	SpareProcs int
	// GCPercent is the garbage collector's target (as GOGC); 0 or less
	// leaves the runtime's.
	GCPercent int
	// MemoryLimitMiB is the soft memory limit (as GOMEMLIMIT), MiB; 0 or
	// less sets none.
	MemoryLimitMiB int
}

// Applied says what the runtime runs with after Apply.
type Applied struct {
	Procs          int      // GOMAXPROCS
	GCPercent      int      // the collector's target, percent; negative: off
	MemoryLimitMiB int64    // soft memory limit, MiB; -1: none
	FromEnv        []string // the variables set in the environment, which Apply left alone
}

// lookupEnv is os.LookupEnv (replaced in tests).
var lookupEnv = os.LookupEnv

// Apply sets the runtime from s, except where the environment already
// did, and returns what is in force. Call it once, at start, before the
// server accepts connections. Setting GOMAXPROCS here turns off the
// runtime's own updates of it (to a container's CPU limit changed while
// the process runs); set GOMAXPROCS in the environment to keep them.
func Apply(s Settings) Applied {
	var a Applied
	if _, set := lookupEnv("GOMAXPROCS"); set {
		a.FromEnv = append(a.FromEnv, "GOMAXPROCS")
	} else if s.SpareProcs > 0 {
		if want := max(s.Slots, 1) + s.SpareProcs; want > runtime.GOMAXPROCS(0) {
			runtime.GOMAXPROCS(want)
		}
	}
	a.Procs = runtime.GOMAXPROCS(0)

	if _, set := lookupEnv("GOGC"); set {
		a.FromEnv = append(a.FromEnv, "GOGC")
	} else if s.GCPercent > 0 {
		debug.SetGCPercent(s.GCPercent)
	}

	if _, set := lookupEnv("GOMEMLIMIT"); set {
		a.FromEnv = append(a.FromEnv, "GOMEMLIMIT")
	} else if s.MemoryLimitMiB > 0 {
		debug.SetMemoryLimit(int64(s.MemoryLimitMiB) << 20)
	}
	gogc, limit := current()
	a.GCPercent = int(gogc)
	a.MemoryLimitMiB = -1
	if limit != math.MaxInt64 {
		a.MemoryLimitMiB = limit >> 20
	}
	return a
}

// current reads the collector's target (percent; negative when off) and
// the soft memory limit (bytes; math.MaxInt64 when none) from
// runtime/metrics, which reads them without changing either.
func current() (gogc, limit int64) {
	samples := []metrics.Sample{{Name: "/gc/gogc:percent"}, {Name: "/gc/gomemlimit:bytes"}}
	metrics.Read(samples)
	return int64(samples[0].Value.Uint64()), int64(samples[1].Value.Uint64())
}
