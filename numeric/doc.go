// Package numeric is a conservative finite-volume solver of the retarded
// advection-dispersion equation with first-order decay, the numeric
// cross-check of the closed forms used for screening.
//
// The equation is the one of the closed forms (consistent units, for example
// metres and days):
//
//	R dC/dt = Dx d2C/dx2 + Dy d2C/dy2 + Dz d2C/dz2 - V dC/dx - R Mu C
//
// with V the seepage velocity along +x (L/T), Dx, Dy, Dz the unretarded
// dispersion coefficients (L^2/T), R >= 1 the retardation factor and Mu >= 0
// the decay rate of the dissolved concentration in the retarded equation
// (1/T). Concentrations are relative to the source concentration (C/C0).
//
// It is solved cell by cell in conservative form: the change of stored mass
// R*C*volume in a cell equals what the face fluxes J = V C - D dC/dx carry
// through its faces (face area times flux) minus what decays. Each time step
// is split into
//
//   - advection along x: explicit flux-limited Lax-Wendroff (van Leer
//     limiter), total variation diminishing for Courant numbers up to 1, so it
//     creates no negative values and no overshoot above the source at any
//     grid Peclet number;
//   - dispersion, one direction at a time: a theta-scheme between
//     Crank-Nicolson and backward Euler (the smallest theta >= 1/2 that keeps
//     every coefficient non-negative), each direction a set of symmetric
//     positive definite tridiagonal systems factored once per time step size
//     with LAPACK Dpttrf (gonum) and solved for many right-hand sides; it is
//     unconditionally stable and keeps the maximum principle (no new
//     extrema);
//   - decay: the exact factor exp(-Mu dt).
//
// The order of the split operators is reversed from one step to the next
// (advection, dispersion, decay, then decay, dispersion, advection), so each
// pair of steps is a symmetric (Strang) composition, second order in the
// time step; the time step is set by the Courant limit V dt/(R dx) <=
// Courant (default 1), which the caller can tighten, and on the automatic 3D
// grid also by at least 16 steps over the travel time to the nearest
// receptor. In the 1D solver, where the positivity-preserving theta exceeds
// 1/2 the dispersion step first tries Crank-Nicolson and keeps it when it
// adds no variation and stays within the old range; the third-type inlet
// flux is shared between the advection and dispersion sub-steps as the
// Robin condition shares it between the two fluxes. Measured orders at a
// fixed Courant number: 1.45 (first-type inlet), 1.97 (third-type), 1.45
// (3D); about 2 with dt refined like dx^2.
//
// Steady states (an output time of +Inf) are solved directly from the steady
// balance of the cells with the same face fluxes, not by marching, so they
// carry no splitting error: in 1D by Picard iteration on the
// positive-coefficient form of the limited fluxes with LAPACK Dgtsv, in 3D
// by defect correction with an ADI preconditioner (see steady3d.go); both
// iterate until the summed absolute cell residual is below SteadyTolerance
// of the inflow, and report the iterations and the steady budget in rates.
//
// Every run keeps a mass budget (mass in through the inlet by advection and by
// dispersion, out through the outflow face, decayed, stored) whose closure
// error relative to the mass in is at round-off level (tests assert <= 1e-10).
//
// Two problems are solved:
//
//   - Screen1D: a column or streamtube with a general cross-section A(x)
//     (uniform, widening, radial), a concentration (first-type) or flux
//     (third-type) inlet and a free outflow boundary;
//   - Screen3D: the continuous vertical rectangular source of the screening
//     model (width W centred on y = 0, from the water table z = 0 down to
//     depth Z, on the inflow face x = 0), solved on half the domain (y >= 0,
//     symmetric about the plume axis) with no flux through the water table,
//     on a structured non-uniform grid designed automatically from the
//     dispersion coefficients, the source and the receptors.
//
// The package imports nothing of the project; it depends on the standard
// library and gonum only.
package numeric
