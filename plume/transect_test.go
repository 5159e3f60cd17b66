package plume

import (
	"encoding/json"
	"math"
	"os"
	"strconv"
	"testing"
)

// transectReference is testdata/reference/transect_discharge.json.
type transectReference struct {
	Cases []struct {
		Name          string   `json:"name"`
		Time          string   `json:"time"`
		V             string   `json:"v"`
		R             string   `json:"R"`
		Porosity      string   `json:"porosity"`
		HalfLife      string   `json:"half_life"`
		Width         string   `json:"width"`
		Depth         string   `json:"depth"`
		C0            string   `json:"c0"`
		Alpha         []string `json:"alpha"`
		X             string   `json:"x"`
		Y1            string   `json:"y1"`
		Y2            string   `json:"y2"`
		Z1            string   `json:"z1"`
		Z2            string   `json:"z2"`
		MassDischarge string   `json:"mass_discharge"`
	} `json:"cases"`
}

func num(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// Mass discharge through transects perpendicular to the flow against
// mpmath at 55 digits (testdata/reference/gen_transect.py): the time
// integral of the exact solution with the y and z integrals in closed form;
// a transect much wider and deeper than the plume carries n_e v W D C_1D
// (the generator checks this against the first-type Ogata-Banks solution).
func TestTransectDischargeReference(t *testing.T) {
	b, err := os.ReadFile("../testdata/reference/transect_discharge.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref transectReference
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for _, c := range ref.Cases {
		t.Run(c.Name+" t="+c.Time, func(t *testing.T) {
			x := num(t, c.X)
			sc := Scenario{
				Aquifer: Aquifer{SeepageVelocity: f(num(t, c.V)), EffectivePorosity: f(num(t, c.Porosity)),
					Dispersivity: &Dispersivity{Longitudinal: f(num(t, c.Alpha[0])), Transverse: f(num(t, c.Alpha[1])), Vertical: f(num(t, c.Alpha[2]))}},
				Contaminant: Contaminant{Retardation: f(num(t, c.R)), HalfLife: f(num(t, c.HalfLife))},
				Source:      Source{Concentration: f(num(t, c.C0)), Width: f(num(t, c.Width)), Depth: f(num(t, c.Depth))},
				Receptors:   []Receptor{{X: f(x), Y: f(0)}},
				Transects: []Transect{{From: [2]float64{x, num(t, c.Y2)}, To: [2]float64{x, num(t, c.Y1)},
					Top: f(num(t, c.Z1)), Bottom: f(num(t, c.Z2))}},
				Methods: []string{MethodExact},
			}
			if c.Time != "steady" {
				sc.Times = []float64{num(t, c.Time)}
			}
			res := screenOK(t, sc)
			got := res.Transects[0].SteadyState.MassDischarge
			if c.Time != "steady" {
				got = res.Transects[0].Series[0].MassDischarge
			}
			// 1e-7 relative, or 1e-12 of the source's own mass discharge
			// n_e v W D C0 where the value is smaller (the closed forms'
			// absolute accuracy; below it the service reports 0).
			srcMD := num(t, c.Porosity) * num(t, c.V) * num(t, c.Width) * num(t, c.Depth) * num(t, c.C0)
			if want := num(t, c.MassDischarge); math.Abs(got-want) > math.Max(1e-7*want, 1e-12*srcMD) {
				t.Errorf("mass discharge %.12g g/d, reference %.12g (rel %.2g)", got, want, math.Abs(got-want)/want)
			}
		})
	}
}
