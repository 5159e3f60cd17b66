package api

import (
	"encoding/json"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"downgradient/plume"
)

// sourceMassMap is the invented source-mass demo (testdata/demo/
// source-mass.json) with the closed forms only.
func sourceMassMap(t *testing.T) map[string]any {
	t.Helper()
	return demoFileMap(t, "source-mass.json")
}

// A source with a mass end to end: derived.sources carries the depletion
// (the response is validated against the OpenAPI document by ts.call),
// the allowable concentration and the caveats come back, the report lists
// the depletion, and the spreadsheet GET with source.mass and
// source.depletion_exponent gives the screening's number.
func TestSourceMassThroughTheAPI(t *testing.T) {
	ts := newTestServer(t, Config{})
	m := sourceMassMap(t)
	var res plume.Result
	if err := json.Unmarshal(screenAs(t, ts, m, ""), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.Derived.Sources) != 1 {
		t.Fatalf("derived.sources %+v", res.Derived.Sources)
	}
	sd := res.Derived.Sources[0]
	if sd.DepletionRate == nil || sd.TimeMassExhausted == nil || sd.TimeBelowScreeningLevel == nil || sd.MassDischarge == nil {
		t.Fatalf("derived.sources[0] %+v", sd)
	}
	w4 := receptorByID(t, res, "W-4 supply well")
	if w4.AllowableSourceConcentration == nil || w4.AllowableSourceConcentration.WithinTimes == nil {
		t.Errorf("W-4 allowable %+v", w4.AllowableSourceConcentration)
	}
	codes := strings.Join(res.CaveatCodes(""), ";")
	if !strings.Contains(codes, plume.CaveatSourceMassInsufficient) {
		t.Errorf("caveats %s", codes)
	}

	rec := ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, m), nil)
	if rec.Code != http.StatusOK {
		t.Fatalf("report: %d %s", rec.Code, rec.Body.String())
	}
	for _, want := range []string{"Dissolvable source mass", "Depletion exponent", "Source depletion rate", "Source mass exhausted"} {
		if !strings.Contains(rec.Body.String(), want) {
			t.Errorf("report lacks %q", want)
		}
	}

	// MW-2 (a point at 1.5 m) at 3650 d, the demo's aquifer and source.
	target := concentrationQuery(1331.2, 789.8, 1.5, "3650", "exact") +
		"&source.mass=100&source.depletion_exponent=0.5"
	mw2 := receptorByID(t, res, "MW-2")
	rec = ts.call(t, http.MethodGet, target, nil, nil)
	if rec.Code != http.StatusOK {
		t.Fatalf("GET: %d %s", rec.Code, rec.Body.String())
	}
	got, err := strconv.ParseFloat(strings.TrimSpace(rec.Body.String()), 64)
	if err != nil {
		t.Fatal(err)
	}
	if want := *mw2.Series[2].Exact; got != want {
		t.Errorf("GET MW-2 at 3650 d: %v, screening %v", got, want)
	}
}
