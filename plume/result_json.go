package plume

// JSON returns what an encoder should write for the result: the result
// itself where a receptor has several compounds, and otherwise a view of
// the same fields whose receptors are plain values. encoding/json calls
// ReceptorResult.MarshalJSON for every receptor and then reads its output
// again to compact it, about a sixth of the encoding time of a demo
// answer; the view writes the same bytes without that second pass
// (TestResultJSONView checks both, and that the view keeps every field of
// Result in order).
func (r *Result) JSON() any {
	rs := make([]plainReceptor, len(r.Receptors))
	for i := range r.Receptors {
		p, plain := r.Receptors[i].JSON().(*plainReceptor)
		if !plain {
			return r
		}
		rs[i] = *p
	}
	return &resultView{Engine: r.Engine, Units: r.Units, CRS: r.CRS, Summary: r.Summary, Derived: r.Derived,
		Receptors: rs, Numeric: r.Numeric, Transects: r.Transects, AllowableScaleFactor: r.AllowableScaleFactor,
		Caveats: r.Caveats}
}

// plainReceptor is a ReceptorResult without its MarshalJSON (for a
// receptor of one compound, which shows every field).
type plainReceptor ReceptorResult

// resultView is Result with plain receptors: the same fields, JSON names
// and order.
type resultView struct {
	Engine               Engine           `json:"engine"`
	Units                Units            `json:"units"`
	CRS                  string           `json:"crs,omitempty"`
	Summary              Summary          `json:"summary"`
	Derived              Derived          `json:"derived"`
	Receptors            []plainReceptor  `json:"receptors"`
	Numeric              *NumericReport   `json:"numeric,omitempty"`
	Transects            []TransectResult `json:"transects,omitempty"`
	AllowableScaleFactor *Allowance       `json:"allowable_scale_factor,omitempty"`
	Caveats              []Caveat         `json:"caveats"`
}

// JSON returns what an encoder should write for the receptor: itself
// where it has several compounds, else the same fields as a plain value
// (see Result.JSON).
func (r *ReceptorResult) JSON() any {
	if len(r.Compounds) > 0 {
		return r
	}
	return (*plainReceptor)(r)
}
