package numeric

import (
	"fmt"
	"math"
)

// Mass discharge through transects (Problem3D.Transects).
//
// A transect is a rectangle of the plane x = X across flow (plume frame):
// y in [YMin, YMax], depth z in [Top, Bottom] below the water table;
// infinite bounds take the whole plane (YMin = -Inf, YMax = +Inf, Bottom =
// +Inf). Its advective mass discharge is the integral over the rectangle
// of the Darcy flux times the concentration, n_e V C; the solver reports
// V times the integral of C/C_ref (L^3/T), so multiply by the effective
// porosity n_e and C_ref for mass per time (the porosity-scaled convention
// of MassBudget). Dispersive flux through the plane is not included (the
// advective discharge is the one of the screening model).
//
// Discretization: on each (y, z) column of cells the concentration on the
// plane is interpolated along x between cell centres exactly as at a
// receptor (from the inflow face, held at the source value on the source
// patch, to the first centre; geometric where positive, see mix), and the
// integral across is the midpoint rule over the cells: that value times
// the part of the cell's face dy dz inside the rectangle (on the half
// domain mirrored about the plume axis, the part of the cell and of its
// mirror image). The part of the rectangle outside the grid (which reaches
// 5 spreading lengths beyond the source edges) carries nothing. With
// several sources the discharge is the sum of Strength times each
// source's (0 for a transect upstream of its face).

// Transect is a rectangle of the plane x = X across flow, plume frame, L.
type Transect struct {
	X          float64 // position along flow, within the grid (>= the source face)
	YMin, YMax float64 // extent across flow, YMin < YMax (may be -Inf, +Inf)
	Top        float64 // depth of the upper edge, >= 0
	Bottom     float64 // depth of the lower edge, > Top (may be +Inf)
}

// validateTransects checks the transects; x0 is the upstream end of the
// modelled aquifer and xEnd the downstream end of an explicit grid (+Inf
// for the automatic grid, which reaches every transect).
func validateTransects(field string, ts []Transect, x0, xEnd float64) error {
	for i, t := range ts {
		f := fmt.Sprintf("%s[%d]", field, i)
		if math.IsNaN(t.X) || math.IsInf(t.X, 0) || t.X < x0 || t.X > xEnd {
			return invalid(f+".X", "must be finite and within the modelled aquifer [%g, %g], got %g", x0, xEnd, t.X)
		}
		if math.IsNaN(t.YMin) || math.IsNaN(t.YMax) || !(t.YMax > t.YMin) {
			return invalid(f+".YMax", "must exceed YMin = %g, got %g", t.YMin, t.YMax)
		}
		if !(t.Top >= 0) || math.IsInf(t.Top, 1) {
			return invalid(f+".Top", "must be finite and >= 0 (depth below the water table), got %g", t.Top)
		}
		if !(t.Bottom > t.Top) {
			return invalid(f+".Bottom", "must exceed Top = %g, got %g", t.Top, t.Bottom)
		}
	}
	return nil
}

// transectX is the largest transect position (0 when there is none).
func transectX(ts []Transect) float64 {
	x := 0.0
	for _, t := range ts {
		x = math.Max(x, t.X)
	}
	return x
}

// overlap is the length of [a, b] inside [lo, hi].
func overlap(a, b, lo, hi float64) float64 {
	return math.Max(0, math.Min(b, hi)-math.Max(a, lo))
}

// discharge is V times the integral of C over the transect (x relative to
// the field's face) for the source value cb on the patch.
func (g *grid3) discharge(tr Transect, cb float64) float64 {
	ix, wx := locate(g.xc, tr.X)
	wy := make([]float64, g.ny)
	for j := range wy {
		a, b := g.y.Faces[j], g.y.Faces[j+1]
		wy[j] = overlap(a, b, tr.YMin, tr.YMax)
		if !g.fullY {
			wy[j] += overlap(-b, -a, tr.YMin, tr.YMax)
		}
	}
	total := 0.0
	for k := 0; k < g.nz; k++ {
		wz := overlap(g.z.Faces[k], g.z.Faces[k+1], tr.Top, tr.Bottom)
		if wz == 0 {
			continue
		}
		s := 0.0
		for j, w := range wy {
			if w == 0 {
				continue
			}
			p := k*g.ny + j
			var c float64
			switch {
			case ix < 0:
				c = mix(cb*g.patch[p], g.c[p], tr.X/g.xc[0])
			case wx == 0:
				c = g.c[ix*g.np+p]
			default:
				c = mix(g.c[ix*g.np+p], g.c[(ix+1)*g.np+p], wx)
			}
			s += w * clamp01(c)
		}
		total += wz * s
	}
	return g.v * total
}

// splitDischarge splits the values of the time driver (the receptors, then
// the transects) into the receptor values and the discharges (nil when
// there are no transects).
func splitDischarge(vals [][]float64, nrec int) (c, q [][]float64) {
	if len(vals) == nrec {
		return vals, nil
	}
	return vals[:nrec:nrec], vals[nrec:]
}
