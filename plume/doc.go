// Package plume is the screening domain of downgradient: the request
// (Scenario) and response (Result) types, units and their conversion,
// validation that names every bad field, the derived transport parameters
// (Darcy seepage velocity, retardation, decay rate, estimated dispersivities),
// the site and plume frames, caveats, the contaminant reference table, and
// the screening itself.
//
// # One model, one path
//
// Prepare turns a Scenario into a Model: validated, in canonical units,
// with the derived parameters and the receptors located and classified in
// the plume frame (Point, Status). Every capability evaluates through a
// Model and nothing else derives parameters: Model.Screen runs the methods
// at the receptors and times (peaks, first exceedance, caveats, the
// finite-volume cross-check of package numeric); Model.Value gives one
// closed-form value at any place and time, which the capability packages
// use:
//
//   - plume/maps: plan and section grids, outlines, profiles, breakthrough series;
//   - plume/uncertainty: Latin hypercube sampling, percentiles, exceedance
//     probabilities and drivers;
//   - plume/fit: calibration to monitoring data and attenuation rates.
//
// Errors are one type, *Error, with a Kind (KindInvalid, KindOverLimit,
// KindInternal) and the bad fields by JSON path; cancellation and
// deadlines come back as ctx.Err(). Param names one number of a scenario by
// its JSON path, with a table of setters, for the numbers an uncertainty
// run samples and a calibration fits. The domain never sees a JSON tree and
// never names an HTTP route.
//
// # How several sources and compounds fit
//
// The derived model has three parts: the aquifer (velocity, dispersion;
// shared), the compound (retardation, decay, levels) and the source
// (geometry, strength, history); closedFormOf evaluates one compound from
// one source in the aquifer. Several sources become a slice of source
// parts whose values superpose (the equation is linear in the source
// strength), so Model.Value sums over them. Several compounds become a
// slice of compound parts, each with its own retardation and half-life;
// a decay chain with equal retardation is a linear combination of such
// single-compound problems (Sun, Petersen & Clement 1999), so a compound's
// value is again a sum of closedFormOf terms. Point, Status, the units and
// the frames do not change.
//
// # Units and frames
//
// Canonical internal units are metre, day and mg/L (bulk density kg/L, Koc
// L/kg, source mass kg). Requests may use feet, years and ug/L; a Model
// converts on the way in (Factors) and Screen converts the results back,
// echoing the request's units. 1 ft = 0.3048 m exactly (NIST SP 811,
// international foot); 1 yr = 365.25 d (the Julian year, our stated
// convention); 1 mg/L = 1000 ug/L.
//
// Receptors and the source are given in site coordinates (x east, y
// north). Groundwater flows toward Source.FlowAzimuthDeg, clockwise from
// north (default 90, toward +x). The plume frame has x along the flow from
// the centre of the source's downgradient face, y transverse and positive
// to the left of the flow direction, and z depth below the water table
// (positive down). With the source at the origin and azimuth 90 the frames
// coincide.
//
// Every number in a Result is finite: Screen sanitizes defensively and the
// tests check it over random valid scenarios.
package plume
