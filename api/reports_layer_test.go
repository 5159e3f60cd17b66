package api

import (
	"fmt"
	"math"
	"testing"
)

// layerMap is the demo scenario with a layer of n receptors (parcel
// corners, invented) on a jittered grid around the plume: from 100 m
// upgradient to 1,100 m downgradient of the source and 240 m either side
// of the flow line, in site coordinates to one decimal.
func layerMap(t testing.TB, n int) map[string]any {
	t.Helper()
	m := demoMap(t)
	cols := int(math.Ceil(math.Sqrt(float64(n) * 2.5)))
	rows := (n + cols - 1) / cols
	az := 110 * math.Pi / 180
	fx, fy := math.Sin(az), math.Cos(az) // flow direction in site x, y
	recs := make([]any, 0, n)
	for k := 0; k < n; k++ {
		i, j := k%cols, k/cols
		// A fixed jitter from the index (no random stream: the layer is the same on every run).
		jx := 0.3 * math.Sin(float64(7*k+1))
		jy := 0.3 * math.Cos(float64(11*k+3))
		along := -100 + 1200*(float64(i)+0.5+jx)/float64(cols)
		across := -240 + 480*(float64(j)+0.5+jy)/float64(rows)
		x := 1250 + along*fx - across*fy
		y := 830 + along*fy + across*fx
		recs = append(recs, map[string]any{"id": fmt.Sprintf("L-%03d", k+1),
			"x": math.Round(x*10) / 10, "y": math.Round(y*10) / 10, "z": 0})
	}
	m["receptors"] = recs
	return m
}
