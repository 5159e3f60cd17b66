package uncertainty

import "downgradient/plume"

// UncertainParameter is one scenario number given as a distribution.
type UncertainParameter struct {
	// The number, by its JSON path within the scenario, e.g.
	// "aquifer.hydraulic_conductivity" or "receptors[2].x".
	Param plume.Param `json:"parameter"`
	// Its distribution, in the unit of the field.
	Dist Distribution `json:"distribution"`
}
