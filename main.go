// Command downgradient serves the groundwater plume screening API.
//
//	go run .                 # serves on :8080
//	go run . -addr :9000     # or ADDR=:9000 go run .
//
// The service is stateless: run as many identical replicas as needed behind
// any load balancer. It stops gracefully on SIGTERM or SIGINT, finishing the
// requests in flight.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"os"
	"os/signal"
	"runtime/debug"
	"syscall"
	"time"

	"downgradient/api"
)

// version is the engine version reported in /healthz and engine.version; set
// it at build time with -ldflags "-X main.version=1.2.3". Without that, the
// module version or VCS revision of the build is used.
var version = ""

func engineVersion() string {
	if version != "" {
		return version
	}
	if bi, ok := debug.ReadBuildInfo(); ok {
		if v := bi.Main.Version; v != "" && v != "(devel)" {
			return v
		}
		for _, s := range bi.Settings {
			if s.Key == "vcs.revision" && len(s.Value) >= 12 {
				return "dev+" + s.Value[:12]
			}
		}
	}
	return "dev"
}

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "downgradient:", err)
		os.Exit(1)
	}
}

func envOr(key, def string) string {
	if v := os.Getenv(key); v != "" {
		return v
	}
	return def
}

func run(args []string) error {
	fs := flag.NewFlagSet("downgradient", flag.ContinueOnError)
	addr := fs.String("addr", envOr("ADDR", ":8080"), "listen address (env ADDR)")
	maxBody := fs.Int64("max-body", api.DefaultMaxBodyBytes, "largest request body, bytes")
	timeout := fs.Duration("request-timeout", api.DefaultRequestTimeout, "per-request computation deadline")
	logJSON := fs.Bool("log-json", true, "write logs as JSON (false: text)")
	healthcheck := fs.Bool("healthcheck", false, "check GET /healthz of a server on -addr and exit 0 if healthy (for container health checks)")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *healthcheck {
		return checkHealth(*addr)
	}

	var handler slog.Handler = slog.NewJSONHandler(os.Stderr, nil)
	if !*logJSON {
		handler = slog.NewTextHandler(os.Stderr, nil)
	}
	log := slog.New(handler)
	slog.SetDefault(log)

	e, err := api.New(api.Config{
		Version:        engineVersion(),
		MaxBodyBytes:   *maxBody,
		RequestTimeout: *timeout,
		Logger:         log,
	})
	if err != nil {
		return err
	}
	srv := &http.Server{
		Addr:              *addr,
		Handler:           e,
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       30 * time.Second,
		// Long enough for the computation deadline plus writing the answer.
		WriteTimeout:   *timeout + 30*time.Second,
		IdleTimeout:    120 * time.Second,
		MaxHeaderBytes: 64 << 10,
		ErrorLog:       slog.NewLogLogger(handler, slog.LevelWarn),
	}

	ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGTERM, os.Interrupt)
	defer stop()
	errc := make(chan error, 1)
	go func() {
		log.Info("listening", "addr", *addr, "version", engineVersion())
		errc <- srv.ListenAndServe()
	}()
	select {
	case err := <-errc:
		if !errors.Is(err, http.ErrServerClosed) {
			return err
		}
		return nil
	case <-ctx.Done():
	}
	log.Info("shutting down")
	shutCtx, cancel := context.WithTimeout(context.Background(), *timeout+5*time.Second)
	defer cancel()
	if err := srv.Shutdown(shutCtx); err != nil {
		return fmt.Errorf("shutdown: %w", err)
	}
	log.Info("stopped")
	return nil
}

// checkHealth asks a running server for GET /healthz: the container image
// has no shell or curl, so the binary checks itself.
func checkHealth(addr string) error {
	host, port, err := net.SplitHostPort(addr)
	if err != nil {
		return fmt.Errorf("healthcheck: bad -addr %q: %w", addr, err)
	}
	if host == "" || host == "0.0.0.0" || host == "::" {
		host = "127.0.0.1"
	}
	client := &http.Client{Timeout: 3 * time.Second}
	resp, err := client.Get("http://" + net.JoinHostPort(host, port) + "/healthz")
	if err != nil {
		return fmt.Errorf("healthcheck: %w", err)
	}
	defer resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		return fmt.Errorf("healthcheck: status %d", resp.StatusCode)
	}
	return nil
}
