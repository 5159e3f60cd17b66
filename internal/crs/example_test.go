//go:build cgo

package crs_test

import (
	"fmt"

	"downgradient/internal/crs"
)

// A site frame in UTM zone 17N: a well at easting 512,000 m, northing
// 4,181,000 m (invented position) in WGS 84 longitude/latitude, the
// projection's scale there, and a receptor given as longitude/latitude.
func ExampleOpen() {
	f, err := crs.Open("EPSG:32617")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s, %s (%g m per unit)\n", f.Name(), f.Unit().Name, f.Unit().ToMetres)
	lon, lat, _ := f.ToLonLat(512000, 4181000)
	fmt.Printf("lon %.6f, lat %.6f\n", lon, lat)
	s, _ := f.ScaleAt(512000, 4181000)
	fmt.Printf("scale %.6f, distortion %.3f %%, caveat %v\n", s.Parallel, 100*s.Distortion(), s.Distortion() > crs.DistortionCaveat)
	x, y, _ := f.FromLonLat(-80.8637, 37.7763)
	fmt.Printf("x %.1f, y %.1f\n", x, y)

	_, err = crs.Open("EPSG:4326")
	fmt.Println(err != nil)
	// Output:
	// WGS 84 / UTM zone 17N, metre (1 m per unit)
	// lon -80.863735, lat 37.776262
	// scale 0.999602, distortion 0.040 %, caveat false
	// x 512003.0, y 4181004.3
	// true
}
