// Package fit compares a screening with monitoring data: Calibrate fits
// chosen scenario numbers (plume.Param) to observations by least squares on
// log10 concentrations, with non-detects as censored values, by gonum's
// Nelder-Mead, with linearised confidence intervals; Attenuation fits the
// bulk attenuation rate along the plume axis and converts it to a
// biodegradation rate (Buscheck & Alcantar 1995). WellReceptors gives a
// scenario without receptors one per observed well.
package fit
