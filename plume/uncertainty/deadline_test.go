package uncertainty

import (
	"context"
	"testing"
	"time"

	"downgradient/plume"
)

// Issue 12, item 8: numeric uncertainty is limited to what can finish
// within the deadline. Twenty numeric realizations (the allowed most) of
// a scenario whose realization takes t1 cannot finish in 4 t1 on one
// worker: the run stops after its first realization with a limit error
// naming realizations (how many would fit), well before the deadline.
// Before, it ran until the deadline and returned the context's error (over
// HTTP the demo's twenty realizations took 90 s against a 30 s deadline).
func TestNumericUncertaintyWithinDeadline(t *testing.T) {
	sc := uncertainDemo()
	sc.Source.Width, sc.Source.Depth = nil, nil   // a 1D column
	sc.Aquifer.Dispersivity.Longitudinal = f(0.2) // fine cells: tens of ms per run
	params := []UncertainParameter{{Param: param(t, "aquifer.hydraulic_conductivity"), Dist: Distribution{Kind: DistUniform, Min: 7, Max: 10}}}
	req := UncertaintyRequest{Template: sc, Parameters: params, Methods: []string{plume.MethodNumeric}, Workers: 1, Seed: 1}
	one := req
	one.Realizations = 1
	start := time.Now()
	if _, err := RunUncertainty(context.Background(), one, plume.Options{}); err != nil {
		t.Fatal(err)
	}
	t1 := time.Since(start)
	req.Realizations = MaxNumericRealizations
	ctx, cancel := context.WithTimeout(context.Background(), 4*t1)
	defer cancel()
	start = time.Now()
	_, err := RunUncertainty(ctx, req, plume.Options{})
	took := time.Since(start)
	e, ok := plume.AsError(err)
	if !ok || e.Kind != plume.KindOverLimit || len(e.Fields) == 0 || e.Fields[0].Field != "realizations" {
		t.Fatalf("after %v (one realization %v): %v, want a limit on realizations", took, t1, err)
	}
	if took > 3*t1 {
		t.Errorf("refused after %v; one realization takes %v", took, t1)
	}
	t.Logf("one realization %v; refused after %v: %s", t1, took, e.Fields[0].Message)
}
