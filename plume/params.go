package plume

import (
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// Param identifies one number of a scenario by its JSON path, for example
// "aquifer.hydraulic_conductivity" or "receptors[2].x": the numbers an
// uncertainty run may sample and a calibration may fit. Parse a path with
// ParseParam; the zero Param is not valid.
type Param struct {
	name  string // the path with any index replaced by "[]", e.g. "receptors[].x"
	index int    // the index of a "[]" path
	path  string // the path as given
}

// String is the JSON path.
func (p Param) String() string { return p.path }

// setter stores v in the field a Param names, copying any struct or slice
// it shares with other scenarios first (copy on write), so that a shallow
// copy of a template can be edited without touching the template.
type setter func(sc *Scenario, index int, v float64) error

// paramSetters is the table of every number a scenario holds, by path.
var paramSetters = map[string]setter{
	"aquifer.hydraulic_conductivity":      func(sc *Scenario, _ int, v float64) error { sc.Aquifer.HydraulicConductivity = &v; return nil },
	"aquifer.hydraulic_gradient":          func(sc *Scenario, _ int, v float64) error { sc.Aquifer.HydraulicGradient = &v; return nil },
	"aquifer.effective_porosity":          func(sc *Scenario, _ int, v float64) error { sc.Aquifer.EffectivePorosity = &v; return nil },
	"aquifer.seepage_velocity":            func(sc *Scenario, _ int, v float64) error { sc.Aquifer.SeepageVelocity = &v; return nil },
	"aquifer.bulk_density":                func(sc *Scenario, _ int, v float64) error { sc.Aquifer.BulkDensity = &v; return nil },
	"aquifer.organic_carbon_fraction":     func(sc *Scenario, _ int, v float64) error { sc.Aquifer.OrganicCarbonFraction = &v; return nil },
	"aquifer.effective_diffusion":         func(sc *Scenario, _ int, v float64) error { sc.Aquifer.EffectiveDiffusion = &v; return nil },
	"aquifer.dispersivity_scale":          func(sc *Scenario, _ int, v float64) error { sc.Aquifer.DispersivityScale = &v; return nil },
	"aquifer.dispersivity.longitudinal":   func(sc *Scenario, _ int, v float64) error { ownDispersivity(sc).Longitudinal = &v; return nil },
	"aquifer.dispersivity.transverse":     func(sc *Scenario, _ int, v float64) error { ownDispersivity(sc).Transverse = &v; return nil },
	"aquifer.dispersivity.vertical":       func(sc *Scenario, _ int, v float64) error { ownDispersivity(sc).Vertical = &v; return nil },
	"contaminant.koc":                     func(sc *Scenario, _ int, v float64) error { sc.Contaminant.Koc = &v; return nil },
	"contaminant.half_life":               func(sc *Scenario, _ int, v float64) error { sc.Contaminant.HalfLife = &v; return nil },
	"contaminant.retardation":             func(sc *Scenario, _ int, v float64) error { sc.Contaminant.Retardation = &v; return nil },
	"contaminant.screening_level":         func(sc *Scenario, _ int, v float64) error { sc.Contaminant.ScreeningLevel = &v; return nil },
	"contaminant.solubility":              func(sc *Scenario, _ int, v float64) error { sc.Contaminant.Solubility = &v; return nil },
	"source.x":                            func(sc *Scenario, _ int, v float64) error { sc.Source.X = &v; return nil },
	"source.y":                            func(sc *Scenario, _ int, v float64) error { sc.Source.Y = &v; return nil },
	"source.flow_azimuth_deg":             func(sc *Scenario, _ int, v float64) error { sc.Source.FlowAzimuthDeg = &v; return nil },
	"source.concentration":                func(sc *Scenario, _ int, v float64) error { sc.Source.Concentration = &v; return nil },
	"source.width":                        func(sc *Scenario, _ int, v float64) error { sc.Source.Width = &v; return nil },
	"source.depth":                        func(sc *Scenario, _ int, v float64) error { sc.Source.Depth = &v; return nil },
	"source.start":                        func(sc *Scenario, _ int, v float64) error { sc.Source.Start = &v; return nil },
	"source.duration":                     func(sc *Scenario, _ int, v float64) error { sc.Source.Duration = &v; return nil },
	"source.half_life":                    func(sc *Scenario, _ int, v float64) error { sc.Source.HalfLife = &v; return nil },
	"source.mass":                         func(sc *Scenario, _ int, v float64) error { sc.Source.Mass = &v; return nil },
	"source.release_depth":                func(sc *Scenario, _ int, v float64) error { sc.Source.ReleaseDepth = &v; return nil },
	"source.depletion_exponent":           func(sc *Scenario, _ int, v float64) error { sc.Source.DepletionExponent = &v; return nil },
	"receptors[].x":                       receptorSetter(func(r *Receptor, v *float64) { r.X = v }),
	"receptors[].y":                       receptorSetter(func(r *Receptor, v *float64) { r.Y = v }),
	"receptors[].z":                       receptorSetter(func(r *Receptor, v *float64) { r.Z = v }),
	"receptors[].screen_top":              receptorSetter(func(r *Receptor, v *float64) { r.ScreenTop = v }),
	"receptors[].screen_bottom":           receptorSetter(func(r *Receptor, v *float64) { r.ScreenBottom = v }),
	"receptors[].lon":                     receptorSetter(func(r *Receptor, v *float64) { r.Lon = v }),
	"receptors[].lat":                     receptorSetter(func(r *Receptor, v *float64) { r.Lat = v }),
	"sources[].x":                         sourceSetter(func(s *Source, v *float64) { s.X = v }),
	"sources[].y":                         sourceSetter(func(s *Source, v *float64) { s.Y = v }),
	"sources[].flow_azimuth_deg":          sourceSetter(func(s *Source, v *float64) { s.FlowAzimuthDeg = v }),
	"sources[].concentration":             sourceSetter(func(s *Source, v *float64) { s.Concentration = v }),
	"sources[].width":                     sourceSetter(func(s *Source, v *float64) { s.Width = v }),
	"sources[].depth":                     sourceSetter(func(s *Source, v *float64) { s.Depth = v }),
	"sources[].start":                     sourceSetter(func(s *Source, v *float64) { s.Start = v }),
	"sources[].duration":                  sourceSetter(func(s *Source, v *float64) { s.Duration = v }),
	"sources[].half_life":                 sourceSetter(func(s *Source, v *float64) { s.HalfLife = v }),
	"sources[].mass":                      sourceSetter(func(s *Source, v *float64) { s.Mass = v }),
	"sources[].release_depth":             sourceSetter(func(s *Source, v *float64) { s.ReleaseDepth = v }),
	"sources[].depletion_exponent":        sourceSetter(func(s *Source, v *float64) { s.DepletionExponent = v }),
	"transects[].top":                     transectSetter(func(t *Transect, v *float64) { t.Top = v }),
	"transects[].bottom":                  transectSetter(func(t *Transect, v *float64) { t.Bottom = v }),
	"transects[].stream_flow":             transectSetter(func(t *Transect, v *float64) { t.StreamFlow = v }),
	"transects[].screening_level":         transectSetter(func(t *Transect, v *float64) { t.ScreeningLevel = v }),
	"contaminants[].source_concentration": constituentSetter(func(k *Constituent, v *float64) { k.SourceConcentration = v }),
	"contaminants[].koc":                  constituentSetter(func(k *Constituent, v *float64) { k.Koc = v }),
	"contaminants[].half_life":            constituentSetter(func(k *Constituent, v *float64) { k.HalfLife = v }),
	"contaminants[].retardation":          constituentSetter(func(k *Constituent, v *float64) { k.Retardation = v }),
	"contaminants[].screening_level":      constituentSetter(func(k *Constituent, v *float64) { k.ScreeningLevel = v }),
	"contaminants[].solubility":           constituentSetter(func(k *Constituent, v *float64) { k.Solubility = v }),
	"contaminants[].yield":                constituentSetter(func(k *Constituent, v *float64) { k.Yield = v }),
	"times[]": func(sc *Scenario, i int, v float64) error {
		if i >= len(sc.Times) {
			return fmt.Errorf("index %d out of range (%d times)", i, len(sc.Times))
		}
		sc.Times = append([]float64(nil), sc.Times...)
		sc.Times[i] = v
		return nil
	},
}

// ownDispersivity gives sc its own copy of the dispersivities and returns it.
func ownDispersivity(sc *Scenario) *Dispersivity {
	d := &Dispersivity{}
	if sc.Aquifer.Dispersivity != nil {
		*d = *sc.Aquifer.Dispersivity
	}
	sc.Aquifer.Dispersivity = d
	return d
}

// receptorSetter sets one field of receptor i on sc's own copy of the receptors.
func receptorSetter(set func(r *Receptor, v *float64)) setter {
	return func(sc *Scenario, i int, v float64) error {
		return setAt(&sc.Receptors, i, "receptors", func(r *Receptor) { set(r, &v) })
	}
}

// sourceSetter sets one field of source i of several.
func sourceSetter(set func(s *Source, v *float64)) setter {
	return func(sc *Scenario, i int, v float64) error {
		return setAt(&sc.Sources, i, "sources", func(s *Source) { set(s, &v) })
	}
}

// constituentSetter sets one field of compound i of several.
func constituentSetter(set func(k *Constituent, v *float64)) setter {
	return func(sc *Scenario, i int, v float64) error {
		return setAt(&sc.Contaminants, i, "contaminants", func(k *Constituent) { set(k, &v) })
	}
}

// transectSetter sets one field of transect i.
func transectSetter(set func(t *Transect, v *float64)) setter {
	return func(sc *Scenario, i int, v float64) error {
		return setAt(&sc.Transects, i, "transects", func(t *Transect) { set(t, &v) })
	}
}

// setAt edits item i of *items on a copy of the slice (copy on write).
func setAt[T any](items *[]T, i int, what string, edit func(*T)) error {
	if i >= len(*items) {
		return fmt.Errorf("index %d out of range (%d %s)", i, len(*items), what)
	}
	*items = append([]T(nil), *items...)
	edit(&(*items)[i])
	return nil
}

// ParamPaths lists the paths a Param may name ("[]" stands for an index).
func ParamPaths() []string {
	out := make([]string, 0, len(paramSetters))
	for k := range paramSetters {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// ParseParam reads a JSON path such as "source.concentration" or
// "receptors[2].x"; the error says why a path names no number field.
func ParseParam(path string) (Param, error) {
	name, index, err := splitIndex(path)
	if err != nil {
		return Param{}, err
	}
	if _, ok := paramSetters[name]; !ok {
		return Param{}, fmt.Errorf("%s: not a number field of the scenario", path)
	}
	return Param{name: name, index: index, path: path}, nil
}

// splitIndex replaces the one index of a path ("receptors[2].x") by "[]".
func splitIndex(path string) (name string, index int, err error) {
	before, rest, ok := strings.Cut(path, "[")
	if !ok {
		return path, 0, nil
	}
	idx, after, ok := strings.Cut(rest, "]")
	if !ok {
		return "", 0, fmt.Errorf("bad index in %q", path)
	}
	i, err := strconv.Atoi(idx)
	if err != nil || i < 0 || strings.Contains(after, "[") {
		return "", 0, fmt.Errorf("bad index in %q", path)
	}
	return before + "[]" + after, i, nil
}

// Set stores v in sc at the parameter's path (copy on write, see setter).
func (p Param) Set(sc *Scenario, v float64) error {
	set, ok := paramSetters[p.name]
	if !ok {
		return fmt.Errorf("%q: not a number field of the scenario", p.path)
	}
	if err := set(sc, p.index, v); err != nil {
		return fmt.Errorf("%s: %w", p.path, err)
	}
	return nil
}

// MarshalText writes the JSON path.
func (p Param) MarshalText() ([]byte, error) { return []byte(p.path), nil }
