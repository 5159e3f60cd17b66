package api

import "errors"

// isWorkloadError reports an engine error that says the request is too big
// (for example over the numeric method's cell budget): such errors implement
// OverBudget() bool.
func isWorkloadError(err error) bool {
	var w interface{ OverBudget() bool }
	return errors.As(err, &w) && w.OverBudget()
}
