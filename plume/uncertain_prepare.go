package plume

import (
	"fmt"
	"math"
)

// prepared is a validated scenario turned into the closed-form model: the
// derived parameters and the receptors in the plume frame, all in canonical
// units (m, d, mg/L), plus the request's unit factors. Uncertainty,
// attenuation and calibration evaluate the closed forms through it without
// the peak, first-exceedance and caveat work of Screen.
type prepared struct {
	m     *model
	pts   []point
	frame Frame // canonical (m) site -> plume frame
	uf    unitFactors
	units Units
}

// prepare validates sc and derives its model; extraX are further plume-frame
// distances, m, that count toward the travel distance of an estimated
// dispersivity (observation wells, for example).
func prepare(sc Scenario, extraX ...float64) (*prepared, error) {
	if err := Validate(sc); err != nil {
		return nil, err
	}
	units := sc.Units.withDefaults()
	uf, _ := units.factors()
	c := toCanonical(sc)
	pr := &prepared{frame: frameOf(c.Source), uf: uf, units: units, pts: make([]point, len(c.Receptors))}
	maxX := math.Inf(-1)
	for i, r := range c.Receptors {
		pr.pts[i] = pr.pointAt(r, i)
		maxX = math.Max(maxX, pr.pts[i].px)
	}
	for _, x := range extraX {
		maxX = math.Max(maxX, x)
	}
	pr.m = derive(c, maxX)
	for i := range pr.pts {
		pr.m.classify(&pr.pts[i])
	}
	return pr, nil
}

// pointAt is a canonical receptor in the plume frame (not yet classified).
func (pr *prepared) pointAt(r Receptor, i int) point {
	p := point{id: r.ID}
	if p.id == "" {
		p.id = fmt.Sprintf("R%d", i+1)
	}
	p.px, p.py = pr.frame.ToPlume(*r.X, *r.Y)
	switch {
	case r.ScreenTop != nil:
		p.top, p.bot, p.screen = *r.ScreenTop, *r.ScreenBottom, true
	case r.Z != nil:
		p.top, p.bot = *r.Z, *r.Z
	}
	return p
}

// value is the closed-form concentration, mg/L, at p and elapsed time tau
// since the source started, d (+Inf: steady state).
func (pr *prepared) value(exact bool, p point, tau float64) float64 {
	return pr.m.closedForm(exact, p, tau)
}

// peak is the highest primary-method concentration at p over all time, mg/L.
func (pr *prepared) peak(exact bool, p point, steady float64, taus []float64) float64 {
	f := func(tau float64) float64 { return pr.m.closedForm(exact, p, tau) }
	return pr.m.findPeak(f, p, steady, taus).c
}
