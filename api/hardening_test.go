package api

import (
	"net/http"
	"strings"
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

// A report of a scenario whose dispersivities are all estimated (each
// receptor at its own travel distance, so no model-wide value) answers
// 200. Found by FuzzReportFields: it dereferenced the missing model-wide
// dispersivity and answered 500.
func TestReportWithReceptorDispersivities(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := demoMap(t)
	delete(m["aquifer"].(map[string]any), "dispersivity")
	rec := ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, m), nil)
	if rec.Code != http.StatusOK || !strings.Contains(rec.Body.String(), "per receptor") {
		t.Fatalf("status %d: %.300s", rec.Code, rec.Body.String())
	}
}
