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
	"sync"
	"syscall"
	"time"

	"downgradient/api"
	"downgradient/internal/runtimetune"
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
// "" when there is none. In a linked worktree .git is a file naming the
// worktree's git directory, whose HEAD names a ref of the common one.
func gitHead(dir string) string {
	gitDir := filepath.Join(dir, ".git")
	dirs := []string{gitDir}
	if b, err := os.ReadFile(gitDir); err == nil { // a file: "gitdir: <path>"
		wt, ok := strings.CutPrefix(strings.TrimSpace(string(b)), "gitdir: ")
		if !ok {
			return ""
		}
		if !filepath.IsAbs(wt) {
			wt = filepath.Join(dir, wt)
		}
		dirs = []string{wt}
		if c, err := os.ReadFile(filepath.Join(wt, "commondir")); err == nil {
			common := strings.TrimSpace(string(c))
			if !filepath.IsAbs(common) {
				common = filepath.Join(wt, common)
			}
			dirs = append(dirs, common)
		}
	}
	head, err := os.ReadFile(filepath.Join(dirs[0], "HEAD"))
	if err != nil {
		return ""
	}
	h := strings.TrimSpace(string(head))
	if ref, ok := strings.CutPrefix(h, "ref: "); ok {
		h = resolveRef(dirs, ref)
	}
	if len(h) < 12 || strings.Trim(h, "0123456789abcdef") != "" {
		return ""
	}
	return h[:12]
}

// resolveRef finds ref, loose or packed, in the first of dirs that has it.
func resolveRef(dirs []string, ref string) string {
	for _, d := range dirs {
		if b, err := os.ReadFile(filepath.Join(d, filepath.FromSlash(ref))); err == nil {
			return strings.TrimSpace(string(b))
		}
		if packed, err := os.ReadFile(filepath.Join(d, "packed-refs")); err == nil {
			for _, line := range strings.Split(string(packed), "\n") {
				if sha, name, ok := strings.Cut(line, " "); ok && name == ref {
					return sha
				}
			}
		}
	}
	return ""
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
	maxStreamBody := fs.Int64("max-stream-body", api.DefaultMaxStreamBodyBytes, "largest body of a streamed screening, bytes")
	timeout := fs.Duration("request-timeout", api.DefaultRequestTimeout, "per-request computation deadline")
	grace := fs.Duration("shutdown-grace", api.DefaultRequestTimeout+5*time.Second, "on SIGTERM, how long requests in flight may take to finish (those still running are answered 503 just before it ends)")
	maxHeavy := fs.Int("max-heavy", api.DefaultMaxHeavy(), "computing requests run at once")
	maxWaiting := fs.Int("max-waiting", api.DefaultMaxWaiting, "computing requests that may wait for a slot (beyond: 503); negative: none")
	bodyTimeout := fs.Duration("body-timeout", api.DefaultBodyTimeout, "longest time a request body may take to arrive (beyond: 408)")
	writeTimeout := fs.Duration("write-timeout", api.DefaultWriteTimeout, "longest time a client may go without reading an answer (beyond: the connection is dropped)")
	maxOutput := fs.Int("max-output", api.DefaultMaxOutputBytes, "largest answer of a computing route, bytes (beyond: 413)")
	logJSON := fs.Bool("log-json", true, "write logs as JSON (false: text)")
	spareProcs := fs.Int("spare-procs", runtimetune.DefaultSpareProcs, "Go processors beyond -max-heavy (GOMAXPROCS = max(cores, max-heavy + this)): one stays free to read new requests while every slot computes, so they queue in arrival order; 0: GOMAXPROCS as the runtime sets it; ignored when GOMAXPROCS is set")
	gcPercent := fs.Int("gc-percent", runtimetune.DefaultGCPercent, "garbage collector target, percent of the live heap (as GOGC); 0: the runtime's; ignored when GOGC is set")
	memLimit := fs.Int("memory-limit-mib", runtimetune.DefaultMemoryLimitMiB, "soft memory limit of the Go runtime, MiB (as GOMEMLIMIT; keep it under the container's limit): the collector works harder near it; 0: none; ignored when GOMEMLIMIT is set")
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
	*maxHeavy = api.Slots(*maxHeavy)
	tuned := runtimetune.Apply(runtimetune.Settings{Slots: *maxHeavy, SpareProcs: *spareProcs, GCPercent: *gcPercent, MemoryLimitMiB: *memLimit})
	log.Info("runtime", "gomaxprocs", tuned.Procs, "computation_slots", *maxHeavy, "gc_percent", tuned.GCPercent,
		"memory_limit_mib", tuned.MemoryLimitMiB, "left_to_environment", tuned.FromEnv)

	e, err := api.New(api.Config{
		Version:            engineVersion(),
		MaxBodyBytes:       *maxBody,
		MaxStreamBodyBytes: *maxStreamBody,
		RequestTimeout:     *timeout,
		Logger:             log,
		MaxHeavy:           *maxHeavy,
		MaxWaiting:         *maxWaiting,
		BodyTimeout:        *bodyTimeout,
		WriteTimeout:       *writeTimeout,
		MaxOutputBytes:     *maxOutput,
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

// Connection limits of the server around the handler. The handler keeps
// its own, tighter, limits (body timeout, write timeout, 64 KiB of
// headers answered 431 problem+json); these are backstops.
const (
	// readHeaderTimeout bounds the request line and headers.
	readHeaderTimeout = 5 * time.Second
	// maxHeaderBytes is where net/http itself answers 431 (plain text).
	maxHeaderBytes = 1 << 20
)

// newServer wraps h with the connection timeouts; timeout is the
// per-request deadline. ReadTimeout covers a body no handler reads (the
// handler lifts it once it has read a body, or at once for a request
// without one, so that it cannot end a long computation); WriteTimeout
// covers an answer the handler does not write itself.
func newServer(h http.Handler, timeout time.Duration, logHandler slog.Handler) *http.Server {
	return &http.Server{
		Handler:           h,
		ReadHeaderTimeout: readHeaderTimeout,
		ReadTimeout:       readHeaderTimeout + api.DefaultBodyTimeout,
		WriteTimeout:      timeout + 30*time.Second,
		IdleTimeout:       120 * time.Second,
		MaxHeaderBytes:    maxHeaderBytes,
		ErrorLog:          slog.NewLogLogger(logHandler, slog.LevelWarn),
	}
}

// serve answers on ln until ctx ends (SIGTERM or SIGINT in run), then shuts
// down gracefully: the listener closes at once (new connections are
// refused) and idle connections are closed; requests in flight may finish
// until shortly before the grace period ends (answerMargin), when their
// contexts are cancelled with api.ErrShuttingDown so that they answer 503
// with Retry-After (a body still arriving included) rather than losing
// their connection. serve returns nil once every connection is done, or an
// error if one is still busy at the end of the grace period (an answer
// that a client is reading too slowly).
func serve(ctx context.Context, srv *http.Server, ln net.Listener, grace time.Duration, log *slog.Logger) error {
	base, cancelBase := context.WithCancelCause(context.Background())
	defer cancelBase(nil)
	srv.BaseContext = func(net.Listener) context.Context { return base }
	conns := trackConns(srv)
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
	cut := time.AfterFunc(grace-answerMargin(grace), func() {
		log.Warn("cancelling the requests still running: they answer 503")
		cancelBase(api.ErrShuttingDown)
	})
	defer cut.Stop()
	shutCtx, cancel := context.WithTimeout(context.Background(), grace)
	defer cancel()
	shut := make(chan error, 1)
	go func() { shut <- srv.Shutdown(shutCtx) }()
	// Shutdown polls its connections ever less often (up to every 0.5 s);
	// the last connection closing ends the wait at once.
	select {
	case err := <-shut:
		if err != nil {
			_ = srv.Close()
			return fmt.Errorf("shutdown: connections still busy after the grace period of %s: %w", grace, err)
		}
	case <-conns.allClosed():
	}
	log.Info("stopped")
	return nil
}

// connTracker counts a server's open connections.
type connTracker struct {
	mu   sync.Mutex
	open map[net.Conn]bool
	zero chan struct{} // closed when the count falls to zero after allClosed was asked
}

// trackConns counts srv's connections from now on.
func trackConns(srv *http.Server) *connTracker {
	ct := &connTracker{open: map[net.Conn]bool{}}
	prev := srv.ConnState
	srv.ConnState = func(c net.Conn, st http.ConnState) {
		ct.mu.Lock()
		switch st {
		case http.StateNew:
			ct.open[c] = true
		case http.StateClosed, http.StateHijacked:
			delete(ct.open, c)
			if len(ct.open) == 0 && ct.zero != nil {
				close(ct.zero)
				ct.zero = nil
			}
		}
		ct.mu.Unlock()
		if prev != nil {
			prev(c, st)
		}
	}
	return ct
}

// allClosed is closed once no connection is open (at once if none is).
func (ct *connTracker) allClosed() <-chan struct{} {
	ct.mu.Lock()
	defer ct.mu.Unlock()
	ch := make(chan struct{})
	if len(ct.open) == 0 {
		close(ch)
		return ch
	}
	ct.zero = ch
	return ch
}

// answerMargin is how long before the end of the grace period the requests
// still running are cancelled: time to write their 503.
func answerMargin(grace time.Duration) time.Duration {
	return min(grace/4, 2*time.Second)
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
