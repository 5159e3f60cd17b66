// Package analytic holds the closed-form solutions of the advection-dispersion
// equation used for screening: the 1D column (Ogata-Banks, first- and
// third-type inlet, with retardation and first-order decay), the exact time
// integral for a continuous finite planar source in 3D, the Domenico (1987)
// approximation of it, source histories by superposition, instantaneous
// releases (Gaussian puffs) and depth averages over well screens.
//
// Every function takes float64s in one consistent set of units (for example
// metres and days) and returns a concentration relative to the source
// concentration (C/C0) unless it says otherwise. The package knows nothing of
// units, HTTP or the rest of the project.
//
// The equation solved is the retarded advection-dispersion equation with
// uniform flow along +x:
//
//	dC/dt = (Dx/R) d2C/dx2 + (Dy/R) d2C/dy2 + (Dz/R) d2C/dz2 - (V/R) dC/dx - Mu C
//
// Mu is the decay rate acting on the dissolved concentration in this retarded
// form; the caller chooses it (ln2/half-life when the half-life applies to
// dissolved and sorbed mass alike, that divided by R when it applies to the
// dissolved phase only).
//
// Passing t = math.Inf(1) asks for the steady state. All results are finite
// and non-negative for valid input: exp(a)*erfc(b) products are evaluated in
// scaled form (see Erfcx and ExpErfc) so that large Peclet numbers, early
// times and far receptors neither overflow nor lose the far tail.
package analytic
