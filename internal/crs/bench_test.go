//go:build cgo

package crs

import (
	"math"
	"testing"
)

// Benchmarks of the per-point costs a streamed layer pays (one ToLonLat or
// FromLonLat per receptor, one ScaleAt per request), each beside a floor
// measured in the same run: a transcendental call per point in pure Go.
// They report, they do not assert: no speed target is set for this
// package.

var sink float64

func BenchmarkFloorSincos(b *testing.B) {
	for i := range b.N {
		s, c := math.Sincos(float64(i) * 1e-6)
		sink += s + c
	}
}

func BenchmarkToLonLat(b *testing.B) {
	f := mustOpen(b, "EPSG:2272")
	for i := range b.N {
		lon, _, err := f.ToLonLat(2e6+float64(i%1000), 3e5)
		if err != nil {
			b.Fatal(err)
		}
		sink += lon
	}
}

func BenchmarkFromLonLat(b *testing.B) {
	f := mustOpen(b, "EPSG:32617")
	for i := range b.N {
		x, _, err := f.FromLonLat(-81+float64(i%1000)*1e-4, 37.5)
		if err != nil {
			b.Fatal(err)
		}
		sink += x
	}
}

func BenchmarkToLonLatParallel(b *testing.B) {
	f := mustOpen(b, "EPSG:2272")
	b.RunParallel(func(pb *testing.PB) {
		i := 0
		for pb.Next() {
			if _, _, err := f.ToLonLat(2e6+float64(i%1000), 3e5); err != nil {
				b.Error(err)
				return
			}
			i++
		}
	})
}

func BenchmarkScaleAt(b *testing.B) {
	f := mustOpen(b, "EPSG:32617")
	for i := range b.N {
		s, err := f.ScaleAt(512000+float64(i%1000), 4181000)
		if err != nil {
			b.Fatal(err)
		}
		sink += s.Max
	}
}

// BenchmarkOpenUncached is the cost of the first request naming a code.
func BenchmarkOpenUncached(b *testing.B) {
	for range b.N {
		if _, err := openFrame("EPSG:2272", 2272); err != nil {
			b.Fatal(err)
		}
	}
}
