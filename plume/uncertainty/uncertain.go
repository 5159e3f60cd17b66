package uncertainty

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"downgradient/plume"
)

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

type UncertaintyRequest struct {
	// The scenario, each uncertain number replaced by its distribution's median.
	Template plume.Scenario
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
	// The compound analysed, for a scenario of several (contaminants[]);
	// "" for a scenario of one. See plume.Model.Focus.
	Compound string
}

type UncertaintyResult struct {
	Engine plume.Engine `json:"engine"`
	Units  plume.Units  `json:"units"`
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
	Caveats []plume.Caveat `json:"caveats"`
}

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

type UncertainPoint struct {
	Time float64 `json:"time"`
	UncertainSummary
}

type Driver struct {
	Parameter       string  `json:"parameter"`
	RankCorrelation float64 `json:"rank_correlation"`
}

func uncertaintyMethods(names []string) []string {
	if len(names) == 0 {
		return []string{plume.MethodExact}
	}
	var out []string
	for _, m := range plume.AllMethods {
		for _, n := range names {
			if n == m {
				out = append(out, m)
				break
			}
		}
	}
	return out
}

func (req UncertaintyRequest) realizations() int {
	if req.Realizations == 0 {
		return DefaultRealizations
	}
	return req.Realizations
}

func CheckUncertainty(req UncertaintyRequest) error {
	var fe plume.FieldErrors
	n := req.realizations()
	if n < 1 || n > MaxRealizations {
		fe.Add("realizations", fmt.Sprintf("must be in 1..%d, got %d", MaxRealizations, n))
	}
	for i, m := range req.Methods {
		if !plume.KnownMethod(m) {
			fe.Add(fmt.Sprintf("methods[%d]", i), fmt.Sprintf("must be one of %s, got %q", strings.Join(plume.AllMethods, ", "), m))
		}
	}
	return fe.Err()
}

func CheckWorkload(req UncertaintyRequest, maxEvaluations int) error {
	n := req.realizations()
	methods := req.Methods
	if len(methods) == 0 {
		methods = []string{plume.MethodExact}
	}
	var fe plume.FieldErrors
	if n > MaxRealizations {
		fe.Add("realizations", fmt.Sprintf("%d realizations; at most %d allowed", n, MaxRealizations))
	}
	numeric, closed := false, 0
	for _, m := range methods {
		switch m {
		case plume.MethodNumeric:
			numeric = true
		case plume.MethodExact, plume.MethodDomenico:
			closed++
		}
	}
	if numeric && n > MaxNumericRealizations {
		fe.Add("realizations", fmt.Sprintf(
			"the numeric method is limited to %d realizations (each takes seconds); got %d: use methods [\"exact\"] or [\"exact\", \"domenico\"] for more", MaxNumericRealizations, n))
	}
	if evals := n * len(req.Template.Receptors) * (len(req.Template.Times) + 1) * max(closed, 1); evals > maxEvaluations {
		fe.Add("realizations", fmt.Sprintf(
			"realizations x receptors x (times + 1) x methods = %d evaluations; at most %d allowed per request: use fewer realizations, receptors or times",
			evals, maxEvaluations))
	}
	return fe.OverLimit("workload over the limits")
}

func RunUncertainty(ctx context.Context, req UncertaintyRequest, opt plume.Options) (*UncertaintyResult, error) {
	opt = opt.WithDefaults()
	if err := CheckUncertainty(req); err != nil {
		return nil, err
	}
	n := req.realizations()
	methods := uncertaintyMethods(req.Methods)
	numeric := slices.Contains(methods, plume.MethodNumeric)
	if numeric && n > MaxNumericRealizations {
		return nil, plume.Invalid("realizations", fmt.Sprintf(
			"the numeric method is limited to %d realizations (it takes seconds); got %d: use the closed forms (exact, domenico) for more", MaxNumericRealizations, n))
	}
	tmpl := req.Template
	tmpl.Methods = methods
	base, err := plume.Prepare(tmpl)
	if err != nil {
		return nil, err
	}
	if base, err = base.Focus(req.Compound); err != nil {
		return nil, err
	}
	samples := SampleLatinHypercube(req.Parameters, n, req.Seed)
	if err := checkSampleRange(tmpl, req.Parameters, samples); err != nil {
		return nil, err
	}
	r := &run{req: req, tmpl: tmpl, opt: opt, methods: methods, numeric: numeric, samples: samples,
		n: n, nr: len(base.Receptors()), nt: len(tmpl.Times)}
	r.vals = make([]float64, len(methods)*r.nr*(r.nt+1)*n)
	r.peaks = make([]float64, r.nr*n)
	r.levels = make([]float64, n)
	if err := r.evaluate(ctx); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	res := r.summarize(base)
	res.addUncertaintyCaveats(ctx, tmpl, base, opt)
	return res, nil
}

type run struct {
	req       UncertaintyRequest
	tmpl      plume.Scenario
	opt       plume.Options
	methods   []string
	numeric   bool
	samples   [][]float64
	n, nr, nt int       // realizations, receptors, times
	vals      []float64 // see at
	peaks     []float64 // [r*n+k]: peak of receptor r in realization k, request unit
	levels    []float64 // screening level per realization (request unit), NaN when none
	workers   int
	start     time.Time // of the evaluation
	failed    atomic.Bool
	// project runs once, after the first numeric realization.
	projectOnce sync.Once
	once        sync.Once
	firstError  error
}

func (r *run) at(mi, rc, j, k int) *float64 {
	return &r.vals[((mi*r.nr+rc)*(r.nt+1)+j)*r.n+k]
}

func (r *run) fail(err error) {
	r.failed.Store(true)
	r.once.Do(func() { r.firstError = err })
}

func (r *run) evaluate(ctx context.Context) error {
	workers := r.req.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(1, min(workers, r.n))
	r.workers = workers
	r.start = time.Now()
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer func() {
				if p := recover(); p != nil {
					r.fail(&plume.Error{Kind: plume.KindInternal, Detail: fmt.Sprintf("uncertainty: a realization panicked: %v", p)})
				}
			}()
			for {
				k := int(next.Add(1) - 1)
				if k >= r.n || r.failed.Load() {
					return
				}
				if err := ctx.Err(); err != nil {
					r.fail(err)
					return
				}
				if err := r.realize(ctx, k); err != nil {
					r.fail(err)
					return
				}
				if r.numeric {
					r.projectOnce.Do(func() {
						if err := r.project(ctx); err != nil {
							r.fail(err)
						}
					})
				}
			}
		}()
	}
	wg.Wait()
	return r.firstError
}

// project refuses a numeric run that cannot finish within ctx's deadline:
// from the time its first realization took (every worker started one at
// the same time), each worker has ceil(n / workers) to run one after the
// other. The error names realizations and says how many would fit.
func (r *run) project(ctx context.Context) error {
	deadline, ok := ctx.Deadline()
	if !ok {
		return nil
	}
	each := time.Since(r.start)
	rounds := (r.n + r.workers - 1) / r.workers
	if r.start.Add(time.Duration(rounds) * each).Before(deadline) {
		return nil
	}
	fit := int(deadline.Sub(r.start)/max(each, time.Nanosecond)) * r.workers
	var fe plume.FieldErrors
	fe.Add("realizations", fmt.Sprintf(
		"each numeric realization takes about %.2g s here; %d of them (%d at a time) cannot finish within the deadline, about %d could: ask for fewer realizations or the closed forms (exact, domenico)",
		each.Seconds(), r.n, r.workers, max(fit, 1)))
	return fe.OverLimit("the numeric realizations cannot finish within the deadline")
}

func (r *run) realize(ctx context.Context, k int) error {
	sc := r.tmpl
	for i, p := range r.req.Parameters {
		if err := p.Param.Set(&sc, r.samples[k][i]); err != nil {
			return realizationError(k, nil, err)
		}
	}
	var err error
	if r.numeric {
		err = r.realizeScreen(ctx, sc, k)
	} else {
		err = r.realizeClosed(sc, k)
	}
	if err == nil {
		return nil
	}
	if ctx.Err() != nil {
		return ctx.Err()
	}
	vs := map[string]float64{}
	for i, p := range r.req.Parameters {
		vs[p.Param.String()] = r.samples[k][i]
	}
	return realizationError(k, vs, err)
}

func realizationError(k int, values map[string]float64, err error) error {
	vals := make([]string, 0, len(values))
	for name, v := range values {
		vals = append(vals, fmt.Sprintf("%s = %g", name, v))
	}
	sort.Strings(vals)
	return &plume.Error{Kind: plume.KindInvalid, Err: err, Fields: plume.FieldsOf(err),
		Detail: fmt.Sprintf("realization %d (%s) is not a valid scenario: narrow the distributions so that every combination is valid: %v",
			k, strings.Join(vals, ", "), err)}
}

func (r *run) summarize(base *plume.Model) *UncertaintyResult {
	req, n := r.req, r.n
	res := &UncertaintyResult{
		Engine:           plume.Engine{Version: r.opt.EngineVersion, InputSHA256: uncertaintySHA256(req, n, r.methods)},
		Units:            base.Units(),
		Realizations:     n,
		Seed:             req.Seed,
		Methods:          r.methods,
		Sampling:         "Latin hypercube (gonum stat/samplemv), independent parameters, PCG random stream seeded by seed",
		PercentileMethod: PercentileMethod,
		Parameters:       make([]ParameterSample, len(req.Parameters)),
		Receptors:        make([]UncertainReceptor, r.nr),
		Caveats:          []plume.Caveat{},
	}
	paramRanks := make([][]float64, len(req.Parameters))
	for i, p := range req.Parameters {
		col := make([]float64, n)
		lo, hi, sum := math.Inf(1), math.Inf(-1), 0.0
		for k := range n {
			col[k] = r.samples[k][i]
			lo, hi, sum = math.Min(lo, col[k]), math.Max(hi, col[k]), sum+col[k]
		}
		paramRanks[i] = ranks(col)
		res.Parameters[i] = ParameterSample{Parameter: p.Param.String(), Distribution: p.Dist, Median: plume.Clean(p.Dist.Median()),
			SampleMin: plume.Clean(lo), SampleMean: plume.Clean(sum / float64(n)), SampleMax: plume.Clean(hi)}
	}
	primary := r.methods[0]
	if primary == plume.MethodNumeric {
		primary = plume.MethodExact
	}
	uf := base.Factors()
	for rc, p := range base.Receptors() {
		ur := UncertainReceptor{ID: p.ID, PlumeX: p.X / uf.L, PlumeY: p.Y / uf.L, Z: p.Mid() / uf.L,
			Series: make([]UncertainPoint, 0, r.nt*len(r.methods)), SteadyState: make([]UncertainSummary, 0, len(r.methods))}
		for j, t := range r.tmpl.Times {
			for mi, m := range r.methods {
				ur.Series = append(ur.Series, UncertainPoint{Time: t, UncertainSummary: r.summary(m, r.column(mi, rc, j))})
			}
		}
		for mi, m := range r.methods {
			ur.SteadyState = append(ur.SteadyState, r.summary(m, r.column(mi, rc, r.nt)))
		}
		pk := r.peaks[rc*n : (rc+1)*n]
		ur.Peak = r.summary(primary, pk)
		ur.Drivers = drivers(req.Parameters, paramRanks, ranks(pk))
		res.Receptors[rc] = ur
	}
	return res
}

func (r *run) column(mi, rc, j int) []float64 {
	i := ((mi*r.nr+rc)*(r.nt+1) + j) * r.n
	return r.vals[i : i+r.n]
}

func (r *run) summary(method string, x []float64) UncertainSummary {
	s := UncertainSummary{Method: method, Percentiles: samplePercentiles(x)}
	sum, hits, withLevel := 0.0, 0, 0
	for k, v := range x {
		sum += v
		if !math.IsNaN(r.levels[k]) {
			withLevel++
			if v >= r.levels[k] && v > 0 {
				hits++
			}
		}
	}
	s.Mean = plume.Clean(sum / float64(len(x)))
	if withLevel == len(x) {
		p := float64(hits) / float64(r.n)
		lo, hi := ClopperPearson(hits, r.n, ExceedanceConfidence)
		s.ExceedanceProbability = &p
		s.ExceedanceProbabilityCI = []float64{lo, hi}
	}
	return s
}

func drivers(params []UncertainParameter, paramRanks [][]float64, pr []float64) []Driver {
	ds := make([]Driver, len(params))
	for i, prm := range params {
		ds[i] = Driver{Parameter: prm.Param.String(), RankCorrelation: spearman(paramRanks[i], pr)}
	}
	sort.SliceStable(ds, func(a, b int) bool {
		return math.Abs(ds[a].RankCorrelation) > math.Abs(ds[b].RankCorrelation)
	})
	return ds
}

func (r *run) realizeClosed(sc plume.Scenario, k int) error {
	md, err := plume.Prepare(sc)
	if err == nil {
		md, err = md.Focus(r.req.Compound)
	}
	if err != nil {
		return err
	}
	pts := md.Receptors()
	if len(pts) != r.nr {
		return fmt.Errorf("receptor count changed")
	}
	uf := md.Factors()
	r.levels[k] = math.NaN()
	if lv, ok := md.ScreeningLevel(); ok {
		r.levels[k] = lv / uf.C
	}
	taus := make([]float64, len(sc.Times))
	for j, t := range sc.Times {
		taus[j] = md.Elapsed(t)
	}
	instantaneous := md.SourceTerm().Kind == plume.SourceKindInstantaneous
	inf := math.Inf(1)
	floor := md.ConcentrationFloor()
	value := func(m string, p plume.Point, tau float64) float64 {
		return plume.FloorConcentration(plume.Clean(md.Value(m, p, tau)), floor)
	}
	for rc, p := range pts {
		var steadyPrimary float64
		for mi, m := range r.methods {
			if m != plume.MethodExact && instantaneous {
				// Domenico does not apply to a mass release: reported as 0,
				// with a caveat.
				for j := 0; j <= r.nt; j++ {
					*r.at(mi, rc, j, k) = 0
				}
				continue
			}
			for j, tau := range taus {
				*r.at(mi, rc, j, k) = value(m, p, tau) / uf.C
			}
			ss := value(m, p, inf)
			*r.at(mi, rc, r.nt, k) = ss / uf.C
			if mi == 0 {
				steadyPrimary = ss
			}
		}
		primary := r.methods[0]
		if instantaneous {
			primary = plume.MethodExact
		}
		if primary == plume.MethodExact && r.methods[0] != plume.MethodExact {
			steadyPrimary = md.Value(plume.MethodExact, p, inf)
		}
		_, pk := md.Peak(primary, p, steadyPrimary, taus)
		r.peaks[rc*r.n+k] = plume.FloorConcentration(plume.Clean(pk), floor) / uf.C
	}
	return nil
}

func (r *run) realizeScreen(ctx context.Context, sc plume.Scenario, k int) error {
	res, err := plume.Screen(ctx, sc, r.opt)
	if err == nil {
		res, err = res.Focus(r.req.Compound)
	}
	if err != nil {
		return err
	}
	if len(res.Receptors) != r.nr {
		return fmt.Errorf("receptor count changed")
	}
	r.levels[k] = math.NaN()
	if res.Derived.ScreeningLevel != nil {
		r.levels[k] = *res.Derived.ScreeningLevel
	}
	val := func(p *float64) float64 {
		if p == nil {
			return 0
		}
		return plume.Clean(*p)
	}
	for rc, rr := range res.Receptors {
		for mi, m := range r.methods {
			for j := range r.nt {
				sp := rr.Series[j]
				*r.at(mi, rc, j, k) = val(plume.MethodValue(m, sp.Exact, sp.Domenico, sp.Numeric))
			}
			ss := rr.SteadyState
			*r.at(mi, rc, r.nt, k) = val(plume.MethodValue(m, ss.Exact, ss.Domenico, ss.Numeric))
		}
		r.peaks[rc*r.n+k] = plume.Clean(rr.Peak.Concentration)
	}
	return nil
}

func checkSampleRange(tmpl plume.Scenario, params []UncertainParameter, samples [][]float64) error {
	if len(params) == 0 || len(samples) == 0 {
		return nil
	}
	var fe plume.FieldErrors
	seen := map[string]bool{}
	for _, pick := range []func(a, b float64) float64{math.Min, math.Max} {
		sc := tmpl
		ext := make([]float64, len(params))
		for i, p := range params {
			ext[i] = samples[0][i]
			for _, row := range samples {
				ext[i] = pick(ext[i], row[i])
			}
			if err := p.Param.Set(&sc, ext[i]); err != nil {
				fe.Add(p.Param.String(), "cannot be uncertain: "+err.Error())
			}
		}
		for _, e := range plume.FieldsOf(plume.Validate(sc)) {
			for i, p := range params {
				if path := p.Param.String(); e.Field == path && !seen[path] {
					seen[path] = true
					fe.Add(path, fmt.Sprintf("the %s distribution reaches %g in the sample, outside the allowed range (%s): narrow or truncate it", p.Dist.Kind, ext[i], e.Message))
				}
			}
		}
	}
	return fe.Err()
}

func uncertaintySHA256(req UncertaintyRequest, n int, methods []string) string {
	b, err := json.Marshal(struct {
		Scenario     plume.Scenario       `json:"scenario"`
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
