package api

import (
	"context"
	"io"
	"net"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/getkin/kin-openapi/openapi3"
	"github.com/getkin/kin-openapi/openapi3filter"
)

func init() {
	// Response validation reads the page, the pictures and streamed NDJSON as strings.
	asText := func(body io.Reader, _ http.Header, _ *openapi3.SchemaRef, _ openapi3filter.EncodingFn) (any, error) {
		b, err := io.ReadAll(body)
		return string(b), err
	}
	for _, mt := range []string{"text/html", mimeSVG, mimePNG, mimeNDJSON} {
		openapi3filter.RegisterBodyDecoder(mt, asText)
	}
}

// POST /v1/reports returns one self-contained HTML page: inline SVG and
// CSS, no scripts, no external requests, the inputs, results, caveats in
// full, the engine version and the input hash.
func TestReportSelfContained(t *testing.T) {
	ts := newTestServer(t, Config{Version: "1.2.3"})
	rec := ts.call(t, http.MethodPost, "/v1/reports", demoBody(t), nil)
	if rec.Code != 200 || !strings.HasPrefix(rec.Header().Get("Content-Type"), "text/html") {
		t.Fatalf("%d %s %.400s", rec.Code, rec.Header().Get("Content-Type"), rec.Body.String())
	}
	page := rec.Body.String()
	if n := strings.Count(page, "<svg"); n != 3+5 { // map, section, profile, one breakthrough per modelled receptor
		t.Errorf("%d inline SVG figures, want 8", n)
	}
	for _, bad := range []string{"<script", "<link", "<img", "<iframe", "@import", "url(", `src="`, `href="http`} {
		if strings.Contains(page, bad) {
			t.Errorf("page contains %q: not self-contained", bad)
		}
	}
	// Every caveat message appears in full, and the identity of the run.
	sc := demoBody(t)
	res := ts.call(t, http.MethodPost, "/v1/screenings", sc, nil).Body.String()
	for _, want := range []string{"1.2.3", "W-4 supply well", "@media print", "Hollin Lane depot", "screening_estimate_only",
		"This is a screening estimate computed from idealized models"} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	hash := regexp.MustCompile(`"input_sha256":"([0-9a-f]{64})"`).FindStringSubmatch(res)
	if hash == nil || !strings.Contains(page, hash[1]) {
		t.Errorf("page lacks the input hash")
	}
	// Bad input is problem+json like every endpoint.
	p := problemOf(t, ts.call(t, http.MethodPost, "/v1/reports", []byte(`{"aquifer": `), nil), 400)
	_ = p
	m := demoMap(t)
	set(m, "aquifer.effective_porosity", 0)
	p = problemOf(t, ts.call(t, http.MethodPost, "/v1/reports", mustJSON(t, m), nil), 422)
	if !hasField(p, "aquifer.effective_porosity") {
		t.Errorf("problem %+v", p.Errors)
	}
}

// chromiumPath finds Debian's chromium; in CI it must be there.
func chromiumPath(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if inCI() {
		t.Fatal("chromium is missing in CI: .ci/run installs the Debian packages chromium and chromium-driver")
	}
	t.Skip("chromium not installed: apt-get install -y chromium chromium-driver to run the browser check")
	return ""
}

// The report loaded in headless Chromium from a server on 127.0.0.1: no
// console errors or exceptions, no request leaves the page's own origin,
// every figure is laid out at a visible size, and a screenshot is taken.
func TestReportInChromium(t *testing.T) {
	if testing.Short() {
		t.Skip("browser check skipped in -short mode")
	}
	path := chromiumPath(t)
	ts := newTestServer(t, Config{Version: "browser"})
	rec := ts.call(t, http.MethodPost, "/v1/reports", demoBody(t), nil)
	if rec.Code != 200 {
		t.Fatalf("report: %d", rec.Code)
	}
	page := rec.Body.Bytes()
	var mu sync.Mutex
	var requests []string
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewUnstartedServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		mu.Lock()
		requests = append(requests, r.URL.Path)
		mu.Unlock()
		if r.URL.Path == "/favicon.ico" { // a browser asks for it by itself
			w.WriteHeader(http.StatusNoContent)
			return
		}
		if r.URL.Path != "/report.html" {
			http.NotFound(w, r)
			return
		}
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		_, _ = w.Write(page)
	}))
	srv.Listener = ln
	srv.Start()
	defer srv.Close()

	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(path), chromedp.NoSandbox, chromedp.DisableGPU, chromedp.Headless,
		chromedp.Flag("disable-quic", true), chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1200, 900))
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	defer cancelA()
	ctx, cancel := chromedp.NewContext(actx)
	defer cancel()
	ctx, cancelT := context.WithTimeout(ctx, 90*time.Second)
	defer cancelT()

	// Collect console messages (calls, exceptions, browser log) while the
	// page loads and is measured.
	var problems []string
	msgs := chromedp.Console(ctx)
	done := make(chan struct{})
	go func() {
		defer close(done)
		for m, err := range msgs {
			if err != nil {
				return
			}
			if m.Type == chromedp.ConsoleError || m.Type == chromedp.ConsoleWarning || m.IsException() {
				mu.Lock()
				problems = append(problems, m.String())
				mu.Unlock()
			}
		}
	}()
	if err := chromedp.Do(ctx, chromedp.Navigate(srv.URL+"/report.html"), chromedp.WaitReady("footer.colophon")); err != nil {
		t.Fatalf("chromium: %v", err)
	}
	title, err := chromedp.Run(ctx, chromedp.Title())
	if err != nil {
		t.Fatal(err)
	}
	visible, err := chromedp.Run(ctx, chromedp.Evaluate[int](`Array.from(document.querySelectorAll("figure.plot svg")).filter(s => {
		const r = s.getBoundingClientRect(); return r.width > 300 && r.height > 150 && s.querySelectorAll("path,text").length > 10;
	}).length`))
	if err != nil {
		t.Fatal(err)
	}
	shot, err := chromedp.Run(ctx, chromedp.FullScreenshot(80))
	if err != nil {
		t.Fatal(err)
	}
	time.Sleep(300 * time.Millisecond) // let late log entries arrive
	cancel()
	<-done
	if visible != 8 {
		t.Errorf("%d figures laid out visibly, want 8", visible)
	}
	if !strings.Contains(title, "screening memo") {
		t.Errorf("title %q", title)
	}
	if len(shot) < 50_000 {
		t.Errorf("screenshot of %d bytes", len(shot))
	}
	out := filepath.Join(t.TempDir(), "report.jpg")
	if err := os.WriteFile(out, shot, 0o644); err != nil {
		t.Fatal(err)
	}
	if dir := os.Getenv("REPORT_SCREENSHOT_DIR"); dir != "" {
		_ = os.WriteFile(filepath.Join(dir, "report-screenshot.jpg"), shot, 0o644)
	}
	mu.Lock()
	defer mu.Unlock()
	if len(problems) > 0 {
		t.Errorf("console problems: %v", problems)
	}
	for _, r := range requests {
		if r != "/report.html" && r != "/favicon.ico" {
			t.Errorf("the page requested %s", r)
		}
	}
}
