package api

import (
	"context"
	"fmt"
	"log/slog"
	"math"
	"runtime/debug"
	"sort"
	"sync"

	"downgradient/plume"
	"downgradient/plume/maps"
	"downgradient/plume/uncertainty"
)

// Node budgets of the report's map and section: enough for outlines that
// read at print size, a fraction of the cost of /v1/plume-maps' default.
const (
	reportMapCells     = 6_000
	reportSectionCells = 3_000
)

// figureNeeds says what a picture or a report needs computed.
type figureNeeds struct {
	// Receptors (indices of the screening) whose dense curves are drawn.
	breakthrough []int
	// The kinds of picture drawn of each compound of mapped.
	profile, planMap, section bool
	// Node budgets of the map and the section; 0: the maps default.
	mapCells, sectionCells int
	opts                   figureOptions
	// mapped are the compounds whose map, section and profile are drawn
	// (one, named "", for a scenario of one compound).
	mapped []mapTarget
	// unc, when set, is run beside the pictures.
	unc *uncertainty.UncertaintyRequest
}

// mapTarget is a compound whose map, section and profile are drawn, with
// the time and levels of its map and section.
type mapTarget struct {
	// view is the compound's index in the memo's views; name its name
	// ("" for a scenario of one compound).
	view int
	name string
	// time of the map and section; nil for the steady state.
	time *maps.MapTime
	// atPeak: time is the report's choice, the time of a peak (peakMapTime).
	atPeak bool
	// levels of the outlines; nil for the default (the compound's level
	// and 10 and 100 times it).
	levels []float64
}

// figureInputs are the computations the pictures need.
type figureInputs struct {
	res *plume.Result
	// dense holds the receptors of needs.breakthrough, in that order,
	// screened at DenseTimes; denseIndex maps a screening index to it.
	dense      *plume.Result
	denseIndex map[int]int
	// maps are the pictures of each compound of needs.mapped, in order.
	maps []compoundMaps
	unc  *uncertainty.UncertaintyResult
}

// compoundMaps are the profile, plan map and section of one compound
// (those asked for; the others nil).
type compoundMaps struct {
	profile          *maps.Profile
	planMap, section *maps.Map
}

// computeFigures runs what needs asks for, the parts side by side (each
// part also spreads over the cores where it can). A panic in a part is
// recovered here (compute only sees its own goroutine) and reported as
// errEnginePanic.
func (s *server) computeFigures(ctx context.Context, sc plume.Scenario, res *plume.Result, needs figureNeeds) (*figureInputs, error) {
	opt := s.engineOptions()
	fi := &figureInputs{res: res, denseIndex: map[int]int{}}
	var parts []func() error
	if len(needs.breakthrough) > 0 {
		parts = append(parts, func() (err error) {
			sub := sc
			sub.Receptors = make([]plume.Receptor, len(needs.breakthrough))
			for k, i := range needs.breakthrough {
				sub.Receptors[k] = sc.Receptors[i]
				fi.denseIndex[i] = k
			}
			fi.dense, err = maps.Breakthroughs(ctx, sub, denseTimes(sc, res), opt)
			return err
		})
	}
	fi.maps = make([]compoundMaps, len(needs.mapped))
	for k, t := range needs.mapped {
		parts = append(parts, mapParts(ctx, sc, needs, t, &fi.maps[k], opt)...)
	}
	if needs.unc != nil {
		parts = append(parts, func() (err error) {
			fi.unc, err = uncertainty.RunUncertainty(ctx, *needs.unc, opt)
			return err
		})
	}
	if err := runParts(parts); err != nil {
		return nil, err
	}
	return fi, nil
}

// mapParts are the computations of one compound's pictures: its profile,
// plan map and section, as needs asks, into out.
func mapParts(ctx context.Context, sc plume.Scenario, needs figureNeeds, t mapTarget, out *compoundMaps, opt plume.Options) []func() error {
	var parts []func() error
	if needs.profile {
		parts = append(parts, func() (err error) {
			out.profile, err = maps.CentrelineProfile(ctx, sc, t.name, 0, denseSteps, opt)
			return err
		})
	}
	if needs.planMap {
		parts = append(parts, func() (err error) {
			mo := maps.MapOptions{Levels: t.levels, Time: t.time, Cells: cellsOpt(needs.mapCells), Compound: t.name}
			out.planMap, err = maps.PlumeMap(ctx, sc, mo, opt)
			return err
		})
	}
	if needs.section {
		parts = append(parts, func() (err error) {
			mo := maps.MapOptions{View: maps.ViewSection, Levels: t.levels, Time: t.time, Cells: cellsOpt(needs.sectionCells), Compound: t.name}
			out.section, err = maps.PlumeMap(ctx, sc, mo, opt)
			return err
		})
	}
	return parts
}

// earlySteps is the number of times, spaced evenly in log time, that
// denseTimes adds over the first tenth of the horizon, where a curve near
// the source rises within a few uniform steps.
const earlySteps = 40

// denseTimes are the times of a drawn breakthrough curve: maps.DenseTimes
// (denseSteps even steps to a round horizon) and earlySteps more from a
// ten-thousandth to a tenth of the horizon, sorted.
func denseTimes(sc plume.Scenario, res *plume.Result) []float64 {
	ts := maps.DenseTimes(sc, res, denseSteps)
	h := ts[len(ts)-1]
	for k := range earlySteps {
		ts = append(ts, h*math.Pow(10, -4+3*float64(k)/earlySteps))
	}
	sort.Float64s(ts)
	return ts
}

// cellsOpt is a node budget as a map option (nil for the default).
func cellsOpt(n int) *int {
	if n <= 0 {
		return nil
	}
	return &n
}

// runParts runs the parts concurrently and returns the first error (in
// the parts' order); a panic in a part becomes errEnginePanic.
func runParts(parts []func() error) error {
	errs := make([]error, len(parts))
	var wg sync.WaitGroup
	for k, f := range parts {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer func() {
				if r := recover(); r != nil {
					slog.Error("panic in the engine", "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
					errs[k] = errEnginePanic
				}
			}()
			errs[k] = f()
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}
