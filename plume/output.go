package plume

import "math"

// fromCanonical converts a result computed in m, d, mg/L into the request's
// units (factors f: request unit -> canonical). Values the result owns
// (the series, steady states, peaks) are converted in place.
func (r *Result) fromCanonical(f unitFactors) {
	r.Derived.fromCanonical(f)
	for i := range r.Receptors {
		r.Receptors[i].fromCanonical(f)
	}
	L, T, C := f.L, f.T, f.C
	for i := range r.Transects {
		tr := &r.Transects[i]
		tr.Length /= L
		tr.Top /= L
		tr.Bottom /= L
		conv := func(v *TransectValue) {
			v.MassDischarge /= f.M
			v.StreamConcentration = scaled(v.StreamConcentration, 1/C)
		}
		for j := range tr.Series {
			conv(&tr.Series[j].TransectValue)
		}
		conv(&tr.SteadyState)
	}
	if n := r.Numeric; n != nil {
		for i := range n.Spacing {
			n.Spacing[i] /= L
			n.MaxSpacing[i] /= L
		}
		n.TimeStep /= T
		n.SteadyFrom = scaled(n.SteadyFrom, 1/T)
		n.XMin /= L
		n.XMax /= L
		n.YHalf /= L
		n.ZMax /= L
	}
}

// scaleOwned multiplies the value p points to by k in place (nil: nothing),
// for values a result owns.
func scaleOwned(p *float64, k float64) {
	if p != nil {
		*p *= k
	}
}

// fromCanonical converts the derived parameters (see Result.fromCanonical).
func (d *Derived) fromCanonical(f unitFactors) {
	L, T, C := f.L, f.T, f.C
	d.SeepageVelocity /= L / T
	d.HalfLife = scaled(d.HalfLife, 1/T)
	d.DecayRate *= T
	d.EffectiveDecayRate *= T
	if v := d.Dispersivity; v != nil {
		d.Dispersivity = &DispersivityValues{v.Longitudinal / L, v.Transverse / L, v.Vertical / L}
	}
	k := L * L / T
	if v := d.Dispersion; v != nil {
		d.Dispersion = &DispersionValues{v.Longitudinal / k, v.Transverse / k, v.Vertical / k}
	}
	d.ConcentrationFloor /= C
	d.TravelDistance = scaled(d.TravelDistance, 1/L)
	d.ScreeningLevel = scaled(d.ScreeningLevel, 1/C)
	d.Solubility = scaled(d.Solubility, 1/C)
	for i := range d.Sources {
		sd := &d.Sources[i]
		sd.MassDischarge = scaled(sd.MassDischarge, 1/f.M)
		sd.DepletionRate = scaled(sd.DepletionRate, T)
		sd.TimeBelowScreeningLevel = scaled(sd.TimeBelowScreeningLevel, 1/T)
		sd.TimeMassExhausted = scaled(sd.TimeMassExhausted, 1/T)
	}
	for i := range d.Compounds {
		cd := &d.Compounds[i]
		cd.SourceConcentration /= C
		cd.HalfLife = scaled(cd.HalfLife, 1/T)
		cd.DecayRate *= T
		cd.EffectiveDecayRate *= T
		cd.ScreeningLevel = scaled(cd.ScreeningLevel, 1/C)
		cd.Solubility = scaled(cd.Solubility, 1/C)
	}
}

// fromCanonical converts one receptor's values (see Result.fromCanonical).
func (rr *ReceptorResult) fromCanonical(f unitFactors) {
	L, T, C := f.L, f.T, f.C
	conc := func(p *float64) { scaleOwned(p, 1/C) }
	rr.PlumeX /= L
	rr.PlumeY /= L
	rr.Z /= L
	rr.ScreenTop = scaled(rr.ScreenTop, 1/L)
	rr.ScreenBottom = scaled(rr.ScreenBottom, 1/L)
	if v := rr.Dispersivity; v != nil {
		rr.Dispersivity = &ReceptorDispersivity{v.Longitudinal / L, v.Transverse / L, v.Vertical / L, v.TravelDistance / L}
	}
	convertValues(rr.Series, &rr.SteadyState, 1/C)
	scaleOwned(rr.Peak.Time, 1/T)
	rr.Peak.Concentration /= C
	scaleOwned(rr.FirstExceedanceTime, 1/T)
	if a := rr.NumericAgreement; a != nil {
		a.Floor /= C
		// a.Time is a requested time, already in the request's unit.
	}
	if a := rr.AllowableSourceConcentration; a != nil {
		conc(a.SteadyState)
		conc(a.WithinTimes)
	}
	for k := range rr.Contributions {
		cb := &rr.Contributions[k]
		convertValues(cb.Series, &cb.SteadyState, 1/C)
	}
	for k := range rr.Compounds {
		cr := &rr.Compounds[k]
		convertValues(cr.Series, &cr.SteadyState, 1/C)
		if cr.Peak != nil {
			scaleOwned(cr.Peak.Time, 1/T)
			cr.Peak.Concentration /= C
		}
		scaleOwned(cr.FirstExceedanceTime, 1/T)
		cr.ScreeningLevel = scaled(cr.ScreeningLevel, 1/C)
	}
}

// convertValues scales a series' values and a steady state in place by k
// (the series times echo the request's and are not converted).
func convertValues(series []SeriesPoint, ss *MethodValues, k float64) {
	for j := range series {
		sp := &series[j]
		scaleOwned(sp.Exact, k)
		scaleOwned(sp.Domenico, k)
		scaleOwned(sp.Numeric, k)
	}
	scaleOwned(ss.Exact, k)
	scaleOwned(ss.Domenico, k)
	scaleOwned(ss.Numeric, k)
}

// sanitize replaces any NaN or infinity left in r (none should be) by a
// finite value, and concentrations below the floor (Derived.ConcentrationFloor,
// in the result's unit), negative ones included, by 0.
func (r *Result) sanitize() {
	fix := func(x *float64) { *x = Clean(*x) }
	fixP := func(p *float64) {
		if p != nil {
			*p = Clean(*p)
		}
	}
	r.sanitizeExtras()
	floor := r.Derived.ConcentrationFloor
	d := &r.Derived
	for _, x := range []*float64{&d.SeepageVelocity, &d.Retardation, &d.DecayRate, &d.EffectiveDecayRate} {
		fix(x)
	}
	if v := d.Dispersivity; v != nil {
		fix(&v.Longitudinal)
		fix(&v.Transverse)
		fix(&v.Vertical)
	}
	if v := d.Dispersion; v != nil {
		fix(&v.Longitudinal)
		fix(&v.Transverse)
		fix(&v.Vertical)
	}
	for _, p := range []*float64{d.Koc, d.HalfLife, d.TravelDistance, d.ScreeningLevel, d.Solubility} {
		fixP(p)
	}
	for i := range r.Receptors {
		r.Receptors[i].sanitize(floor)
	}
	if n := r.Numeric; n != nil {
		for i := range n.Spacing {
			fix(&n.Spacing[i])
			fix(&n.MaxSpacing[i])
		}
		fix(&n.GridPeclet)
		fix(&n.TimeStep)
		fix(&n.Courant)
		fix(&n.XMin)
		fix(&n.XMax)
		fix(&n.YHalf)
		fix(&n.ZMax)
		fix(&n.MassBalanceError)
	}
}

// sanitize is Result.sanitize for one receptor; floor is the concentration
// floor in the result's unit.
func (rr *ReceptorResult) sanitize(floor float64) {
	fix := func(x *float64) { *x = Clean(*x) }
	fixP := func(p *float64) {
		if p != nil {
			*p = Clean(*p)
		}
	}
	conc := func(p *float64) {
		if p != nil {
			*p = FloorConcentration(Clean(*p), floor)
		}
	}
	fix(&rr.PlumeX)
	fix(&rr.PlumeY)
	fix(&rr.Z)
	fixP(rr.ScreenTop)
	fixP(rr.ScreenBottom)
	for j := range rr.Series {
		sp := &rr.Series[j]
		fix(&sp.Time)
		conc(sp.Exact)
		conc(sp.Domenico)
		conc(sp.Numeric)
	}
	conc(rr.SteadyState.Exact)
	conc(rr.SteadyState.Domenico)
	conc(rr.SteadyState.Numeric)
	fixP(rr.Peak.Time)
	conc(&rr.Peak.Concentration)
	fixP(rr.FirstExceedanceTime)
	fixP(rr.DomenicoDeviation)
	for _, al := range []*Allowance{rr.AllowableSourceConcentration, rr.DilutionAttenuationFactor, rr.AllowableScaleFactor} {
		if al != nil {
			fixP(al.SteadyState)
			fixP(al.WithinTimes)
		}
	}
	for k := range rr.Contributions {
		cb := &rr.Contributions[k]
		for j := range cb.Series {
			conc(cb.Series[j].Exact)
			conc(cb.Series[j].Domenico)
		}
		conc(cb.SteadyState.Exact)
		conc(cb.SteadyState.Domenico)
	}
	for k := range rr.Compounds {
		cr := &rr.Compounds[k]
		for j := range cr.Series {
			conc(cr.Series[j].Exact)
			conc(cr.Series[j].Domenico)
			conc(cr.Series[j].Numeric)
		}
		conc(cr.SteadyState.Exact)
		conc(cr.SteadyState.Domenico)
		conc(cr.SteadyState.Numeric)
		if cr.Peak != nil {
			conc(&cr.Peak.Concentration)
			fixP(cr.Peak.Time)
		}
		fixP(cr.FirstExceedanceTime)
	}
	if a := rr.NumericAgreement; a != nil {
		fix(&a.MaxRelativeDifference)
		fix(&a.Time)
		fix(&a.Tolerance)
		fix(&a.Floor)
	}
}

// FloorConcentration returns c, or 0 when c is below floor (or negative):
// no output holds a value below the documented floor, so none holds a
// subnormal number a spreadsheet cannot store.
func FloorConcentration(c, floor float64) float64 {
	if !(c >= floor) || c <= 0 {
		return 0
	}
	return c
}

// sanitizeExtras is sanitize for the transects, the allowable scale factor
// and the sources' mass discharges.
func (r *Result) sanitizeExtras() {
	cleanP := func(p *float64) {
		if p != nil {
			*p = Clean(*p)
		}
	}
	for i := range r.Transects {
		tr := &r.Transects[i]
		vals := []*TransectValue{&tr.SteadyState}
		for j := range tr.Series {
			vals = append(vals, &tr.Series[j].TransectValue)
		}
		for _, v := range vals {
			v.MassDischarge = math.Max(Clean(v.MassDischarge), 0)
			cleanP(v.StreamConcentration)
		}
	}
	if a := r.AllowableScaleFactor; a != nil {
		cleanP(a.SteadyState)
		cleanP(a.WithinTimes)
	}
	for i := range r.Derived.Sources {
		sd := &r.Derived.Sources[i]
		for _, p := range []*float64{sd.MassDischarge, sd.DepletionRate, sd.TimeBelowScreeningLevel, sd.TimeMassExhausted} {
			cleanP(p)
		}
	}
}
