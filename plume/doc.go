// Package plume is the screening domain of downgradient: the request
// (Scenario) and response (Result) types, units and their conversion,
// validation that names every bad field, the derived transport parameters
// (Darcy seepage velocity, retardation, decay rate, estimated dispersivities),
// the site and plume frames, and Screen, which runs the closed-form methods of
// package analytic and the finite-volume cross-check of package numeric for
// every receptor and time and attaches the caveats a screening estimate needs.
//
// Canonical internal units are metre, day and mg/L (bulk density kg/L, Koc
// L/kg, source mass kg). Requests may use feet, years and ug/L; Screen
// converts on the way in and converts the results back, echoing the request's
// units. 1 ft = 0.3048 m exactly (NIST SP 811, international foot);
// 1 yr = 365.25 d (the Julian year, our stated convention); 1 mg/L = 1000 ug/L.
//
// Frames: receptors and the source are given in site coordinates (x east,
// y north). Groundwater flows toward Source.FlowAzimuthDeg, clockwise from
// north (default 90, toward +x). The plume frame has x along the flow from the
// centre of the source's downgradient face, y transverse and positive to the
// left of the flow direction, and z depth below the water table (positive
// down). With the source at the origin and azimuth 90 the frames coincide.
//
// Every number in a Result is finite: Screen sanitizes defensively and the
// tests check it over random valid scenarios.
package plume
