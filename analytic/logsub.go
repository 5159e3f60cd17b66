package analytic

import "math"

// logSub returns ln x for x > 0, subnormal x included: on amd64 math.Log
// returns about -709 for every subnormal (its assembly does not normalize
// them), so a subnormal is scaled by 2^54 first. Other x as math.Log.
func logSub(x float64) float64 {
	if x > 0 && x < 0x1p-1022 {
		return math.Log(x*0x1p54) - 54*math.Ln2
	}
	return math.Log(x)
}
