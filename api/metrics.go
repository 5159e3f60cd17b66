package api

import (
	"strconv"
	"time"

	"github.com/labstack/echo/v4"
	"github.com/prometheus/client_golang/prometheus"
	"github.com/prometheus/client_golang/prometheus/collectors"
	"github.com/prometheus/client_golang/prometheus/promhttp"

	"downgradient/plume"
)

// metrics are the Prometheus series of one handler. Each handler has its own
// registry (so tests can build many), served at GET /metrics together with
// the Go runtime and process collectors. Label values are bounded: route is
// the route template (never the raw path), status the numeric code, code a
// caveat code of the engine.
type metrics struct {
	reg *prometheus.Registry
	// known route templates; anything else is counted as "unmatched".
	routes map[string]bool

	requests     *prometheus.CounterVec   // method, route, status
	duration     *prometheus.HistogramVec // method, route, status
	heavyActive  prometheus.Gauge
	heavyWaiting prometheus.Gauge
	heavyReject  prometheus.Counter
	cells        prometheus.Counter
	caveats      *prometheus.CounterVec // code
}

func newMetrics() *metrics {
	m := &metrics{reg: prometheus.NewRegistry(), routes: map[string]bool{}}
	m.requests = prometheus.NewCounterVec(prometheus.CounterOpts{
		Name: "downgradient_http_requests_total",
		Help: "HTTP requests answered, by method, route template and status code.",
	}, []string{"method", "route", "status"})
	m.duration = prometheus.NewHistogramVec(prometheus.HistogramOpts{
		Name:    "downgradient_http_request_duration_seconds",
		Help:    "Time from the request's arrival to the end of its answer, seconds, by method, route template and status code.",
		Buckets: []float64{0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30, 60},
	}, []string{"method", "route", "status"})
	m.heavyActive = prometheus.NewGauge(prometheus.GaugeOpts{
		Name: "downgradient_heavy_requests_in_flight",
		Help: "Computing requests (screenings, maps, uncertainty, ...) holding a computation slot now.",
	})
	m.heavyWaiting = prometheus.NewGauge(prometheus.GaugeOpts{
		Name: "downgradient_heavy_requests_waiting",
		Help: "Computing requests waiting for a computation slot now.",
	})
	m.heavyReject = prometheus.NewCounter(prometheus.CounterOpts{
		Name: "downgradient_heavy_requests_rejected_total",
		Help: "Computing requests refused with 503 because every slot was busy and the waiting line was full or too slow.",
	})
	m.cells = prometheus.NewCounter(prometheus.CounterOpts{
		Name: "downgradient_numeric_cells_solved_total",
		Help: "Finite-volume cells of the numeric method's grids, summed over the screenings that ran it.",
	})
	m.caveats = prometheus.NewCounterVec(prometheus.CounterOpts{
		Name: "downgradient_caveats_total",
		Help: "Caveats issued in screening results, by caveat code.",
	}, []string{"code"})
	m.reg.MustRegister(m.requests, m.duration, m.heavyActive, m.heavyWaiting, m.heavyReject, m.cells, m.caveats,
		collectors.NewGoCollector(), collectors.NewProcessCollector(collectors.ProcessCollectorOpts{}))
	return m
}

// knowRoutes records the route templates of e (call after the routes are added).
func (m *metrics) knowRoutes(e *echo.Echo) {
	for _, r := range e.Routes() {
		m.routes[r.Path] = true
	}
}

// handler serves the registry in the Prometheus text format.
func (m *metrics) handler() echo.HandlerFunc {
	return echo.WrapHandler(promhttp.HandlerFor(m.reg, promhttp.HandlerOpts{}))
}

// middleware counts and times every request. Errors are written here (with
// the echo error handler) so the status counted is the status sent.
func (m *metrics) middleware(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) error {
		start := time.Now()
		if err := next(c); err != nil {
			c.Error(err)
		}
		route := c.Path()
		if !m.routes[route] {
			route = "unmatched"
		}
		method := c.Request().Method
		switch method {
		case "GET", "HEAD", "POST", "PUT", "DELETE", "PATCH", "OPTIONS":
		default:
			method = "other"
		}
		status := strconv.Itoa(c.Response().Status)
		m.requests.WithLabelValues(method, route, status).Inc()
		m.duration.WithLabelValues(method, route, status).Observe(time.Since(start).Seconds())
		return nil
	}
}

// observeResult counts the numeric cells and the caveats of one screening.
func (m *metrics) observeResult(res *plume.Result) {
	if m == nil || res == nil {
		return
	}
	if res.Numeric != nil && res.Numeric.TotalCells > 0 {
		m.cells.Add(float64(res.Numeric.TotalCells))
	}
	for _, cv := range res.Caveats {
		m.caveats.WithLabelValues(cv.Code).Inc()
	}
}

// observeCaveats counts caveats issued (a streamed screening's, part by part).
func (m *metrics) observeCaveats(cs []plume.Caveat) {
	if m == nil {
		return
	}
	for _, cv := range cs {
		m.caveats.WithLabelValues(cv.Code).Inc()
	}
}
