package plume

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
)

// Limits and defaults of an uncertainty run.
const (
	// DefaultRealizations is the number of realizations when none is asked for.
	DefaultRealizations = 1000
	// MaxRealizations is the most realizations one run may have.
	MaxRealizations = 20_000
	// MaxNumericRealizations is the most realizations a run may have when
	// it includes the (slow) numeric method.
	MaxNumericRealizations = 20
	// ExceedanceConfidence is the level of the exceedance-probability interval.
	ExceedanceConfidence = 0.95
)

// UncertaintyRequest is an uncertainty run: a scenario whose uncertain
// numbers stand at their medians in Template, the distributions in
// Parameters, the number of realizations, the seed and the methods.
type UncertaintyRequest struct {
	// The scenario, each uncertain number replaced by its distribution's median.
	Template Scenario
	// The uncertain numbers (see ExtractUncertain).
	Parameters []UncertainParameter
	// Number of Latin hypercube realizations, 1..MaxRealizations; 0 means DefaultRealizations.
	Realizations int
	// Seed of the random stream; the same seed gives the same result bit for bit.
	Seed uint64
	// Methods to run; empty means ["exact"]. "numeric" needs Realizations <= MaxNumericRealizations.
	Methods []string
	// Parallel workers; 0 means runtime.GOMAXPROCS(0).
	Workers int
}

// UncertaintyResult summarises the distribution of the results over the
// realizations. Numbers are in the request's units.
type UncertaintyResult struct {
	Engine Engine `json:"engine"`
	Units  Units  `json:"units"`
	// Number of realizations run.
	Realizations int `json:"realizations"`
	// Seed of the random stream.
	Seed uint64 `json:"seed"`
	// Methods run, in canonical order.
	Methods []string `json:"methods"`
	// How the realizations were drawn.
	Sampling string `json:"sampling"`
	// How percentiles are computed.
	PercentileMethod string `json:"percentile_method"`
	// The uncertain parameters with the range their sample covers.
	Parameters []ParameterSample `json:"parameters"`
	// One entry per receptor, in request order.
	Receptors []UncertainReceptor `json:"receptors"`
	// Cautions and notes.
	Caveats []Caveat `json:"caveats"`
}

// ParameterSample describes one uncertain parameter and its sample.
type ParameterSample struct {
	// JSON path within the scenario.
	Parameter string `json:"parameter"`
	// The distribution as given.
	Distribution Distribution `json:"distribution"`
	// Median of the distribution (the value the template used).
	Median float64 `json:"median"`
	// Smallest, mean and largest sampled value.
	SampleMin  float64 `json:"sample_min"`
	SampleMean float64 `json:"sample_mean"`
	SampleMax  float64 `json:"sample_max"`
}

// UncertainReceptor is the answer at one receptor.
type UncertainReceptor struct {
	ID string `json:"id"`
	// Plume-frame position at the median inputs, L.
	PlumeX float64 `json:"plume_x"`
	PlumeY float64 `json:"plume_y"`
	Z      float64 `json:"z"`
	// One item per requested time and method.
	Series []UncertainPoint `json:"series"`
	// One item per method: the steady state.
	SteadyState []UncertainSummary `json:"steady_state"`
	// The peak over all time of the primary method (exact, else domenico;
	// numeric runs use Screen's peak): exceeding the screening level at any time.
	Peak UncertainSummary `json:"peak"`
	// Parameters ranked by |rank correlation| with the peak concentration.
	Drivers []Driver `json:"drivers"`
}

// UncertainSummary is the distribution of one result over the realizations, C.
type UncertainSummary struct {
	Method      string      `json:"method"`
	Mean        float64     `json:"mean"`
	Percentiles Percentiles `json:"percentiles"`
	// Fraction of realizations at or above the screening level; null
	// without a screening level.
	ExceedanceProbability *float64 `json:"exceedance_probability"`
	// Clopper-Pearson 95 % interval of that fraction (sampling error only); null without a level.
	ExceedanceProbabilityCI []float64 `json:"exceedance_probability_ci"`
}

// UncertainPoint is UncertainSummary at one time, T.
type UncertainPoint struct {
	Time float64 `json:"time"`
	UncertainSummary
}

// Driver is one parameter's Spearman rank correlation with a receptor's peak.
type Driver struct {
	Parameter       string  `json:"parameter"`
	RankCorrelation float64 `json:"rank_correlation"`
}

// RealizationError says which realization could not be evaluated and why.
type RealizationError struct {
	Index  int
	Values map[string]float64
	Err    error
}

func (e *RealizationError) Error() string {
	return fmt.Sprintf("realization %d: %v", e.Index, e.Err)
}

// Unwrap returns the underlying error.
func (e *RealizationError) Unwrap() error { return e.Err }

// uncertaintyMethods resolves the methods of a run.
func uncertaintyMethods(names []string) []string {
	if len(names) == 0 {
		return []string{MethodExact}
	}
	var out []string
	for _, m := range AllMethods {
		for _, n := range names {
			if n == m {
				out = append(out, m)
				break
			}
		}
	}
	return out
}

// CheckUncertainty validates the run's own settings (not the scenario).
func CheckUncertainty(req UncertaintyRequest) error {
	var fe FieldErrors
	n := req.Realizations
	if n == 0 {
		n = DefaultRealizations
	}
	if n < 1 || n > MaxRealizations {
		fe.add("realizations", fmt.Sprintf("must be in 1..%d, got %d", MaxRealizations, n))
	}
	for i, m := range req.Methods {
		if !knownMethod(m) {
			fe.add(fmt.Sprintf("methods[%d]", i), fmt.Sprintf("must be one of %s, got %q", strings.Join(AllMethods, ", "), m))
		}
	}
	return fe.orNil()
}

// RunUncertainty draws the realizations (SampleLatinHypercube), evaluates the
// requested methods at every receptor and time, plus the steady state and
// the peak, on a bounded pool of workers, and summarises the results. It
// checks the template and the extremes of each sampled parameter with
// Validate first (FieldErrors naming the parameter); a realization that
// still fails comes back as a *RealizationError. ctx is checked between
// realizations.
func RunUncertainty(ctx context.Context, req UncertaintyRequest, opt Options) (*UncertaintyResult, error) {
	opt = opt.withDefaults()
	if err := CheckUncertainty(req); err != nil {
		return nil, err
	}
	n := req.Realizations
	if n == 0 {
		n = DefaultRealizations
	}
	methods := uncertaintyMethods(req.Methods)
	numeric := false
	for _, m := range methods {
		numeric = numeric || m == MethodNumeric
	}
	if numeric && n > MaxNumericRealizations {
		return nil, FieldErrors{{Field: "realizations", Message: fmt.Sprintf(
			"the numeric method is limited to %d realizations (it takes seconds each); got %d: use the closed forms (exact, domenico) for more", MaxNumericRealizations, n)}}
	}
	tmpl := req.Template
	tmpl.Methods = methods
	base, err := prepare(tmpl)
	if err != nil {
		return nil, err
	}
	samples := SampleLatinHypercube(req.Parameters, n, req.Seed)
	if err := checkSampleRange(tmpl, req.Parameters, samples); err != nil {
		return nil, err
	}

	nr, nt, nm := len(base.pts), len(tmpl.Times), len(methods)
	// vals[((mi*nr+r)*(nt+1)+j)*n+k]: method mi, receptor r, time j (nt = steady), realization k.
	vals := make([]float64, nm*nr*(nt+1)*n)
	peaks := make([]float64, nr*n)
	levels := make([]float64, n) // screening level per realization (request unit), NaN when none
	at := func(mi, r, j, k int) *float64 { return &vals[((mi*nr+r)*(nt+1)+j)*n+k] }

	workers := req.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(1, min(workers, n))
	var next atomic.Int64
	var wg sync.WaitGroup
	var once sync.Once
	var firstErr error
	fail := func(err error) { once.Do(func() { firstErr = err }) }
	var failed atomic.Bool
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer func() {
				if r := recover(); r != nil {
					failed.Store(true)
					fail(fmt.Errorf("plume: realization panicked: %v", r))
				}
			}()
			for {
				k := int(next.Add(1) - 1)
				if k >= n || failed.Load() {
					return
				}
				if err := ctx.Err(); err != nil {
					failed.Store(true)
					fail(err)
					return
				}
				sc := tmpl
				for i, p := range req.Parameters {
					if err := setNumber(&sc, p.Path, samples[k][i]); err != nil {
						failed.Store(true)
						fail(&RealizationError{Index: k, Err: err})
						return
					}
				}
				var err error
				if numeric {
					err = realizeScreen(ctx, sc, opt, methods, k, nr, nt, at, peaks, levels, n)
				} else {
					err = realizeClosed(sc, methods, k, nr, at, peaks, levels, n)
				}
				if err != nil {
					failed.Store(true)
					if ctx.Err() != nil {
						fail(ctx.Err())
					} else {
						vs := map[string]float64{}
						for i, p := range req.Parameters {
							vs[p.Path] = samples[k][i]
						}
						fail(&RealizationError{Index: k, Values: vs, Err: err})
					}
					return
				}
			}
		}()
	}
	wg.Wait()
	if firstErr != nil {
		return nil, firstErr
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	res := &UncertaintyResult{
		Engine:           Engine{Version: opt.EngineVersion, InputSHA256: uncertaintySHA256(req, n, methods)},
		Units:            base.units,
		Realizations:     n,
		Seed:             req.Seed,
		Methods:          methods,
		Sampling:         "Latin hypercube (gonum stat/samplemv), independent parameters, PCG random stream seeded by seed",
		PercentileMethod: PercentileMethod,
		Parameters:       make([]ParameterSample, len(req.Parameters)),
		Receptors:        make([]UncertainReceptor, nr),
		Caveats:          []Caveat{},
	}
	paramRanks := make([][]float64, len(req.Parameters))
	for i, p := range req.Parameters {
		col := make([]float64, n)
		lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
		for k := range n {
			col[k] = samples[k][i]
			lo, hi, sum = math.Min(lo, col[k]), math.Max(hi, col[k]), sum+col[k]
		}
		paramRanks[i] = ranks(col)
		res.Parameters[i] = ParameterSample{Parameter: p.Path, Distribution: p.Dist, Median: clean(p.Dist.Median()),
			SampleMin: clean(lo), SampleMean: clean(sum / float64(n)), SampleMax: clean(hi)}
	}
	summarize := func(method string, x []float64) UncertainSummary {
		s := UncertainSummary{Method: method, Percentiles: samplePercentiles(x)}
		sum, hits, withLevel := 0.0, 0, 0
		for k, v := range x {
			sum += v
			if !math.IsNaN(levels[k]) {
				withLevel++
				if v >= levels[k] && v > 0 {
					hits++
				}
			}
		}
		s.Mean = clean(sum / float64(len(x)))
		if withLevel == len(x) {
			p := float64(hits) / float64(n)
			lo, hi := ClopperPearson(hits, n, ExceedanceConfidence)
			s.ExceedanceProbability = &p
			s.ExceedanceProbabilityCI = []float64{lo, hi}
		}
		return s
	}
	primary := methods[0]
	if primary == MethodNumeric {
		primary = MethodExact
	}
	for r, p := range base.pts {
		ur := UncertainReceptor{ID: p.id, PlumeX: p.px / base.uf.L, PlumeY: p.py / base.uf.L, Z: p.mid() / base.uf.L,
			Series: make([]UncertainPoint, 0, nt*nm), SteadyState: make([]UncertainSummary, 0, nm)}
		for j, t := range tmpl.Times {
			for mi, m := range methods {
				x := vals[((mi*nr+r)*(nt+1)+j)*n : ((mi*nr+r)*(nt+1)+j+1)*n]
				ur.Series = append(ur.Series, UncertainPoint{Time: t, UncertainSummary: summarize(m, x)})
			}
		}
		for mi, m := range methods {
			x := vals[((mi*nr+r)*(nt+1)+nt)*n : ((mi*nr+r)*(nt+1)+nt+1)*n]
			ur.SteadyState = append(ur.SteadyState, summarize(m, x))
		}
		pk := peaks[r*n : (r+1)*n]
		ur.Peak = summarize(primary, pk)
		pr := ranks(pk)
		ur.Drivers = make([]Driver, len(req.Parameters))
		for i, prm := range req.Parameters {
			ur.Drivers[i] = Driver{Parameter: prm.Path, RankCorrelation: spearman(paramRanks[i], pr)}
		}
		sort.SliceStable(ur.Drivers, func(a, b int) bool {
			return math.Abs(ur.Drivers[a].RankCorrelation) > math.Abs(ur.Drivers[b].RankCorrelation)
		})
		res.Receptors[r] = ur
	}
	res.addUncertaintyCaveats(ctx, tmpl, base, levels, opt)
	return res, nil
}

// realizeClosed evaluates one realization with the closed forms, in the
// request's units.
func realizeClosed(sc Scenario, methods []string, k, nr int, at func(mi, r, j, k int) *float64, peaks, levels []float64, n int) error {
	pr, err := prepare(sc)
	if err != nil {
		return err
	}
	if len(pr.pts) != nr {
		return fmt.Errorf("receptor count changed")
	}
	levels[k] = math.NaN()
	if pr.m.screening != nil {
		levels[k] = *pr.m.screening / pr.uf.C
	}
	taus := make([]float64, len(sc.Times))
	for j, t := range sc.Times {
		taus[j] = t*pr.uf.T - pr.m.start
	}
	nt := len(taus)
	inf := math.Inf(1)
	for r, p := range pr.pts {
		var steadyPrimary float64
		for mi, m := range methods {
			exact := m == MethodExact
			if !exact && pr.m.kind == SourceKindInstantaneous {
				// Domenico does not apply to a mass release: reported as 0,
				// with a caveat.
				for j := 0; j <= nt; j++ {
					*at(mi, r, j, k) = 0
				}
				continue
			}
			for j, tau := range taus {
				*at(mi, r, j, k) = clean(pr.value(exact, p, tau) / pr.uf.C)
			}
			ss := pr.value(exact, p, inf)
			*at(mi, r, nt, k) = clean(ss / pr.uf.C)
			if mi == 0 {
				steadyPrimary = ss
			}
		}
		exactPrimary := methods[0] == MethodExact || pr.m.kind == SourceKindInstantaneous
		if exactPrimary && methods[0] != MethodExact {
			steadyPrimary = pr.value(true, p, inf)
		}
		peaks[r*n+k] = clean(pr.peak(exactPrimary, p, steadyPrimary, taus) / pr.uf.C)
	}
	return nil
}

// realizeScreen evaluates one realization with Screen (runs with numeric).
func realizeScreen(ctx context.Context, sc Scenario, opt Options, methods []string, k, nr, nt int, at func(mi, r, j, k int) *float64, peaks, levels []float64, n int) error {
	res, err := Screen(ctx, sc, opt)
	if err != nil {
		return err
	}
	if len(res.Receptors) != nr {
		return fmt.Errorf("receptor count changed")
	}
	levels[k] = math.NaN()
	if res.Derived.ScreeningLevel != nil {
		levels[k] = *res.Derived.ScreeningLevel
	}
	val := func(p *float64) float64 {
		if p == nil {
			return 0
		}
		return clean(*p)
	}
	for r, rr := range res.Receptors {
		for mi, m := range methods {
			for j := range nt {
				sp := rr.Series[j]
				*at(mi, r, j, k) = val(methodPtr(m, sp.Exact, sp.Domenico, sp.Numeric))
			}
			ss := rr.SteadyState
			*at(mi, r, nt, k) = val(methodPtr(m, ss.Exact, ss.Domenico, ss.Numeric))
		}
		peaks[r*n+k] = clean(rr.Peak.Concentration)
	}
	return nil
}

func methodPtr(m string, e, d, nu *float64) *float64 {
	switch m {
	case MethodExact:
		return e
	case MethodDomenico:
		return d
	}
	return nu
}

// checkSampleRange validates the template with every parameter at its
// smallest sampled value, then at its largest, so a distribution reaching
// outside a field's allowed range is reported against that field.
func checkSampleRange(tmpl Scenario, params []UncertainParameter, samples [][]float64) error {
	if len(params) == 0 || len(samples) == 0 {
		return nil
	}
	var fe FieldErrors
	seen := map[string]bool{}
	for _, pick := range []func(a, b float64) float64{math.Min, math.Max} {
		sc := tmpl
		ext := make([]float64, len(params))
		for i, p := range params {
			ext[i] = samples[0][i]
			for _, row := range samples {
				ext[i] = pick(ext[i], row[i])
			}
			if err := setNumber(&sc, p.Path, ext[i]); err != nil {
				fe.add(p.Path, "cannot be uncertain: "+err.Error())
			}
		}
		err := Validate(sc)
		vfe, ok := err.(FieldErrors)
		if !ok {
			continue
		}
		for _, e := range vfe {
			for i, p := range params {
				if e.Field == p.Path && !seen[p.Path] {
					seen[p.Path] = true
					fe.add(p.Path, fmt.Sprintf("the %s distribution reaches %g in the sample, outside the allowed range (%s): narrow or truncate it", p.Dist.Kind, ext[i], e.Message))
				}
			}
		}
	}
	return fe.orNil()
}

// uncertaintySHA256 identifies the input of a run.
func uncertaintySHA256(req UncertaintyRequest, n int, methods []string) string {
	b, err := json.Marshal(struct {
		Scenario     Scenario             `json:"scenario"`
		Parameters   []UncertainParameter `json:"parameters"`
		Realizations int                  `json:"realizations"`
		Seed         uint64               `json:"seed"`
		Methods      []string             `json:"methods"`
	}{req.Template, req.Parameters, n, req.Seed, methods})
	if err != nil {
		b = []byte(err.Error())
	}
	s := sha256.Sum256(b)
	return hex.EncodeToString(s[:])
}
