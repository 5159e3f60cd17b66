package numeric

// GridReport describes the grid and the work of a run. Lengths in L, times
// in T. For the 1D problem NY = NZ = 1 and the Y and Z fields are 0.
type GridReport struct {
	NX, NY, NZ int     // cells along x (flow), y (transverse, half domain y >= 0), z (depth)
	Cells      int     // NX*NY*NZ
	XLength    float64 // domain extent along x from the inlet face
	YLength    float64 // domain extent along y from the plume axis (half width; the whole width when FullWidth)
	ZLength    float64 // domain extent along z from the water table
	DXMin      float64 // smallest and largest cell sizes along each axis
	DXMax      float64
	DYMin      float64
	DYMax      float64
	DZMin      float64
	DZMax      float64
	// PecletX is the largest grid Peclet number along flow, V dx / Dx.
	PecletX float64
	// TimeStep is the largest time step taken; Courant is the largest
	// V dt / (R dx) that it gives.
	TimeStep float64
	Courant  float64
	// Steps is the number of time steps; CellSteps = Cells * Steps, the work.
	Steps     int
	CellSteps float64
	// SteadyIterations is the number of iterations of the steady-state
	// solver (0 when no steady state was solved) and SteadyResidual its
	// final residual: the summed absolute mass-balance residual of the
	// cells relative to the inflow rate (at most SteadyTolerance).
	SteadyIterations int
	SteadyResidual   float64
	// SteadyFrom is the first finite output time that was answered with
	// the long-time limit instead of time stepping (the steady state of a
	// constant source, 0 for a source that stops or depletes: the field
	// no longer changes by then, see settle.go); 0 when every finite time
	// was reached by time stepping.
	SteadyFrom float64

	// Several sources (Problem3D.Sources; all zero without them): XStart
	// and YStart are the plume-frame coordinates of the first x and y
	// faces, so the grid spans [XStart, XStart + XLength] along flow and,
	// when FullWidth, [YStart, YStart + YLength] across (YLength is then
	// the whole width; without FullWidth the grid is the half y >= 0
	// mirrored about the plume axis, as for one source). Sources is the
	// number of source fields and FieldCells the cells they hold together
	// (each source's field covers the grid downstream of its face); the
	// cell budget bounds FieldCells, and CellSteps is FieldCells times
	// Steps.
	XStart, YStart float64
	FullWidth      bool
	Sources        int
	FieldCells     int
}
