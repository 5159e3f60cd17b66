package plume

import (
	"context"
	"fmt"
	"testing"

	"downgradient/internal/plumetest"
)

// benchScenario is the demo with 10 receptors and 10 times (invented data).
func benchScenario(methods ...string) Scenario {
	sc := demoScenario()
	sc.Receptors = nil
	for i := range 10 {
		x, y, z := plumetest.BenchReceptor(i)
		sc.Receptors = append(sc.Receptors, Receptor{ID: fmt.Sprintf("W%d", i), X: f(x), Y: f(y), Z: f(z)})
	}
	sc.Times = plumetest.BenchTimes()
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
