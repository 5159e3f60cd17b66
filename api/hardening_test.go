package api

import (
	"net/http"
	"testing"
)

// Issue 12, item 7: control characters (NUL, backspace, ESC) in ids and
// names are refused with 422 naming the field, on every route that takes
// them. Before, they were accepted and written raw, so the SVG plots were
// not well-formed XML and the HTML report held NUL bytes.
func TestControlCharactersInIds(t *testing.T) {
	ts := newTestServer(t, Config{})
	withID := demoMap(t)
	set(withID, "receptors.0.id", "MW\x001")
	withName := demoMap(t)
	set(withName, "contaminant.name", "benzene\x1b[31m")
	withDesc := demoMap(t)
	withDesc["description"] = "depot\bsite"
	att := attenuationMap(t)
	set(att, "observations.0.well_id", "MW\x1b1")
	cases := []struct {
		target string
		body   any
		field  string
	}{
		{"/v1/screenings", withID, "receptors[0].id"},
		{"/v1/screenings", withName, "contaminant.name"},
		{"/v1/screenings", withDesc, "description"},
		{"/v1/plots?kind=breakthrough", withID, "receptors[0].id"},
		{"/v1/plots?kind=map", withID, "receptors[0].id"},
		{"/v1/reports", withDesc, "description"},
		{"/v1/reports", withName, "contaminant.name"},
		{"/v1/plume-maps", map[string]any{"scenario": withID, "time": 3650}, "scenario.receptors[0].id"},
		{"/v1/uncertainty", map[string]any{"scenario": withID, "realizations": 10}, "scenario.receptors[0].id"},
		{"/v1/uncertainty", map[string]any{"scenario": withDesc, "realizations": 10}, "scenario.description"},
		{"/v1/attenuation", att, "observations[0].well_id"},
	}
	for _, tc := range cases {
		rec := ts.call(t, http.MethodPost, tc.target, mustJSON(t, tc.body), nil)
		p := problemOf(t, rec, http.StatusUnprocessableEntity)
		if !hasField(p, tc.field) {
			t.Errorf("%s: %q not named: %+v", tc.target, tc.field, p)
		}
	}
}
