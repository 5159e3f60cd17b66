package plume

import (
	"fmt"
	"math"
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
	var fe FieldErrors
	if len(obs) == 0 {
		fe.add("observations", "at least one observation is needed")
	}
	for i, o := range obs {
		at := func(f string) string { return fmt.Sprintf("observations[%d].%s", i, f) }
		if o.X == nil {
			fe.add(at("x"), "required field is missing")
		}
		if o.Y == nil {
			fe.add(at("y"), "required field is missing")
		}
		fe.check(at("x"), o.X, anyFinite)
		fe.check(at("y"), o.Y, anyFinite)
		fe.check(at("z"), o.Z, nonNegative)
		if needTime && o.Time == nil {
			fe.add(at("time"), "required field is missing: the sampling time, T, on the scenario's clock")
		}
		fe.check(at("time"), o.Time, nonNegative)
		if o.detected() {
			if o.Concentration == nil {
				fe.add(at("concentration"), "required for a detect (> 0); for a non-detect set detected: false and give detection_limit")
			} else {
				fe.check(at("concentration"), o.Concentration, positive)
			}
		} else {
			if o.DetectionLimit == nil {
				fe.add(at("detection_limit"), "required for a non-detect (detected: false): the laboratory's detection limit, C, > 0")
			}
		}
		fe.check(at("detection_limit"), o.DetectionLimit, positive)
	}
	return fe.orNil()
}

// obsPoint is an observation in canonical units and the plume frame.
type obsPoint struct {
	index    int
	well     string
	pt       point   // plume-frame point (classified)
	tau      float64 // elapsed time since the source started, d
	c        float64 // concentration (detect) or detection limit (non-detect), mg/L
	detected bool
}

// observationPoints converts observations to the plume frame of pr, in
// canonical units; the wells count toward the travel distance of estimated
// dispersivities only through prepare's extraX.
func (pr *prepared) observationPoints(obs []Observation) []obsPoint {
	out := make([]obsPoint, len(obs))
	uf := pr.uf
	for i, o := range obs {
		r := Receptor{ID: o.WellID, X: scaled(o.X, uf.L), Y: scaled(o.Y, uf.L), Z: scaled(o.Z, uf.L)}
		p := pr.pointAt(r, i)
		if p.id == fmt.Sprintf("R%d", i+1) && o.WellID == "" {
			p.id = fmt.Sprintf("observation %d", i+1)
		}
		pr.m.classify(&p)
		op := obsPoint{index: i, well: p.id, pt: p, detected: o.detected(), tau: math.Inf(1)}
		if o.Time != nil {
			op.tau = *o.Time*uf.T - pr.m.start
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

// wellPlumeX returns the plume-frame x, m, of each observation, for the
// travel distance of an estimated dispersivity.
func wellPlumeX(sc Scenario, obs []Observation) []float64 {
	f, ok := sc.Units.factors()
	if !ok {
		return nil
	}
	fr := frameOf(toCanonical(sc).Source)
	var xs []float64
	for _, o := range obs {
		if o.X != nil && o.Y != nil && finite(*o.X) && finite(*o.Y) {
			px, _ := fr.ToPlume(*o.X*f.L, *o.Y*f.L)
			xs = append(xs, px)
		}
	}
	return xs
}
