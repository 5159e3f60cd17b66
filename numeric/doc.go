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
// Courant (default 1), which the caller can tighten, on the automatic 3D
// grid also by at least 16 steps over the travel time to the nearest
// receptor, and on the automatic 1D grid by at least 32 steps up to each
// output time (with 10 cells per spreading length at the first one, so
// early times are resolved). In the 1D solver, where the positivity-preserving theta exceeds
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
//     dispersion coefficients, the source and the receptors; or several
//     such sources, each with its own position, size, strength and
//     history, on one grid (Problem3D.Sources: one field per source over
//     the cells downstream of its face, so the result is the superposition
//     of the closed forms; the whole width when a source is off the axis);
//     and the advective mass discharge through rectangles of planes across
//     flow (Problem3D.Transects).
//
// Source histories (History): continuous, switched off after a duration,
// declining exponentially at a fixed rate, or depleting by mass with the
// power-law source function of Falta, Rao & Basu (2005); each time step
// applies the mean source concentration over the step at the inlet (for a
// source depleting by mass, exactly the mass it lost).
//
// Bounded work. Every count derived from the inputs (cells of each axis,
// time steps, cell-steps) is computed in float64 and checked against a
// budget before it becomes an int or any memory is allocated: the grid
// against CellBudget, the time stepping against WorkBudget (cells times
// steps); a run beyond either is refused at once with a *BudgetError that
// says what the budget reaches and what to reduce. Output times by which
// the field has reached its long-time limit (the steady state of a constant
// source, 0 for one that stops or depletes; estimated in settle.go) are
// answered with that limit instead of time stepping, so a time of 1e20 d is
// as cheap as the steady state. The context is checked during time stepping
// (every step on large grids) and every steady-state iteration.
//
// Files: problem1d.go and problem3d.go hold the two problems (types,
// validation, driver); column.go (with autogrid1d.go) and engine3d.go (with
// autogrid3d.go, receptor.go) their discretizations; steady*.go the direct
// steady solvers; sources3d.go (with multi3.go, autogrid_sources.go)
// several sources on one grid, discharge.go the transects; march.go the
// time driver and its schedule, settle.go when to stop marching,
// workbudget.go and errors.go the budgets and errors; shared pieces:
// grid.go (axes, locate), graded.go (graded axes, counted before built),
// tvd.go (advection), tridiag.go and lu.go (line solvers), interp.go
// (interpolation of sampled values), times.go (output times), check.go
// (input checks), history.go and powerlaw.go (source histories), budget.go
// (mass budget), report.go.
//
// Decay chains (ScreenChain1D, ScreenChain3D): several species with their
// own retardation factors and decay rates, a parent forming its daughter
// with a mass yield, each transported by the steps above and coupled by an
// exact reaction step in place of the decay step (see chain.go); every
// species' budget, and the chain's, closes to round-off counting the mass
// passed down the chain (SpeciesBudget.Produced). Measured orders against
// the closed forms of the chain (three grids, dt ~ dx^2): 2.0-2.5 in 1D,
// 2.0 in 3D. The steady state of a chain is not solved directly.
//
// The package imports nothing of the project; it depends on the standard
// library and gonum only.
package numeric
