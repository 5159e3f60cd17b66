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
//
// # Decay chains
//
// Several compounds linked by decay (a parent forming a daughter with a mass
// yield; at most one daughter each, any number of parents, any compound
// also released at the source) are a Chain of Compounds; chain.go derives
// the equations and the production term y_p R_p Mu_p C_p for distinct
// retardation factors and both decay conventions (RetardedDecayRate). One
// call evaluates every compound at one receptor and time:
//
//	out := make([]float64, len(chain))
//	err := analytic.ChainExact3DAt(pt, t, p, src, hist, chain, c0, out) // equal R: exact 3D
//	err = analytic.ChainDomenicoAt(pt, t, p, src, hist, chain, c0, out) // equal R: Domenico (approximation)
//	err = analytic.ChainColumnAt(x, t, p, inlet, hist, chain, c0, out)  // 1D column, any R
//
// with c0 the source concentration of each compound (in any unit; out is
// in the same unit), p the shared V and dispersion coefficients (its R and
// Mu are ignored) and t = +Inf for the steady state. With equal retardation
// the chain decouples (Sun, Petersen & Clement 1999): Chain.Terms gives
// each compound as a combination of single-compound solutions with the
// rates of its decay paths, including the repeated-rate limit, and the
// evaluators use it, switching a compound whose terms would cancel to the
// age integral of its Bateman (1910) weights. In 1D with distinct
// retardation ChainColumnAt inverts the Laplace-domain solution
// (ChainColumnLaplace, which also reports an error estimate); there is no
// closed form in 3D with distinct retardation (ChainExact3DAt returns
// ErrDistinctRetardation). Chain.Bateman is the chain without transport
// (an instantaneous release's compounds all have the same age). See
// ExampleChainExact3DAt.
package analytic
