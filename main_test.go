package main

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"os"
	"strings"
	"syscall"
	"testing"
	"time"

	"downgradient/api"
)

// startSlowRequest opens a connection to addr and sends a screening whose
// body is only half sent: the request is in flight (being read) until
// finish is called, which sends the rest and returns the response status.
func startSlowRequest(t *testing.T, addr string) (finish func() (int, error)) {
	t.Helper()
	body, err := os.ReadFile("testdata/demo/scenario.json")
	if err != nil {
		t.Fatal(err)
	}
	conn, err := net.DialTimeout("tcp", addr, 2*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { conn.Close() })
	half := len(body) / 2
	fmt.Fprintf(conn, "POST /v1/screenings HTTP/1.1\r\nHost: %s\r\nContent-Type: application/json\r\nContent-Length: %d\r\n\r\n", addr, len(body))
	if _, err := conn.Write(body[:half]); err != nil {
		t.Fatal(err)
	}
	return func() (int, error) {
		if _, err := conn.Write(body[half:]); err != nil {
			return 0, err
		}
		_ = conn.SetReadDeadline(time.Now().Add(20 * time.Second))
		resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
		if err != nil {
			return 0, err
		}
		defer resp.Body.Close()
		_, _ = io.Copy(io.Discard, resp.Body)
		return resp.StatusCode, nil
	}
}

// waitRefused dials addr until the connection is refused (the listener is
// closed), for at most 5 s.
func waitRefused(t *testing.T, addr string) {
	t.Helper()
	deadline := time.Now().Add(5 * time.Second)
	for time.Now().Before(deadline) {
		c, err := net.DialTimeout("tcp", addr, 200*time.Millisecond)
		if err != nil {
			return
		}
		c.Close()
		time.Sleep(10 * time.Millisecond)
	}
	t.Fatal("new connections still accepted after the shutdown began")
}

// SIGTERM to the running binary's server (run): the request in flight
// completes with 200, new connections are refused meanwhile, and run
// returns nil.
func TestGracefulShutdownSIGTERM(t *testing.T) {
	addrc := make(chan net.Addr, 1)
	onListening = func(a net.Addr) { addrc <- a }
	defer func() { onListening = nil }()
	done := make(chan error, 1)
	go func() {
		done <- run([]string{"-addr", "127.0.0.1:0", "-log-json=false", "-shutdown-grace", "15s"})
	}()
	var addr string
	select {
	case a := <-addrc:
		addr = a.String()
	case err := <-done:
		t.Fatalf("run ended early: %v", err)
	case <-time.After(10 * time.Second):
		t.Fatal("server did not start")
	}

	finish := startSlowRequest(t, addr)
	time.Sleep(100 * time.Millisecond) // the server is reading the body
	if err := syscall.Kill(os.Getpid(), syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	waitRefused(t, addr)
	select {
	case err := <-done:
		t.Fatalf("run returned (%v) while a request was in flight", err)
	default:
	}
	status, err := finish()
	if err != nil || status != http.StatusOK {
		t.Fatalf("in-flight request: status %d, err %v", status, err)
	}
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("run: %v", err)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("run did not return after the last request")
	}
}

// A request still running when the grace period ends is cut off and serve
// says so.
func TestShutdownGraceExpires(t *testing.T) {
	e, err := api.New(api.Config{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	log := slog.New(slog.NewTextHandler(io.Discard, nil))
	srv := newServer(e, time.Second, log.Handler())
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- serve(ctx, srv, ln, 200*time.Millisecond, log) }()

	startSlowRequest(t, ln.Addr().String()) // never finished
	time.Sleep(100 * time.Millisecond)
	cancel()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "grace period") {
			t.Fatalf("serve: %v, want the grace period error", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("serve did not return after the grace period")
	}
}

// The engine version identifies the commit even when the Go build holds no
// VCS information (go run with -buildvcs=false): gitHead reads the
// checkout's HEAD, a loose ref or a packed ref.
func TestGitHead(t *testing.T) {
	const sha = "0123456789abcdef0123456789abcdef01234567"
	for _, tc := range []struct {
		name  string
		files map[string]string
		want  string
	}{
		{"detached", map[string]string{"HEAD": sha + "\n"}, sha[:12]},
		{"loose ref", map[string]string{"HEAD": "ref: refs/heads/main\n", "refs/heads/main": sha + "\n"}, sha[:12]},
		{"packed ref", map[string]string{"HEAD": "ref: refs/heads/main\n", "packed-refs": "# pack-refs\n" + sha + " refs/heads/main\n"}, sha[:12]},
		{"not a sha", map[string]string{"HEAD": "garbage\n"}, ""},
		{"no checkout", nil, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			for name, body := range tc.files {
				p := dir + "/.git/" + name
				if err := os.MkdirAll(p[:strings.LastIndex(p, "/")], 0o755); err != nil {
					t.Fatal(err)
				}
				if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			if got := gitHead(dir); got != tc.want {
				t.Errorf("gitHead = %q, want %q", got, tc.want)
			}
		})
	}
	if v := engineVersion(); v == "dev" {
		t.Errorf("engine version %q does not identify the build", v)
	}
}
