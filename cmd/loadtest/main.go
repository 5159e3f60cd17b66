// Command loadtest starts the downgradient handler in this process on
// 127.0.0.1 (loopback only, on a free port; it never targets any other
// host) and drives it with a bounded number of concurrent clients, a bounded
// number of requests and a time limit, mixing valid screenings of the
// invented demo scenario, spreadsheet GETs of /v1/concentration, malformed
// bodies and bodies over the size limit. It reports throughput, latency
// percentiles, answers by status, and the process's peak memory, and exits
// non-zero on any 5xx other than the documented 503 (busy or deadline, with
// Retry-After and problem+json), on any malformed response, or when the
// peak memory is over -max-mem-mib.
//
//	go run ./cmd/loadtest -clients 20 -requests 2000           # CI size
//	go run ./cmd/loadtest -clients 32 -requests 0 -duration 60s -mix screen=100
//
// Memory is sampled every 20 ms from runtime/metrics (the Go runtime's
// mapped memory minus what it has returned to the OS, which tracks the
// resident set) and, on Linux, the peak resident set (VmHWM). Client and
// server share the process, so the figures include the client.
package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"runtime"
	"runtime/metrics"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"downgradient/api"
	"downgradient/internal/runtimetune"
)

// kind is one kind of request of the mix.
type kind uint8

const (
	kindScreen kind = iota
	kindGet
	kindMalformed
	kindOversize
	kindWorst
	nKinds
)

var kindNames = [nKinds]string{"screen", "get", "malformed", "oversize", "worst"}

// expected are the statuses each kind may get; 503 (busy, deadline) is
// documented for all.
var expected = [nKinds]map[int]bool{
	{200: true, 503: true},
	{200: true, 503: true},
	{400: true, 503: true},
	{413: true, 503: true},
	{200: true, 413: true, 503: true},
}

// spreadsheetQuery is a one-number GET of the kind a spreadsheet cell sends
// (the demo's parameters with the seepage velocity given directly).
const spreadsheetQuery = "/v1/concentration?aquifer.seepage_velocity=0.1229&aquifer.dispersivity.longitudinal=10" +
	"&aquifer.dispersivity.transverse=1&aquifer.dispersivity.vertical=0.1&contaminant.retardation=1.37" +
	"&contaminant.half_life=720&source.concentration=12&source.width=15&source.depth=3" +
	"&receptor.x=210&receptor.y=6&receptor.z=2&time=3650&method=exact"

type config struct {
	clients    int
	requests   int
	duration   time.Duration
	mix        [nKinds]int
	maxMemMiB  float64
	scenario   string
	maxHeavy   int
	maxWaiting int
	window     time.Duration
	worst      string
	timeout    time.Duration
	maxLatency time.Duration
	idle       int
}

func main() {
	if err := run(os.Args[1:], os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "loadtest:", err)
		os.Exit(1)
	}
}

func parseMix(s string) ([nKinds]int, error) {
	var mix [nKinds]int
	total := 0
	for _, part := range strings.Split(s, ",") {
		name, val, ok := strings.Cut(strings.TrimSpace(part), "=")
		n, err := strconv.Atoi(val)
		if !ok || err != nil || n < 0 {
			return mix, fmt.Errorf("-mix: %q is not name=weight", part)
		}
		found := false
		for k, kn := range kindNames {
			if kn == name {
				mix[k], found = n, true
			}
		}
		if !found {
			return mix, fmt.Errorf("-mix: unknown kind %q (screen, get, malformed, oversize)", name)
		}
		total += n
	}
	if total == 0 {
		return mix, errors.New("-mix: all weights are zero")
	}
	return mix, nil
}

func run(args []string, out io.Writer) error {
	fs := flag.NewFlagSet("loadtest", flag.ContinueOnError)
	var cfg config
	fs.IntVar(&cfg.clients, "clients", 20, "concurrent clients (1..1000)")
	fs.IntVar(&cfg.requests, "requests", 2000, "requests in all (0: until -duration)")
	fs.DurationVar(&cfg.duration, "duration", 2*time.Minute, "time limit")
	mix := fs.String("mix", "screen=70,get=15,malformed=10,oversize=5", "weights of the request kinds")
	fs.Float64Var(&cfg.maxMemMiB, "max-mem-mib", 200, "fail when the peak memory is over this, MiB")
	fs.StringVar(&cfg.scenario, "scenario", "testdata/demo/scenario.json", "the screening body (found relative to the module root too)")
	fs.IntVar(&cfg.maxHeavy, "max-heavy", 0, "server: computing requests at once (0: default)")
	fs.IntVar(&cfg.maxWaiting, "max-waiting", 0, "server: computing requests waiting (0: default)")
	fs.DurationVar(&cfg.window, "window", 5*time.Second, "memory report window (flatness over the run)")
	fs.StringVar(&cfg.worst, "worst", "", "send only the worst-case request of an endpoint: "+worstNames())
	fs.DurationVar(&cfg.timeout, "request-timeout", 0, "server: per-request deadline (0: default)")
	fs.DurationVar(&cfg.maxLatency, "max-latency", 0, "fail when any answer takes longer (0: no limit)")
	fs.IntVar(&cfg.idle, "idle-seconds", 0, "after the run, report the CPU used in each of this many seconds")
	if err := fs.Parse(args); err != nil {
		return err
	}
	var err error
	if cfg.mix, err = parseMix(*mix); err != nil {
		return err
	}
	if cfg.clients < 1 || cfg.clients > 1000 {
		return fmt.Errorf("-clients %d: allowed 1..1000", cfg.clients)
	}
	if cfg.requests < 0 || (cfg.requests == 0 && cfg.duration <= 0) {
		return errors.New("need -requests > 0 or a -duration")
	}
	scenario, err := readScenario(cfg.scenario)
	if err != nil {
		return err
	}
	rep, err := drive(cfg, scenario)
	if err != nil {
		return err
	}
	rep.print(out, cfg)
	return rep.verdict(cfg)
}

// readScenario reads the body, trying the path as given and then relative
// to the module root (cmd/loadtest is two levels down).
func readScenario(path string) ([]byte, error) {
	b, err := os.ReadFile(path)
	if err == nil || filepath.IsAbs(path) {
		return b, err
	}
	if b2, err2 := os.ReadFile(filepath.Join("..", "..", path)); err2 == nil {
		return b2, nil
	}
	return nil, err
}

// result of one request, kept small (8 bytes) so that the client's own
// records barely show in the memory figures of a long run.
type result struct {
	latUS  uint32 // latency, microseconds
	status uint16
	kind   kind
	bad    bool // malformed response
}

func (r result) latency() time.Duration { return time.Duration(r.latUS) * time.Microsecond }

type report struct {
	elapsed    time.Duration
	results    []result
	transport  []string // transport errors (no response)
	badFirst   []string // the first malformed responses, described
	memPeak    float64  // bytes, runtime mapped minus released
	heapPeak   float64  // bytes, live heap objects
	vmHWM      float64  // bytes, peak resident set (Linux), 0 when unknown
	windows    []float64
	goroutines int       // after the run, once idle
	cpuAfter   []float64 // CPU used in each second after the last answer, s
}

// tuneRuntime sets the runtime as the downgradient command does by default
// (the client shares the spare processor and the collector's settings) and
// returns the number of computation slots (maxHeavy, or the default when 0).
func tuneRuntime(maxHeavy int) int {
	slots := api.Slots(maxHeavy)
	runtimetune.Apply(runtimetune.Settings{Slots: slots, SpareProcs: runtimetune.DefaultSpareProcs,
		GCPercent: runtimetune.DefaultGCPercent, MemoryLimitMiB: runtimetune.DefaultMemoryLimitMiB})
	return slots
}

func drive(cfg config, scenario []byte) (*report, error) {
	h, err := api.New(api.Config{Version: "loadtest", MaxHeavy: tuneRuntime(cfg.maxHeavy), MaxWaiting: cfg.maxWaiting, RequestTimeout: cfg.timeout})
	if err != nil {
		return nil, err
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0") // loopback only, ever
	if err != nil {
		return nil, err
	}
	srv := &http.Server{Handler: h, ReadHeaderTimeout: 5 * time.Second, ReadTimeout: 30 * time.Second,
		WriteTimeout: time.Minute, IdleTimeout: time.Minute, MaxHeaderBytes: 64 << 10}
	go func() { _ = srv.Serve(ln) }()
	defer srv.Close()
	base := "http://" + ln.Addr().String()

	oversize := oversizeBody(scenario, api.DefaultMaxBodyBytes+64<<10)
	malformed := [][]byte{[]byte(`{"aquifer": {`), []byte(`[1,2,`), []byte(`{"receptors": [{"x": 1,}]}`), []byte("\x00\x01")}
	var worst worstSpec
	if cfg.worst != "" {
		if worst.method, worst.path, worst.body, err = worstRequest(cfg.worst, scenario); err != nil {
			return nil, err
		}
	}

	// Memory sampler.
	mem := newSampler(cfg.window)
	stopMem := mem.start()

	tr := &http.Transport{MaxIdleConns: cfg.clients, MaxIdleConnsPerHost: cfg.clients, MaxConnsPerHost: cfg.clients,
		IdleConnTimeout: time.Minute, DisableCompression: true}
	client := &http.Client{Transport: tr, Timeout: time.Minute}
	defer tr.CloseIdleConnections()

	ctx, cancel := context.WithTimeout(context.Background(), cfg.duration)
	defer cancel()
	run := &runner{cfg: cfg, base: base, client: client, scenario: scenario, oversize: oversize, malformed: malformed, worst: worst}
	for _, w := range cfg.mix {
		run.weights += w
	}
	var mu sync.Mutex
	var rep report
	var wg sync.WaitGroup
	start := time.Now()
	for c := range cfg.clients {
		wg.Add(1)
		go func() {
			defer wg.Done()
			local, terrs, bads := run.clientLoop(ctx, c)
			mu.Lock()
			rep.results = append(rep.results, local...)
			rep.transport = append(rep.transport, terrs...)
			rep.badFirst = append(rep.badFirst, bads...)
			mu.Unlock()
		}()
	}
	wg.Wait()
	rep.elapsed = time.Since(start)
	stopMem()
	rep.memPeak, rep.heapPeak, rep.windows = mem.peak, mem.heapPeak, mem.windows
	rep.vmHWM = readVmHWM()
	tr.CloseIdleConnections()
	if cfg.idle > 0 {
		rep.cpuAfter = idleAfter(cfg.idle)
	}
	time.Sleep(100 * time.Millisecond)
	rep.goroutines = runtime.NumGoroutine()
	return &rep, nil
}

// runner holds what the load's clients share: the server's address, the
// HTTP client, the request bodies and the count of requests sent.
type runner struct {
	cfg                config
	base               string
	client             *http.Client
	scenario, oversize []byte
	malformed          [][]byte
	worst              worstSpec
	weights            int
	next               atomic.Int64
}

// clientLoop sends requests one after another until the time or the
// request count runs out: the results, the transport errors, and the
// first few bad answers.
func (r *runner) clientLoop(ctx context.Context, c int) (local []result, terrs, bads []string) {
	for ctx.Err() == nil {
		i := r.next.Add(1) - 1
		if r.cfg.requests > 0 && i >= int64(r.cfg.requests) {
			break
		}
		res, terr, problem := r.one(ctx, c, i)
		switch {
		case terr != "":
			terrs = append(terrs, terr)
			continue
		case res == nil:
			continue
		}
		if problem != "" {
			res.bad = true
			if len(bads) < 5 {
				bads = append(bads, problem)
			}
		}
		local = append(local, *res)
	}
	return local, terrs, bads
}

// one sends request i from client c: its result (nil when the time limit
// cut it off), a transport error, or what was wrong with the answer.
func (r *runner) one(ctx context.Context, c int, i int64) (res *result, terr, problem string) {
	k := pick(r.cfg.mix, r.weights, i)
	var req *http.Request
	var err error
	if r.cfg.worst != "" {
		k = kindWorst
		req, err = r.worst.request(ctx, r.base)
	} else {
		req, err = buildRequest(ctx, r.base, k, r.scenario, r.malformed[int(i)%len(r.malformed)], r.oversize)
	}
	if err != nil {
		return nil, err.Error(), ""
	}
	t0 := time.Now()
	resp, err := r.client.Do(req)
	if err != nil {
		if ctx.Err() == nil {
			return nil, fmt.Sprintf("client %d %s: %v", c, kindNames[k], err), ""
		}
		return nil, "", ""
	}
	body, rerr := io.ReadAll(resp.Body)
	resp.Body.Close()
	lat := time.Since(t0)
	if rerr != nil && ctx.Err() != nil {
		return nil, "", "" // cut off by the time limit, not the server's doing
	}
	res = &result{kind: k, status: uint16(resp.StatusCode), latUS: uint32(min(lat.Microseconds(), math.MaxUint32))}
	if rerr != nil {
		return res, "", "reading the body: " + rerr.Error()
	}
	return res, "", check(k, resp, body)
}

// pick chooses the kind of request i by the mix weights, deterministically
// interleaved (request i lands at position i mod the weight total).
func pick(mix [nKinds]int, total int, i int64) kind {
	pos := int((i * 7919) % int64(total)) // spread the kinds over the run
	for k, w := range mix {
		if pos < w {
			return kind(k)
		}
		pos -= w
	}
	return kindScreen
}

func buildRequest(ctx context.Context, base string, k kind, scenario, malformed, oversize []byte) (*http.Request, error) {
	var req *http.Request
	var err error
	switch k {
	case kindGet:
		req, err = http.NewRequestWithContext(ctx, http.MethodGet, base+spreadsheetQuery, nil)
	case kindMalformed:
		req, err = http.NewRequestWithContext(ctx, http.MethodPost, base+"/v1/screenings", bytes.NewReader(malformed))
	case kindOversize:
		req, err = http.NewRequestWithContext(ctx, http.MethodPost, base+"/v1/screenings", bytes.NewReader(oversize))
	default:
		req, err = http.NewRequestWithContext(ctx, http.MethodPost, base+"/v1/screenings", bytes.NewReader(scenario))
	}
	if err == nil && req.Method == http.MethodPost {
		req.Header.Set("Content-Type", "application/json")
	}
	return req, err
}

// oversizeBody is the scenario padded with whitespace to n bytes (valid
// JSON, only too large).
func oversizeBody(scenario []byte, n int) []byte {
	b := make([]byte, 0, n)
	b = append(b, scenario...)
	for len(b) < n {
		b = append(b, ' ')
	}
	return b
}

// check returns "" for a well-formed response and otherwise what is wrong.
func check(k kind, resp *http.Response, body []byte) string {
	if resp.Header.Get(api.HeaderRequestID) == "" {
		return "no X-Request-ID header"
	}
	ct := resp.Header.Get("Content-Type")
	if resp.StatusCode != 200 {
		var p api.Problem
		if !strings.HasPrefix(ct, "application/problem+json") {
			return fmt.Sprintf("status %d with Content-Type %q", resp.StatusCode, ct)
		}
		if err := json.Unmarshal(body, &p); err != nil {
			return "problem does not decode: " + err.Error()
		}
		if p.Status != resp.StatusCode || p.Type == "" || p.Title == "" || p.Detail == "" {
			return fmt.Sprintf("incomplete problem %+v", p)
		}
		if resp.StatusCode == 503 && resp.Header.Get("Retry-After") == "" {
			return "503 without Retry-After"
		}
		if !expected[k][resp.StatusCode] {
			return fmt.Sprintf("%s: unexpected status %d (%s)", kindNames[k], resp.StatusCode, p.Detail)
		}
		return ""
	}
	if !expected[k][200] {
		return fmt.Sprintf("%s: unexpected 200", kindNames[k])
	}
	switch k {
	case kindGet:
		v, err := strconv.ParseFloat(strings.TrimSpace(string(body)), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return fmt.Sprintf("concentration %q is not a finite number >= 0", body)
		}
	case kindScreen:
		var res struct {
			Engine struct {
				InputSHA256 string `json:"input_sha256"`
			} `json:"engine"`
			Receptors []struct {
				ID     string            `json:"id"`
				Series []json.RawMessage `json:"series"`
			} `json:"receptors"`
			Caveats []json.RawMessage `json:"caveats"`
		}
		if !strings.HasPrefix(ct, "application/json") {
			return "screening with Content-Type " + ct
		}
		if err := json.Unmarshal(body, &res); err != nil {
			return "screening does not decode: " + err.Error()
		}
		if len(res.Engine.InputSHA256) != 64 || len(res.Receptors) == 0 || len(res.Caveats) == 0 {
			return "screening lacks engine hash, receptors or caveats"
		}
	}
	return ""
}

// sampler records the peak of the runtime's memory every 20 ms and the
// peak per window.
type sampler struct {
	window   time.Duration
	peak     float64
	heapPeak float64
	windows  []float64
}

func newSampler(window time.Duration) *sampler { return &sampler{window: window} }

func (s *sampler) start() (stop func()) {
	samples := []metrics.Sample{
		{Name: "/memory/classes/total:bytes"},
		{Name: "/memory/classes/heap/released:bytes"},
		{Name: "/memory/classes/heap/objects:bytes"},
	}
	done := make(chan struct{})
	finished := make(chan struct{})
	go func() {
		defer close(finished)
		tick := time.NewTicker(20 * time.Millisecond)
		defer tick.Stop()
		winStart := time.Now()
		winPeak := 0.0
		for {
			metrics.Read(samples)
			used := float64(samples[0].Value.Uint64() - samples[1].Value.Uint64())
			heap := float64(samples[2].Value.Uint64())
			s.peak = math.Max(s.peak, used)
			s.heapPeak = math.Max(s.heapPeak, heap)
			winPeak = math.Max(winPeak, used)
			if time.Since(winStart) >= s.window {
				s.windows = append(s.windows, winPeak)
				winStart, winPeak = time.Now(), 0
			}
			select {
			case <-done:
				if winPeak > 0 {
					s.windows = append(s.windows, winPeak)
				}
				return
			case <-tick.C:
			}
		}
	}()
	return func() { close(done); <-finished }
}

// readVmHWM is the peak resident set of the process from /proc (Linux), bytes.
func readVmHWM() float64 {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, l := range strings.Split(string(b), "\n") {
		if v, ok := strings.CutPrefix(l, "VmHWM:"); ok {
			f := strings.Fields(v)
			if len(f) >= 1 {
				kb, err := strconv.ParseFloat(f[0], 64)
				if err == nil {
					return kb * 1024
				}
			}
		}
	}
	return 0
}

func percentile(sorted []time.Duration, p float64) time.Duration {
	if len(sorted) == 0 {
		return 0
	}
	i := int(math.Ceil(p/100*float64(len(sorted)))) - 1
	return sorted[max(0, min(i, len(sorted)-1))]
}

const mib = 1 << 20

func (r *report) print(w io.Writer, cfg config) {
	fmt.Fprintf(w, "loadtest: %d clients, %d requests answered in %.2f s (%d transport errors), GOMAXPROCS %d\n",
		cfg.clients, len(r.results), r.elapsed.Seconds(), len(r.transport), runtime.GOMAXPROCS(0))
	fmt.Fprintf(w, "throughput: %.0f requests/s overall\n", float64(len(r.results))/r.elapsed.Seconds())
	for k := range nKinds {
		var lat []time.Duration
		byStatus := map[int]int{}
		for _, res := range r.results {
			if res.kind == k {
				lat = append(lat, res.latency())
				byStatus[int(res.status)]++
			}
		}
		if len(lat) == 0 {
			continue
		}
		sort.Slice(lat, func(i, j int) bool { return lat[i] < lat[j] })
		codes := make([]int, 0, len(byStatus))
		for c := range byStatus {
			codes = append(codes, c)
		}
		sort.Ints(codes)
		var st []string
		for _, c := range codes {
			st = append(st, fmt.Sprintf("%d: %d", c, byStatus[c]))
		}
		fmt.Fprintf(w, "%-9s n=%-6d %6.0f/s  p50 %7.2f ms  p90 %7.2f ms  p99 %7.2f ms  max %7.2f ms  status {%s}\n",
			kindNames[k], len(lat), float64(len(lat))/r.elapsed.Seconds(), ms(percentile(lat, 50)), ms(percentile(lat, 90)),
			ms(percentile(lat, 99)), ms(lat[len(lat)-1]), strings.Join(st, ", "))
	}
	fmt.Fprintf(w, "memory: peak %.1f MiB (Go runtime, mapped minus released), live heap peak %.1f MiB", r.memPeak/mib, r.heapPeak/mib)
	if r.vmHWM > 0 {
		fmt.Fprintf(w, ", peak RSS %.1f MiB", r.vmHWM/mib)
	}
	fmt.Fprintln(w)
	if len(r.windows) > 1 {
		var ws []string
		for _, v := range r.windows {
			ws = append(ws, fmt.Sprintf("%.0f", v/mib))
		}
		fmt.Fprintf(w, "memory peak per %s window, MiB: %s\n", cfg.window, strings.Join(ws, " "))
	}
	fmt.Fprintf(w, "goroutines after the run: %d\n", r.goroutines)
	if len(r.cpuAfter) > 0 {
		var cs []string
		for _, c := range r.cpuAfter {
			cs = append(cs, fmt.Sprintf("%.0f %%", 100*c))
		}
		fmt.Fprintf(w, "CPU of one core used in each second after the last answer: %s\n", strings.Join(cs, ", "))
	}
	for i, e := range r.transport {
		if i == 5 {
			fmt.Fprintf(w, "... %d more transport errors\n", len(r.transport)-5)
			break
		}
		fmt.Fprintln(w, "transport error:", e)
	}
}

// verdict fails on 5xx other than 503, malformed responses, transport
// errors, too few answers, or memory over the limit.
func (r *report) verdict(cfg config) error {
	bad := r.badFirst[:min(len(r.badFirst), 5)]
	n5xx, nBad := 0, 0
	for _, res := range r.results {
		if res.status >= 500 && res.status != 503 {
			n5xx++
		}
		if res.bad {
			nBad++
		}
	}
	var errs []string
	if n5xx > 0 {
		errs = append(errs, fmt.Sprintf("%d responses with a 5xx other than 503", n5xx))
	}
	if nBad > 0 {
		errs = append(errs, fmt.Sprintf("%d malformed responses (first: %s)", nBad, strings.Join(bad, "; ")))
	}
	if len(r.transport) > 0 {
		errs = append(errs, fmt.Sprintf("%d requests got no response", len(r.transport)))
	}
	if cfg.requests > 0 && len(r.results) < cfg.requests && r.elapsed < cfg.duration {
		errs = append(errs, fmt.Sprintf("only %d of %d requests answered", len(r.results), cfg.requests))
	}
	if cfg.maxLatency > 0 {
		for _, res := range r.results {
			if res.latency() > cfg.maxLatency {
				errs = append(errs, fmt.Sprintf("an answer took %v, over %v", res.latency(), cfg.maxLatency))
				break
			}
		}
	}
	if n := len(r.cpuAfter); n > 2 && r.cpuAfter[n-1] > 0.05 {
		errs = append(errs, fmt.Sprintf("%.0f %% of a core still busy %d s after the last answer", 100*r.cpuAfter[n-1], n))
	}
	if r.memPeak/mib > cfg.maxMemMiB {
		errs = append(errs, fmt.Sprintf("peak memory %.1f MiB over the limit of %.0f MiB", r.memPeak/mib, cfg.maxMemMiB))
	}
	if len(errs) > 0 {
		return errors.New(strings.Join(errs, "; "))
	}
	return nil
}

func ms(d time.Duration) float64 { return float64(d.Microseconds()) / 1000 }
