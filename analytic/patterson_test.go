package analytic

import (
	"math"
	"testing"
)

// The nested rules of patterson_table.go against their 30-digit values in
// testdata/reference/patterson.json (both written by
// testdata/reference/gen_patterson.py from the construction of Patterson
// 1968, Math. Comp. 22, 847-856, which also tabulates them), and their
// degree of exactness in float64: each rule integrates x^k over [-1, 1]
// exactly up to its degree.
func TestPattersonRules(t *testing.T) {
	var f struct {
		Nodes []refNum `json:"nodes"`
		Rules []struct {
			Points  int      `json:"points"`
			Degree  int      `json:"degree"`
			Index   []int    `json:"index"`
			Weights []refNum `json:"weights"`
		} `json:"rules"`
	}
	refLoad(t, "patterson.json", &f)
	if len(f.Nodes) != 63 || len(f.Rules) != 5 {
		t.Fatalf("reference file: %d nodes, %d rules", len(f.Nodes), len(f.Rules))
	}
	for i, x := range f.Nodes {
		if math.Abs(pattersonNodes[i]-float64(x)) > 1e-16 {
			t.Errorf("node %d: %v, reference %v", i, pattersonNodes[i], float64(x))
		}
	}
	for k, r := range f.Rules {
		stride := 1 << (4 - k)
		if r.Points != 63/stride || len(pattersonWeights[k]) != r.Points {
			t.Fatalf("rule %d: %d points, table %d", k, r.Points, len(pattersonWeights[k]))
		}
		for j, w := range r.Weights {
			if r.Index[j] != stride*(j+1)-1 {
				t.Errorf("rule %d node %d: index %d, want %d", k, j, r.Index[j], stride*(j+1)-1)
			}
			if math.Abs(pattersonWeights[k][j]-float64(w)) > 2e-16 {
				t.Errorf("rule %d weight %d: %v, reference %v", k, j, pattersonWeights[k][j], float64(w))
			}
		}
		// integral_{-1}^{1} x^p dx = 2/(p+1) for even p, 0 for odd p.
		for p := 0; p <= r.Degree; p++ {
			var s float64
			for j := range pattersonWeights[k] {
				s += pattersonWeights[k][j] * math.Pow(pattersonNodes[stride*(j+1)-1], float64(p))
			}
			want := 0.0
			if p%2 == 0 {
				want = 2 / float64(p+1)
			}
			if math.Abs(s-want) > 1e-14 {
				t.Errorf("rule of %d points: x^%d gives %v, want %v", r.Points, p, s, want)
			}
		}
	}
}
