package plume

import (
	"math"
	"testing"
)

// exactRate is the time derivative of the exact value: against a
// fourth-order central difference of md.Value (definition of the
// derivative; the value itself is checked against 40-digit mpmath
// references in package analytic), for one source and for two sources
// with different starts, where the rate is the sum of each source's rate
// on its own clock.
func TestExactRateIsTheValuesDerivative(t *testing.T) {
	late := twoSources()
	late.Sources[1].Start = f(400)
	for name, sc := range map[string]Scenario{"one source": demoScenario(), "two sources": twoSources(), "second starts later": late} {
		md, err := Prepare(sc)
		if err != nil {
			t.Fatal(err)
		}
		checked := 0
		for _, p := range md.Receptors() {
			rate, ok := md.m.exactRate(p)
			if p.upgradient() || p.inside() {
				if ok {
					t.Errorf("%s %s: a rate for a receptor with status %s", name, p.ID, p.Status)
				}
				continue
			}
			if !ok {
				t.Errorf("%s %s: no rate", name, p.ID)
				continue
			}
			for _, tau := range []float64{200, 420, 900, 1825, 5000} {
				h := tau * 1e-3
				v := func(t float64) float64 { return md.Value(MethodExact, p, t) }
				fd := (8*(v(tau+h)-v(tau-h)) - (v(tau+2*h) - v(tau-2*h))) / (12 * h)
				got := rate(tau)
				scale := math.Max(math.Abs(fd), 1e-12*md.m.c0/tau)
				if math.Abs(got-fd) > 1e-5*scale {
					t.Errorf("%s %s tau=%g: rate %.10g, central difference %.10g", name, p.ID, tau, got, fd)
				}
				checked++
			}
		}
		if checked < 10 {
			t.Errorf("%s: only %d rates checked", name, checked)
		}
	}
}
