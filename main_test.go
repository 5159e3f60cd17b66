package main

import (
	"bufio"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"os"
	"path/filepath"
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

// slowScreening is a screening that computes for many seconds: the demo
// with the numeric cross-check over 30 years (about 6 s here, against the
// 2.5 s the test needs; the finite volumes check the deadline as they
// march, so a cancelled request stops at once), with an answer well within
// the output budget. (The closed forms alone no longer take long enough
// with any workload under the receptor limit.)
func slowScreening(t *testing.T) []byte {
	t.Helper()
	b, err := os.ReadFile("testdata/demo/scenario.json")
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	m["times"], m["methods"] = []any{365, 1825, 3650, 7300, 10950}, []any{"exact", "numeric"}
	out, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// sendRequest writes a whole POST of body to addr and returns a function
// that reads the response (status, Retry-After, body).
func sendRequest(t *testing.T, addr, target string, body []byte) func() (*http.Response, []byte, error) {
	t.Helper()
	conn, err := net.DialTimeout("tcp", addr, 2*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { conn.Close() })
	fmt.Fprintf(conn, "POST %s HTTP/1.1\r\nHost: %s\r\nContent-Type: application/json\r\nContent-Length: %d\r\n\r\n", target, addr, len(body))
	if _, err := conn.Write(body); err != nil {
		t.Fatal(err)
	}
	return func() (*http.Response, []byte, error) {
		_ = conn.SetReadDeadline(time.Now().Add(30 * time.Second))
		resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
		if err != nil {
			return nil, nil, err
		}
		defer resp.Body.Close()
		b, err := io.ReadAll(resp.Body)
		return resp, b, err
	}
}

// Issue 12, item 3: SIGTERM while a computation runs longer than the grace
// period: the computation is cancelled and answered 503 shutting-down with
// Retry-After within the grace period, and run returns nil (exit 0).
// Before, the connection was closed with no response at the end of the
// grace period and run returned an error (exit 1).
func TestShutdownAnswersComputationInFlight(t *testing.T) {
	addrc := make(chan net.Addr, 1)
	onListening = func(a net.Addr) { addrc <- a }
	defer func() { onListening = nil }()
	done := make(chan error, 1)
	const grace = 2 * time.Second
	go func() {
		done <- run([]string{"-addr", "127.0.0.1:0", "-log-json=false", "-shutdown-grace", grace.String()})
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
	read := sendRequest(t, addr, "/v1/screenings", slowScreening(t))
	time.Sleep(500 * time.Millisecond) // computing
	start := time.Now()
	if err := syscall.Kill(os.Getpid(), syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	resp, body, err := read()
	took := time.Since(start)
	if err != nil {
		t.Fatalf("no answer to the request in flight: %v", err)
	}
	if resp.StatusCode != http.StatusServiceUnavailable || resp.Header.Get("Retry-After") == "" ||
		!strings.Contains(string(body), "/problems/shutting-down") {
		t.Fatalf("status %d, Retry-After %q: %.300s", resp.StatusCode, resp.Header.Get("Retry-After"), body)
	}
	if took > grace+time.Second {
		t.Errorf("answered %v after SIGTERM with a grace period of %v", took, grace)
	}
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("run: %v", err)
		}
	case <-time.After(grace + 5*time.Second):
		t.Fatal("run did not return")
	}
}

// A request whose body never finishes is answered 503 when the grace
// period is about to end, and serve returns nil. Before, its connection
// was cut at the end of the grace period and serve reported an error.
func TestShutdownAnswersStalledBody(t *testing.T) {
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
	go func() { done <- serve(ctx, srv, ln, 400*time.Millisecond, log) }()

	addr := ln.Addr().String()
	conn, err := net.DialTimeout("tcp", addr, 2*time.Second)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	fmt.Fprintf(conn, "POST /v1/screenings HTTP/1.1\r\nHost: %s\r\nContent-Type: application/json\r\nContent-Length: 5000\r\n\r\n{\"aquifer\": ", addr)
	time.Sleep(100 * time.Millisecond) // its body never ends
	cancel()
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("serve: %v", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("serve did not return after the grace period")
	}
	_ = conn.SetReadDeadline(time.Now().Add(5 * time.Second))
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	if err != nil {
		t.Fatalf("no answer to the stalled request: %v", err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusServiceUnavailable || resp.Header.Get("Retry-After") == "" {
		t.Errorf("stalled request: status %d, Retry-After %q", resp.StatusCode, resp.Header.Get("Retry-After"))
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
	// A linked worktree: .git is a file naming the worktree's git
	// directory, whose HEAD names a ref of the common directory.
	repo, wt := t.TempDir(), t.TempDir()
	for name, body := range map[string]string{"worktrees/wt/HEAD": "ref: refs/heads/wt\n", "worktrees/wt/commondir": "../..\n",
		"refs/heads/wt": sha + "\n"} {
		p := filepath.Join(repo, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(wt, ".git"), []byte("gitdir: "+filepath.Join(repo, "worktrees", "wt")+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if got := gitHead(wt); got != sha[:12] {
		t.Errorf("linked worktree: gitHead = %q, want %q", got, sha[:12])
	}
	if v := engineVersion(); v == "dev" {
		t.Errorf("engine version %q does not identify the build", v)
	}
}
