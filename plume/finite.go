package plume

import (
	"fmt"
	"math"
)

// checkFinite refuses a scenario whose numbers are each in range but whose
// canonical or derived values leave the floating-point range, naming the
// input that causes it (every number the service reports or computes with
// must be finite): times and durations given in years that overflow in
// days; a seepage velocity that overflows or underflows to zero (K i / n_e
// with extreme inputs); a retardation, decay rate or dispersion
// coefficient that overflows; a receptor whose distance from the source
// overflows.
func (md *Model) checkFinite() error {
	var fe FieldErrors
	c := md.canon
	for i, t := range c.Times {
		if !Finite(t) {
			fe.Add(fmt.Sprintf("times[%d]", i), md.tooLarge(md.sc.Times[i], md.units.Time, "in days"))
		}
	}
	type timeField struct {
		path         string
		given, canon *float64
	}
	fields := []timeField{{"contaminant.half_life", md.sc.Contaminant.HalfLife, c.Contaminant.HalfLife}}
	for i, k := range md.sc.Contaminants {
		if i < len(c.Contaminants) {
			fields = append(fields, timeField{fmt.Sprintf("contaminants[%d].half_life", i), k.HalfLife, c.Contaminants[i].HalfLife})
		}
	}
	sources, canonSources, prefix := []Source{md.sc.Source}, []Source{c.Source}, func(int) string { return "source" }
	if len(md.sc.Sources) > 0 {
		sources, canonSources, prefix = md.sc.Sources, c.Sources, func(i int) string { return fmt.Sprintf("sources[%d]", i) }
	}
	for i, s := range sources {
		if i >= len(canonSources) {
			break
		}
		cs := canonSources[i]
		fields = append(fields, timeField{prefix(i) + ".start", s.Start, cs.Start},
			timeField{prefix(i) + ".duration", s.Duration, cs.Duration}, timeField{prefix(i) + ".half_life", s.HalfLife, cs.HalfLife})
	}
	for _, f := range fields {
		if f.canon != nil && !Finite(*f.canon) {
			fe.Add(f.path, md.tooLarge(*f.given, md.units.Time, "in days"))
		}
	}
	if len(fe) > 0 {
		return fe.Err()
	}
	md.checkDerived(&fe)
	for i, p := range md.pts {
		if !Finite(p.X) || !Finite(p.Y) || !Finite(p.X-p.Y) {
			fe.Add(fmt.Sprintf("receptors[%d].x", i), "out of range: the receptor's distance from the source overflows")
		}
	}
	return fe.Err()
}

// checkDerived names the input behind a derived parameter out of range.
func (md *Model) checkDerived(fe *FieldErrors) {
	m, a := md.m, md.sc.Aquifer
	const why = "out of range with the other inputs: the %s it gives (%g) is beyond what the models compute with"
	if !(m.v > 0) || !Finite(m.v) {
		path := "aquifer.seepage_velocity"
		if a.SeepageVelocity == nil {
			path = "aquifer.hydraulic_conductivity"
		}
		fe.Add(path, fmt.Sprintf(why, "seepage velocity K i / n_e", m.v))
	}
	if !Finite(m.r) {
		path := "contaminant.koc"
		if md.sc.Contaminant.Retardation != nil {
			path = "contaminant.retardation"
		}
		fe.Add(path, fmt.Sprintf(why, "retardation factor", m.r))
	}
	if !Finite(m.lambda) || !Finite(m.mu) {
		fe.Add("contaminant.half_life", fmt.Sprintf(why, "decay rate ln 2 / half-life", m.lambda))
	}
	for i, cp := range m.compounds {
		if !Finite(cp.r) {
			path := fmt.Sprintf("contaminants[%d].koc", i)
			if i < len(md.sc.Contaminants) && md.sc.Contaminants[i].Retardation != nil {
				path = fmt.Sprintf("contaminants[%d].retardation", i)
			}
			fe.Add(path, fmt.Sprintf(why, "retardation factor", cp.r))
		}
		if !Finite(cp.lambda) || !Finite(cp.mu) {
			fe.Add(fmt.Sprintf("contaminants[%d].half_life", i), fmt.Sprintf(why, "decay rate ln 2 / half-life", cp.lambda))
		}
	}
	for i := range m.sourceCount() {
		if d := m.source(i).depletion; !Finite(d) {
			path := "source.half_life"
			if len(md.sc.Sources) > 0 {
				path = fmt.Sprintf("sources[%d].half_life", i)
			}
			fe.Add(path, fmt.Sprintf(why, "depletion rate ln 2 / half-life", d))
		}
	}
	names := [3]string{"longitudinal", "transverse", "vertical"}
	for i, d := range m.disp {
		if !Finite(d) || !Finite(m.alpha[i]) {
			fe.Add("aquifer.dispersivity."+names[i], fmt.Sprintf(why, "dispersion coefficient alpha v + D_e", d))
		}
	}
}

// tooLarge says that v, in unit, overflows once converted.
func (md *Model) tooLarge(v float64, unit, converted string) string {
	return fmt.Sprintf("out of range: %g %s is beyond the floating-point range %s (at most %.4g %s)",
		v, unit, converted, math.MaxFloat64/md.uf.T, unit)
}
