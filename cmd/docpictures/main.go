// Command docpictures regenerates the pictures under docs/ from the
// service itself: it sends the invented demo scenario
// (testdata/demo/scenario.json) to POST /v1/plots and POST /v1/reports of an
// in-process server and writes what comes back. Run from the repository root:
//
//	go run ./cmd/docpictures
package main

import (
	"bytes"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"

	"downgradient/api"
)

func main() {
	if err := run("testdata/demo/scenario.json", "docs"); err != nil {
		fmt.Fprintln(os.Stderr, "docpictures:", err)
		os.Exit(1)
	}
}

func run(scenarioPath, dir string) error {
	body, err := os.ReadFile(scenarioPath)
	if err != nil {
		return err
	}
	e, err := api.New(api.Config{Version: "docs"})
	if err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	post := func(target, file string) error {
		req := httptest.NewRequest(http.MethodPost, target, bytes.NewReader(body))
		req.Header.Set("Content-Type", "application/json")
		rec := httptest.NewRecorder()
		e.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			return fmt.Errorf("%s: %d %s", target, rec.Code, rec.Body.String())
		}
		path := filepath.Join(dir, file)
		fmt.Println("wrote", path, rec.Body.Len(), "bytes")
		return os.WriteFile(path, rec.Body.Bytes(), 0o644)
	}
	for _, kind := range []string{"map", "profile", "breakthrough"} {
		for _, format := range []string{"png", "svg"} {
			target := fmt.Sprintf("/v1/plots?kind=%s&format=%s", kind, format)
			if kind == "breakthrough" {
				target += "&receptor=W-4%20supply%20well"
			}
			if err := post(target, fmt.Sprintf("demo-%s.%s", kind, format)); err != nil {
				return err
			}
		}
	}
	return post("/v1/reports", "demo-report.html")
}
