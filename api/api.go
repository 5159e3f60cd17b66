// Package api is the HTTP layer of downgradient: echo routes and handlers,
// request validation against the OpenAPI document (package openapi) with
// kin-openapi, encoders for JSON, CSV and GeoJSON, and RFC 9457
// problem+json errors. It knows nothing of the methods: it decodes the
// requests into the domain's types (packages plume, plume/maps,
// plume/uncertainty, plume/fit), runs every engine call through one path
// (compute: the deadline, recovered panics, and one table from domain error
// kinds to problems) and encodes the results.
package api

import (
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
	"time"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/labstack/echo/v4"

	"downgradient/openapi"
	"downgradient/plume"
)

// Limits of a request (the array limits are also in openapi.yaml).
const (
	// DefaultMaxBodyBytes is the default limit of a request body, 1 MiB.
	DefaultMaxBodyBytes = 1 << 20
	// DefaultRequestTimeout is the default per-request computation deadline.
	DefaultRequestTimeout = 30 * time.Second
	// DefaultMaxStreamBodyBytes is the default limit of a streamed
	// screening's body, 512 MiB: 1,000,000 receptors (the streaming path's
	// limit) as GeoJSON features of up to about 500 bytes each, a GIS
	// export with a dozen attribute columns besides ours. The body is read
	// as it is screened and never held, so the limit bounds the transfer
	// (and the time a slot is held), not the memory.
	DefaultMaxStreamBodyBytes = 512 << 20
)

// Config configures the handler; the zero value is usable.
type Config struct {
	// Version reported in /healthz and in every result's engine.version.
	Version string
	// Largest request body accepted, bytes; 0 means DefaultMaxBodyBytes.
	MaxBodyBytes int64
	// Largest body of a streamed screening, bytes; 0 means
	// DefaultMaxStreamBodyBytes.
	MaxStreamBodyBytes int64
	// Largest number of closed-form evaluations per request; 0 means
	// plume.DefaultMaxEvaluations.
	MaxEvaluations int
	// Largest number of finite-volume cells of the numeric method; 0 means plume's default.
	CellBudget int
	// Per-request computation deadline; 0 means DefaultRequestTimeout.
	RequestTimeout time.Duration
	// Structured request log; nil means no request log.
	Logger *slog.Logger
	// Computing requests run at once; 0 means DefaultMaxHeavy().
	MaxHeavy int
	// Computing requests that may wait for a slot; 0 means DefaultMaxWaiting,
	// negative means none (refuse at once when every slot is busy).
	MaxWaiting int
	// Longest wait for a slot before 503; 0 means DefaultWaitTimeout.
	WaitTimeout time.Duration
	// Longest time a request body may take to arrive (408 beyond); 0 means
	// DefaultBodyTimeout.
	BodyTimeout time.Duration
	// Longest time a client may go without reading an answer being written
	// (the connection and the slot are dropped beyond); 0 means
	// DefaultWriteTimeout.
	WriteTimeout time.Duration
	// Largest answer of a computing route, bytes (413 beyond); 0 means
	// DefaultMaxOutputBytes.
	MaxOutputBytes int
	// Largest request line and headers, bytes (431 beyond); 0 means
	// DefaultMaxHeaderBytes. The http.Server's own MaxHeaderBytes must be
	// larger for the 431 to be problem+json.
	MaxHeaderBytes int
	// Clock gives the date and time a report says it was run; nil means time.Now.
	Clock func() time.Time
}

func (c Config) withDefaults() Config {
	if c.MaxBodyBytes <= 0 {
		c.MaxBodyBytes = DefaultMaxBodyBytes
	}
	if c.MaxStreamBodyBytes <= 0 {
		c.MaxStreamBodyBytes = DefaultMaxStreamBodyBytes
	}
	if c.MaxEvaluations <= 0 {
		c.MaxEvaluations = plume.DefaultMaxEvaluations
	}
	if c.RequestTimeout <= 0 {
		c.RequestTimeout = DefaultRequestTimeout
	}
	if c.Version == "" {
		c.Version = "dev"
	}
	c.MaxHeavy = Slots(c.MaxHeavy)
	if c.MaxWaiting == 0 {
		c.MaxWaiting = DefaultMaxWaiting
	}
	if c.WaitTimeout <= 0 {
		c.WaitTimeout = DefaultWaitTimeout
	}
	if c.BodyTimeout <= 0 {
		c.BodyTimeout = DefaultBodyTimeout
	}
	if c.WriteTimeout <= 0 {
		c.WriteTimeout = DefaultWriteTimeout
	}
	if c.MaxOutputBytes <= 0 {
		c.MaxOutputBytes = DefaultMaxOutputBytes
	}
	if c.MaxHeaderBytes <= 0 {
		c.MaxHeaderBytes = DefaultMaxHeaderBytes
	}
	if c.Clock == nil {
		c.Clock = time.Now
	}
	return c
}

type server struct {
	cfg     Config
	spec    *openapi.Spec
	routes  routeTable
	metrics *metrics
	limiter *limiter
	// head is the schema of a streamed scenario's members other than its
	// receptors (Scenario without receptors).
	head *openapi3.Schema
}

// New builds the handler serving every route of the OpenAPI document. It
// fails only when the embedded document does not load.
func New(cfg Config) (http.Handler, error) {
	return newEcho(cfg)
}

// newEcho builds the echo instance behind New (tests list its routes).
func newEcho(cfg Config) (*echo.Echo, error) {
	spec, err := openapi.Load()
	if err != nil {
		return nil, err
	}
	s := &server{cfg: cfg.withDefaults(), spec: spec, routes: newRouteTable(spec.Requests), metrics: newMetrics(), head: headSchema(spec.Requests)}
	s.limiter = newLimiter(s.cfg, s.metrics)

	e := echo.New()
	e.HideBanner = true
	e.HidePort = true
	e.HTTPErrorHandler = errorHandler
	// Outermost first: request ID, metrics (counts the status sent), panics,
	// the request log, the request's scope (header and body caps, its one
	// deadline, its slot freed after its answer), validation (reads the
	// body). Computing handlers take a slot in compute.
	e.Use(requestIDMiddleware, s.metrics.middleware)
	e.Use(recoverer)
	if s.cfg.Logger != nil {
		e.Use(requestLogger(s.cfg.Logger))
	}
	e.Use(s.scope)
	e.Use(s.validator)

	e.POST("/v1/screenings", s.screenings)
	e.POST("/v1/plume-maps", s.plumeMaps)
	e.POST("/v1/plots", s.plotsHandler)
	e.POST("/v1/reports", s.reports)
	e.POST("/v1/uncertainty", s.uncertainty)
	e.POST("/v1/attenuation", s.attenuation)
	e.POST("/v1/calibrations", s.calibrations)
	e.GET("/v1/concentration", s.concentration)
	e.GET("/v1/contaminants", s.contaminants)
	e.GET("/openapi.yaml", s.openapiYAML)
	e.GET("/openapi.json", s.openapiJSON)
	e.GET("/healthz", s.healthz)
	e.GET("/metrics", s.metrics.handler())
	s.metrics.knowRoutes(e)
	return e, nil
}

// recoverer turns a panic into a 500 problem (a bug: no input should cause one).
func recoverer(next echo.HandlerFunc) echo.HandlerFunc {
	return func(c echo.Context) (err error) {
		defer func() {
			if r := recover(); r != nil {
				if r == http.ErrAbortHandler {
					panic(r)
				}
				slog.Error("panic", "path", c.Request().URL.Path, "request_id", RequestID(c.Request().Context()), "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
				err = newProblem(kindInternal, "the server could not complete the request")
			}
		}()
		return next(c)
	}
}

// logLevel is the level of a request's log line: ERROR only for a 500 (a
// bug); WARN for a 503 (deadline, busy, shutting down: the operator may
// act); INFO otherwise, a client that went away (499) included.
func logLevel(status int) slog.Level {
	switch {
	case status == http.StatusServiceUnavailable:
		return slog.LevelWarn
	case status >= 500:
		return slog.LevelError
	}
	return slog.LevelInfo
}

// requestLogger writes one structured line per request.
func requestLogger(log *slog.Logger) echo.MiddlewareFunc {
	return func(next echo.HandlerFunc) echo.HandlerFunc {
		return func(c echo.Context) error {
			start := time.Now()
			err := next(c)
			if err != nil {
				c.Error(err)
			}
			req, res := c.Request(), c.Response()
			level := logLevel(res.Status)
			log.LogAttrs(req.Context(), level, "request",
				slog.String("method", req.Method),
				slog.String("path", req.URL.Path),
				slog.String("route", c.Path()),
				slog.Int("status", res.Status),
				slog.Int64("bytes", res.Size),
				slog.Float64("duration_ms", float64(time.Since(start).Microseconds())/1000),
				slog.String("remote", c.RealIP()),
				slog.String("request_id", RequestID(req.Context())),
			)
			return nil
		}
	}
}
