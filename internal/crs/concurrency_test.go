//go:build cgo

package crs

import (
	"sync"
	"testing"
)

// Many goroutines share one Frame (each conversion borrows a PROJ worker
// of its own) and get exactly the results of one goroutine alone. Run with
// -race.
func TestConcurrentUse(t *testing.T) {
	f := mustOpen(t, "EPSG:2272")
	const n = 200
	type result struct{ lon, lat, x, y, k float64 }
	want := make([]result, n)
	point := func(i int) (float64, float64) { return 1.2e6 + 7000*float64(i), 1.5e5 + 2500*float64(i) }
	compute := func(i int) (result, error) {
		x, y := point(i)
		lon, lat, err := f.ToLonLat(x, y)
		if err != nil {
			return result{}, err
		}
		bx, by, err := f.FromLonLat(lon, lat)
		if err != nil {
			return result{}, err
		}
		s, err := f.ScaleAt(x, y)
		return result{lon, lat, bx, by, s.Parallel}, err
	}
	for i := range n {
		r, err := compute(i)
		if err != nil {
			t.Fatal(err)
		}
		want[i] = r
	}
	var wg sync.WaitGroup
	errs := make(chan string, 8)
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range n {
				i := (k + 25*g) % n
				r, err := compute(i)
				if err != nil || r != want[i] {
					errs <- "goroutine result differs"
					return
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}

// Opening the same code from many goroutines at once yields working
// Frames.
func TestConcurrentOpen(t *testing.T) {
	var wg sync.WaitGroup
	for range 6 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			f, err := Open("EPSG:2193")
			if err != nil {
				t.Error(err)
				return
			}
			if _, _, err := f.ToLonLat(1750000, 5900000); err != nil {
				t.Error(err)
			}
		}()
	}
	wg.Wait()
}
