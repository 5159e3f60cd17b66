// Package browser renders a self-contained HTML page in headless Chromium
// (Debian's chromium, driven through github.com/chromedp/chromedp): printed
// to PDF in Chromium's own print layout, or photographed. The page is
// served once from 127.0.0.1; it must need nothing else.
package browser

import (
	"context"
	"errors"
	"net"
	"net/http"
	"os/exec"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"
)

// Paper is a sheet size, inches.
type Paper struct{ Width, Height float64 }

// A4 is ISO 216 A4, 210 x 297 mm.
var A4 = Paper{Width: 210 / 25.4, Height: 297 / 25.4}

// Find is the path of a Chromium on PATH ("" when none).
func Find() string {
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// Session is a headless Chromium showing one page.
type Session struct {
	ctx    context.Context
	cancel []context.CancelFunc
	srv    *http.Server
}

// Open starts Chromium (execPath; userDataDir a fresh directory), serves
// pageHTML from 127.0.0.1 and loads it, waiting until ready (the element
// matched by the CSS selector ready is present).
func Open(ctx context.Context, execPath, userDataDir string, pageHTML []byte, width, height int, ready string) (*Session, error) {
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		return nil, err
	}
	srv := &http.Server{Handler: http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.URL.Path != "/page.html" {
			http.NotFound(w, r)
			return
		}
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		_, _ = w.Write(pageHTML)
	})}
	go func() { _ = srv.Serve(ln) }()
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(execPath), chromedp.NoSandbox, chromedp.DisableGPU, chromedp.Headless,
		chromedp.Flag("disable-quic", true), chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true), chromedp.UserDataDir(userDataDir),
		chromedp.WindowSize(width, height))
	actx, cancelA := chromedp.NewExecAllocator(ctx, opts...)
	bctx, cancelB := chromedp.NewContext(actx)
	s := &Session{ctx: bctx, cancel: []context.CancelFunc{cancelB, cancelA}, srv: srv}
	if err := chromedp.Do(bctx, chromedp.Navigate("http://"+ln.Addr().String()+"/page.html"), chromedp.WaitReady(ready)); err != nil {
		s.Close()
		return nil, err
	}
	return s, nil
}

// Close stops the browser and the server.
func (s *Session) Close() {
	for _, c := range s.cancel {
		c()
	}
	_ = s.srv.Close()
}

// Context is the browser context, for further chromedp actions.
func (s *Session) Context() context.Context { return s.ctx }

// PrintPDF prints the page on paper with the page's own CSS margins
// (@page) and its backgrounds, as Chromium's print command does.
func (s *Session) PrintPDF(paper Paper) ([]byte, error) {
	return chromedp.Run(s.ctx, func(ctx context.Context, t *chromedp.Target) ([]byte, error) {
		yes := true
		r, err := cdp.Call(ctx, t, page.PrintToPDF, page.PrintToPDFParams{
			PrintBackground: &yes, PreferCSSPageSize: &yes,
			PaperWidth: paper.Width, PaperHeight: paper.Height,
		})
		if err != nil {
			return nil, err
		}
		if len(r.Data) == 0 {
			return nil, errors.New("browser: empty PDF")
		}
		return r.Data, nil
	})
}

// Screenshot photographs the viewport (full: the whole page) as PNG.
func (s *Session) Screenshot(full bool) ([]byte, error) {
	if full {
		return chromedp.Run(s.ctx, chromedp.FullScreenshot(100))
	}
	return chromedp.Run(s.ctx, chromedp.CaptureScreenshot())
}
