package plume

import (
	"context"
	"errors"
)

// Screen validates sc, derives the transport parameters, and runs the
// requested methods at every receptor and time. A validation failure is
// returned as FieldErrors; a cancelled or expired ctx as ctx.Err().
func Screen(ctx context.Context, sc Scenario, opt Options) (*Result, error) {
	_ = opt.withDefaults()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return nil, errors.New("plume: Screen not implemented yet")
}
