package contour

// Grid is a regular grid of node values in a right-handed plane frame
// (x to the right, y up): node (i, j) sits at (X0 + i*DX, Y0 + j*DY) and
// holds Values[j*NX+i]. Lengths in any one unit; DX, DY > 0; NX, NY >= 2.
type Grid struct {
	X0, Y0 float64   // coordinates of node (0, 0)
	DX, DY float64   // node spacing along x and y, > 0
	NX, NY int       // number of nodes along x and y
	Values []float64 // NX*NY values, row by row (x fastest)
}

// At returns the value of node (i, j).
func (g *Grid) At(i, j int) float64 { return g.Values[j*g.NX+i] }

// X returns the x coordinate of column i.
func (g *Grid) X(i int) float64 { return g.X0 + float64(i)*g.DX }

// Y returns the y coordinate of row j.
func (g *Grid) Y(j int) float64 { return g.Y0 + float64(j)*g.DY }
