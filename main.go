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
	"path/filepath"
	"runtime/debug"
	"strings"
	"syscall"
	"time"

	"downgradient/api"
)

// version is the engine version reported in /healthz and engine.version; set
// it at build time with -ldflags "-X main.version=1.2.3". Without that, the
// module version or VCS revision the Go build information holds is used,
// and failing that (go run with -buildvcs=false) the commit the working
// directory's git checkout is at, so that every answer can be traced to a
// commit.
var version = ""

func engineVersion() string {
	if version != "" {
		return version
	}
	if bi, ok := debug.ReadBuildInfo(); ok {
		if v := bi.Main.Version; v != "" && v != "(devel)" {
			return v
		}
		rev, dirty := "", ""
		for _, s := range bi.Settings {
			switch {
			case s.Key == "vcs.revision" && len(s.Value) >= 12:
				rev = s.Value[:12]
			case s.Key == "vcs.modified" && s.Value == "true":
				dirty = "+dirty"
			}
		}
		if rev != "" {
			return "dev+" + rev + dirty
		}
	}
	if rev := gitHead("."); rev != "" {
		return "dev+" + rev + "(checkout)"
	}
	return "dev"
}

// gitHead returns the first 12 hex digits of the commit the git checkout in
// dir is at, reading .git/HEAD and the ref it names (loose or packed);
// "" when there is none.
func gitHead(dir string) string {
	gitDir := filepath.Join(dir, ".git")
	head, err := os.ReadFile(filepath.Join(gitDir, "HEAD"))
	if err != nil {
		return ""
	}
	h := strings.TrimSpace(string(head))
	if ref, ok := strings.CutPrefix(h, "ref: "); ok {
		h = ""
		if b, err := os.ReadFile(filepath.Join(gitDir, filepath.FromSlash(ref))); err == nil {
			h = strings.TrimSpace(string(b))
		} else if packed, err := os.ReadFile(filepath.Join(gitDir, "packed-refs")); err == nil {
			for _, line := range strings.Split(string(packed), "\n") {
				if sha, name, ok := strings.Cut(line, " "); ok && name == ref {
					h = sha
				}
			}
		}
	}
	if len(h) < 12 || strings.Trim(h, "0123456789abcdef") != "" {
		return ""
	}
	return h[:12]
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
	grace := fs.Duration("shutdown-grace", api.DefaultRequestTimeout+5*time.Second, "on SIGTERM, how long requests in flight may take to finish")
	maxHeavy := fs.Int("max-heavy", api.DefaultMaxHeavy(), "computing requests run at once")
	maxWaiting := fs.Int("max-waiting", api.DefaultMaxWaiting, "computing requests that may wait for a slot (beyond: 503); negative: none")
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
		MaxHeavy:       *maxHeavy,
		MaxWaiting:     *maxWaiting,
	})
	if err != nil {
		return err
	}
	srv := newServer(e, *timeout, handler)

	// The signal handler is in place before the port opens.
	ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGTERM, os.Interrupt)
	defer stop()
	ln, err := net.Listen("tcp", *addr)
	if err != nil {
		return err
	}
	log.Info("listening", "addr", ln.Addr().String(), "version", engineVersion())
	if onListening != nil {
		onListening(ln.Addr())
	}
	return serve(ctx, srv, ln, *grace, log)
}

// onListening, when set (tests), is told the address once the port is open.
var onListening func(net.Addr)

// newServer wraps h with the connection timeouts; timeout is the
// per-request computation deadline.
func newServer(h http.Handler, timeout time.Duration, logHandler slog.Handler) *http.Server {
	return &http.Server{
		Handler:           h,
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       30 * time.Second,
		// Long enough for the computation deadline plus writing the answer.
		WriteTimeout:   timeout + 30*time.Second,
		IdleTimeout:    120 * time.Second,
		MaxHeaderBytes: 64 << 10,
		ErrorLog:       slog.NewLogLogger(logHandler, slog.LevelWarn),
	}
}

// serve answers on ln until ctx ends (SIGTERM or SIGINT in run), then shuts
// down gracefully: the listener closes at once (new connections are
// refused), idle connections are closed, and requests in flight have up to
// grace to finish; after that the remaining connections are closed and
// serve reports the error.
func serve(ctx context.Context, srv *http.Server, ln net.Listener, grace time.Duration, log *slog.Logger) error {
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case err := <-errc:
		if !errors.Is(err, http.ErrServerClosed) {
			return err
		}
		return nil
	case <-ctx.Done():
	}
	log.Info("shutting down", "grace", grace.String())
	shutCtx, cancel := context.WithTimeout(context.Background(), grace)
	defer cancel()
	if err := srv.Shutdown(shutCtx); err != nil {
		_ = srv.Close()
		return fmt.Errorf("shutdown: requests still running after the grace period of %s: %w", grace, err)
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
