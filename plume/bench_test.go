package plume

import (
	"context"
	"fmt"
	"testing"
)

// benchScenario is the demo with 10 receptors and 10 times (invented data).
func benchScenario(methods ...string) Scenario {
	sc := demoScenario()
	sc.Receptors = nil
	for i := range 10 {
		sc.Receptors = append(sc.Receptors, Receptor{ID: fmt.Sprintf("W%d", i), X: f(20 + 30*float64(i)), Y: f(float64(i%4) - 1.5), Z: f(1 + 0.3*float64(i))})
	}
	sc.Times = nil
	for i := range 10 {
		sc.Times = append(sc.Times, 365*float64(i+1))
	}
	sc.Methods = methods
	return sc
}

func BenchmarkScreenClosedForm(b *testing.B) {
	sc := benchScenario(MethodExact, MethodDomenico)
	for b.Loop() {
		if _, err := Screen(context.Background(), sc, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkScreenWithNumeric(b *testing.B) {
	sc := benchScenario()
	for b.Loop() {
		if _, err := Screen(context.Background(), sc, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
