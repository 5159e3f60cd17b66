// Package maps draws a screening in space and time: plan-view and vertical
// section grids of concentration (PlumeMap) with the outlines of chosen
// levels as RFC 7946 polygons (package internal/contour), the steady-state
// plume length, the centreline profile and the dense breakthrough series
// of the report's figures. It evaluates through plume.Model and derives
// nothing itself; lengths, times and concentrations of its results are in
// the request's units.
package maps
