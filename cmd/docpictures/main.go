// Command docpictures regenerates the pictures and the demo memo under
// docs/ from the service itself: it sends the invented demo scenario
// (testdata/demo/scenario.json) to POST /v1/plots of an in-process server
// for each kind of picture, and to POST /v1/reports with the invented memo
// header and sources of testdata/demo/memo.json and the uncertain inputs of
// testdata/demo/uncertain.json (the /v1/uncertainty envelope), and writes
// what comes back; then it prints the memo to PDF and photographs its
// first screen in headless Chromium (Debian's chromium). Run from the
// repository root:
//
//	go run ./cmd/docpictures
package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"time"

	"downgradient/api"
	"downgradient/internal/browser"
)

func main() {
	if err := run("testdata/demo", "docs"); err != nil {
		fmt.Fprintln(os.Stderr, "docpictures:", err)
		os.Exit(1)
	}
}

func run(demoDir, dir string) error {
	body, err := os.ReadFile(filepath.Join(demoDir, "scenario.json"))
	if err != nil {
		return err
	}
	h, err := api.New(api.Config{Version: "docs"})
	if err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for _, kind := range []string{"map", "section", "profile", "breakthrough"} {
		for _, format := range []string{"png", "svg"} {
			target := fmt.Sprintf("/v1/plots?kind=%s&format=%s", kind, format)
			if kind == "breakthrough" {
				target += "&receptor=W-4%20supply%20well"
			}
			if err := post(h, target, body, filepath.Join(dir, fmt.Sprintf("demo-%s.%s", kind, format))); err != nil {
				return err
			}
		}
	}
	env, err := reportEnvelope(demoDir, body)
	if err != nil {
		return err
	}
	page := filepath.Join(dir, "demo-report.html")
	if err := post(h, "/v1/reports", env, page); err != nil {
		return err
	}
	return printReport(page, filepath.Join(dir, "demo-report.pdf"), filepath.Join(dir, "demo-report.png"))
}

// post sends body to target and writes the answer to path.
func post(h http.Handler, target string, body []byte, path string) error {
	req := httptest.NewRequest(http.MethodPost, target, bytes.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	if rec.Code != http.StatusOK {
		return fmt.Errorf("%s: %d %s", target, rec.Code, rec.Body.String())
	}
	fmt.Println("wrote", path, rec.Body.Len(), "bytes")
	return os.WriteFile(path, rec.Body.Bytes(), 0o644)
}

// reportEnvelope is the /v1/uncertainty envelope of the demo memo: the
// scenario with the memo header and sources merged in and the uncertain
// inputs replaced by their distributions, the realizations and the seed.
func reportEnvelope(demoDir string, scenario []byte) ([]byte, error) {
	var sc, memo map[string]any
	var unc struct {
		Realizations  int            `json:"realizations"`
		Seed          int            `json:"seed"`
		Distributions map[string]any `json:"distributions"`
	}
	if err := json.Unmarshal(scenario, &sc); err != nil {
		return nil, err
	}
	for name, v := range map[string]any{"memo.json": &memo, "uncertain.json": &unc} {
		b, err := os.ReadFile(filepath.Join(demoDir, name))
		if err != nil {
			return nil, err
		}
		if err := json.Unmarshal(b, v); err != nil {
			return nil, fmt.Errorf("%s: %v", name, err)
		}
	}
	for k, v := range memo {
		sc[k] = v
	}
	for path, d := range unc.Distributions {
		if err := setPath(sc, path, d); err != nil {
			return nil, err
		}
	}
	return json.Marshal(map[string]any{"scenario": sc, "realizations": unc.Realizations, "seed": unc.Seed})
}

// setPath sets the member at a dotted path of objects.
func setPath(m map[string]any, path string, v any) error {
	segs := strings.Split(path, ".")
	for _, s := range segs[:len(segs)-1] {
		next, ok := m[s].(map[string]any)
		if !ok {
			return fmt.Errorf("uncertain.json: no object %q on the path %s", s, path)
		}
		m = next
	}
	m[segs[len(segs)-1]] = v
	return nil
}

// printReport prints the memo at page to pdfPath on A4 and photographs the
// first screen of it (1100 x 1400 pixels) to pngPath.
func printReport(page, pdfPath, pngPath string) error {
	exe := browser.Find()
	if exe == "" {
		return fmt.Errorf("no chromium on PATH: apt-get install -y chromium")
	}
	html, err := os.ReadFile(page)
	if err != nil {
		return err
	}
	tmp, err := os.MkdirTemp("", "docpictures")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	s, err := browser.Open(ctx, exe, tmp, html, 1100, 1400, "footer.colophon")
	if err != nil {
		return err
	}
	defer s.Close()
	pdf, err := s.PrintPDF(browser.A4)
	if err != nil {
		return err
	}
	shot, err := s.Screenshot(false)
	if err != nil {
		return err
	}
	for path, b := range map[string][]byte{pdfPath: pdf, pngPath: shot} {
		fmt.Println("wrote", path, len(b), "bytes")
		if err := os.WriteFile(path, b, 0o644); err != nil {
			return err
		}
	}
	return nil
}
