package plume

import "fmt"

// Workload limits of one screening request (the array limits are also in
// the OpenAPI document, whose schema check applies them first).
const (
	// MaxReceptors is the most receptors one screening may hold.
	MaxReceptors = 10_000
	// MaxTimes is the most times one screening may hold.
	MaxTimes = 1_000
	// DefaultMaxEvaluations is the default limit of closed-form point
	// evaluations per request: receptors x (times + 1 steady state) x
	// closed-form methods.
	DefaultMaxEvaluations = 2_000_000
)

// CheckWorkload refuses a screening whose closed-form work is over the
// limits, as an *Error of kind KindOverLimit: more than MaxReceptors
// receptors or MaxTimes times, or receptors x (times + steady state) x
// closed-form methods over maxEvaluations.
func CheckWorkload(sc Scenario, maxEvaluations int) error {
	var fe FieldErrors
	if n := len(sc.Receptors); n > MaxReceptors {
		fe.Add("receptors", fmt.Sprintf("%d receptors; at most %d allowed", n, MaxReceptors))
	}
	if n := len(sc.Times); n > MaxTimes {
		fe.Add("times", fmt.Sprintf("%d times; at most %d allowed", n, MaxTimes))
	}
	closed := 0
	methods := sc.Methods
	if len(methods) == 0 {
		methods = AllMethods
	}
	for _, m := range methods {
		if m == MethodExact || m == MethodDomenico {
			closed++
		}
	}
	if evals := len(sc.Receptors) * (len(sc.Times) + 1) * closed; evals > maxEvaluations {
		fe.Add("receptors", fmt.Sprintf(
			"receptors x (times + 1) x closed-form methods = %d evaluations; at most %d allowed per request: split the request",
			evals, maxEvaluations))
	}
	return fe.OverLimit("workload over the limits")
}
