package analytic

import (
	"errors"
	"fmt"
	"math"
)

// Params are the transport coefficients of the retarded equation (see the
// package documentation), in consistent units of length L and time T.
type Params struct {
	V  float64 // seepage velocity along +x, L/T, > 0
	Dx float64 // longitudinal dispersion coefficient, L^2/T, > 0
	Dy float64 // transverse horizontal dispersion coefficient, L^2/T, > 0 (3D only)
	Dz float64 // transverse vertical dispersion coefficient, L^2/T, > 0 (3D only)
	R  float64 // retardation factor, dimensionless, >= 1
	Mu float64 // first-order decay rate of the dissolved concentration, 1/T, >= 0
}

// Source is the continuous planar source of the 3D solutions: a vertical
// rectangle on the plane x = 0, of width Width centred on y = 0, reaching from
// the water table (z = 0, a no-flux boundary) down to depth Depth. Both in L,
// > 0. math.Inf(1) for both turns the 3D solutions into the 1D column.
type Source struct {
	Width float64
	Depth float64
}

// ErrInvalid is wrapped by every validation error of this package.
var ErrInvalid = errors.New("analytic: invalid input")

func finitePositive(name string, v float64) error {
	if !(v > 0) || math.IsInf(v, 0) {
		return fmt.Errorf("%w: %s must be finite and > 0, got %g", ErrInvalid, name, v)
	}
	return nil
}

// Validate reports the first coefficient out of range. Dy and Dz are checked
// only when threeD is true.
func (p Params) Validate(threeD bool) error {
	if err := finitePositive("V", p.V); err != nil {
		return err
	}
	if err := finitePositive("Dx", p.Dx); err != nil {
		return err
	}
	if threeD {
		if err := finitePositive("Dy", p.Dy); err != nil {
			return err
		}
		if err := finitePositive("Dz", p.Dz); err != nil {
			return err
		}
	}
	if !(p.R >= 1) || math.IsInf(p.R, 0) {
		return fmt.Errorf("%w: R must be finite and >= 1, got %g", ErrInvalid, p.R)
	}
	if !(p.Mu >= 0) || math.IsInf(p.Mu, 0) {
		return fmt.Errorf("%w: Mu must be finite and >= 0, got %g", ErrInvalid, p.Mu)
	}
	return nil
}

// History describes how the source concentration varies in time: C0
// exp(-Depletion s) while the source is active, 0 <= s <= Duration, and 0
// after; or, with Rate > 0, the power-law depletion of a source by its
// mass (see history_power.go). The zero value is a constant source that
// starts at t = 0 and never stops.
type History struct {
	// Duration is how long the source is active, T. 0 or +Inf: it never
	// stops. By superposition the solution is exp(-Depletion t) [F(t) -
	// F(t - Duration)], F the solution for a constant source with the
	// decay rate Mu - Depletion; the closed forms use it where the
	// difference keeps its digits, the time integrals take the active ages
	// directly.
	Duration float64
	// Depletion is the first-order decline rate of the source
	// concentration, 1/T: C_source(t) = C0 exp(-Depletion t). 0: constant.
	Depletion float64
	// Rate is the depletion rate k = Q C0/M0 of a source that loses its
	// dissolvable mass M0 to the water flux Q through its face, 1/T; 0:
	// the source does not deplete by mass. Rate > 0 replaces Depletion.
	Rate float64
	// Exponent is Gamma of the power-law source function Cs/C0 =
	// (M/M0)^Gamma, in [0, MaxExponent], used only when Rate > 0. Its zero
	// value is Gamma = 0 (a constant source for 1/Rate), not the
	// exponential Gamma = 1 (Depletion = Rate): give Exponent: 1 for that.
	Exponent float64
}

func (h History) finite() bool { return h.Duration > 0 && !math.IsInf(h.Duration, 1) }

// Point is a receptor in the plume frame: X along flow from the source
// plane, Y transverse, and the depth interval [Top, Bottom] below the water
// table over which the value is averaged (Top == Bottom: a point at that
// depth). Lengths in L.
type Point struct {
	X, Y        float64
	Top, Bottom float64
}

// Inlet selects the inlet boundary condition of the 1D column.
type Inlet int

const (
	// FirstType holds the inlet concentration at C0 (Ogata & Banks 1961).
	FirstType Inlet = iota
	// ThirdType holds the inlet solute flux at V C0 (van Genuchten & Alves 1982).
	ThirdType
)
