package api

import (
	"strconv"
	"testing"
)

// Numbers in CSV cells and headers read back exactly, in plain decimals
// from 1e6 up (projected coordinates), as encoding/json writes them.
func TestFormatNumber(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{0, "0"},
		{0.005, "0.005"},
		{1.2e-5, "1.2e-05"},
		{123456.5, "123456.5"},
		{4180970.25, "4180970.25"},
		{-4180970.25, "-4180970.25"},
		{2.5e6, "2500000"},
		{1e21, "1e+21"},
	} {
		got := formatNumber(c.v)
		if got != c.want {
			t.Errorf("formatNumber(%v) = %q, want %q", c.v, got, c.want)
		}
		if back, err := strconv.ParseFloat(got, 64); err != nil || back != c.v {
			t.Errorf("formatNumber(%v) = %q reads back as %v, %v", c.v, got, back, err)
		}
	}
}
