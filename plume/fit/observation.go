package fit

import (
	"fmt"
	"math"

	"downgradient/plume"
)

// MaxObservations is the most monitoring observations one request may hold.
const MaxObservations = 10_000

// Observation is one monitoring result (DESIGN.md 4b): a sample from a well
// at site coordinates (x, y) and depth z below the water table, taken at a
// time on the scenario's clock (source.start based, T). A detect has a
// concentration (C, > 0); a non-detect has detected false and the
// laboratory's detection (reporting) limit instead, and is treated as
// censored: the true value lies somewhere in [0, detection_limit).
type Observation struct {
	// Well identifier (free text; used to group and report).
	WellID string `json:"well_id"`
	// Site x (east), L.
	X *float64 `json:"x"`
	// Site y (north), L.
	Y *float64 `json:"y"`
	// Depth of the sample below the water table, L, >= 0; default 0.
	Z *float64 `json:"z"`
	// Sampling time since the clock's origin, T, >= 0.
	Time *float64 `json:"time"`
	// Measured concentration, C, > 0 (detects only; ignored for a non-detect).
	Concentration *float64 `json:"concentration"`
	// False for a non-detect; default true.
	Detected *bool `json:"detected"`
	// Detection limit, C, > 0; required for a non-detect.
	DetectionLimit *float64 `json:"detection_limit"`
}

// detected reports the observation's detect flag (default true).
func (o Observation) detected() bool { return o.Detected == nil || *o.Detected }

// ValidateObservations checks the observations; needTime requires a time
// on each. Paths are "observations[i].field".
func ValidateObservations(obs []Observation, needTime bool) error {
	var fe plume.FieldErrors
	if len(obs) == 0 {
		fe.Add("observations", "at least one observation is needed")
	}
	for i, o := range obs {
		at := func(f string) string { return fmt.Sprintf("observations[%d].%s", i, f) }
		fe.CheckText(at("well_id"), o.WellID, false)
		if o.X == nil {
			fe.Add(at("x"), "required field is missing")
		}
		if o.Y == nil {
			fe.Add(at("y"), "required field is missing")
		}
		fe.Check(at("x"), o.X, plume.AnyFinite)
		fe.Check(at("y"), o.Y, plume.AnyFinite)
		fe.Check(at("z"), o.Z, plume.NonNegative)
		if needTime && o.Time == nil {
			fe.Add(at("time"), "required field is missing: the sampling time, T, on the scenario's clock")
		}
		fe.Check(at("time"), o.Time, plume.NonNegative)
		if o.detected() {
			if o.Concentration == nil {
				fe.Add(at("concentration"), "required for a detect (> 0); for a non-detect set detected: false and give detection_limit")
			} else {
				fe.Check(at("concentration"), o.Concentration, plume.Positive)
			}
		} else {
			if o.DetectionLimit == nil {
				fe.Add(at("detection_limit"), "required for a non-detect (detected: false): the laboratory's detection limit, C, > 0")
			}
		}
		fe.Check(at("detection_limit"), o.DetectionLimit, plume.Positive)
	}
	return fe.Err()
}

// obsPoint is an observation in canonical units and the plume frame.
type obsPoint struct {
	index    int
	well     string
	pt       plume.Point // plume-frame point (classified)
	tau      float64     // elapsed time since the source started, d
	c        float64     // concentration (detect) or detection limit (non-detect), mg/L
	detected bool
}

// observationPoints converts observations to the plume frame of md, in
// canonical units.
func observationPoints(md *plume.Model, obs []Observation) []obsPoint {
	out := make([]obsPoint, len(obs))
	uf := md.Factors()
	for i, o := range obs {
		id := o.WellID
		if id == "" {
			id = fmt.Sprintf("observation %d", i+1)
		}
		z := 0.0
		if o.Z != nil {
			z = *o.Z * uf.L
		}
		p := md.LocateSite(id, *o.X*uf.L, *o.Y*uf.L, z)
		op := obsPoint{index: i, well: p.ID, pt: p, detected: o.detected(), tau: math.Inf(1)}
		if o.Time != nil {
			op.tau = md.Elapsed(*o.Time)
		}
		if op.detected {
			op.c = *o.Concentration * uf.C
		} else {
			op.c = *o.DetectionLimit * uf.C
		}
		out[i] = op
	}
	return out
}

// WellReceptors returns one receptor per observed well, at the first
// position given for its well_id (an observation without an id is its own
// well, "observation <i+1>"), at most limit of them, for a scenario that
// gives no receptors of its own.
func WellReceptors(obs []Observation, limit int) []plume.Receptor {
	seen := map[string]bool{}
	var rs []plume.Receptor
	for i, o := range obs {
		if o.X == nil || o.Y == nil {
			continue
		}
		id := o.WellID
		if id == "" {
			id = fmt.Sprintf("observation %d", i+1)
		}
		if seen[id] || len(rs) >= limit {
			continue
		}
		seen[id] = true
		rs = append(rs, plume.Receptor{ID: id, X: o.X, Y: o.Y, Z: o.Z})
	}
	return rs
}
