package api

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"downgradient/internal/browser"
	"downgradient/internal/gistest"
	"downgradient/plume"
)

// inCI reports whether the tests run in CI (.ci/run sets
// DOWNGRADIENT_CI=1; many CI services set CI=true), where the external
// programs of the browser and print checks must be installed.
func inCI() bool { return os.Getenv(gistest.CIEnv) == "1" || os.Getenv("CI") == "true" }

// pdftotextPath finds poppler's pdftotext; in CI it must be there.
func pdftotextPath(t *testing.T) string {
	t.Helper()
	if p, err := exec.LookPath("pdftotext"); err == nil {
		return p
	}
	if inCI() {
		t.Fatal("pdftotext is missing in CI: .ci/run installs the Debian package poppler-utils")
	}
	t.Skip("pdftotext not installed: apt-get install -y poppler-utils to run the print check")
	return ""
}

// printed is a report printed by Chromium: the PDF, its text by page
// (pdftotext -layout) and the cells of every data-table body row as laid
// out in the page.
type printed struct {
	pdf   []byte
	pages []string
	rows  [][]string
}

// printReport prints a page on A4 with Chromium's print-to-PDF and reads
// it back with pdftotext.
func printReport(t *testing.T, page []byte) printed {
	t.Helper()
	exe := chromiumPath(t)
	pdftotext := pdftotextPath(t)
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	s, err := browser.Open(ctx, exe, t.TempDir(), page, 1200, 900, "footer.colophon")
	if err != nil {
		t.Fatalf("chromium: %v", err)
	}
	defer s.Close()
	var out printed
	out.rows, err = chromedp.Run(s.Context(), chromedp.Evaluate[[][]string](`Array.from(document.querySelectorAll("table.data tbody tr")).map(
		r => Array.from(r.cells).map(c => c.innerText.trim()))`))
	if err != nil {
		t.Fatal(err)
	}
	if out.pdf, err = s.PrintPDF(browser.A4); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(pdftotext, "-layout", "-enc", "UTF-8", "-", "-")
	cmd.Stdin = bytes.NewReader(out.pdf)
	text, err := cmd.Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	out.pages = strings.Split(strings.TrimSuffix(unligature(string(text)), "\f"), "\f")
	return out
}

// unligature undoes the ligatures a PDF's text may hold.
func unligature(s string) string {
	return strings.NewReplacer("\ufb01", "fi", "\ufb02", "fl", "\ufb00", "ff", "\ufb03", "ffi", "\ufb04", "ffl").Replace(s)
}

// rowSplits checks that every table row lies on one page: the first word
// of its first cell and the last word of its last non-empty cell are found,
// in document order, on the same page within a few lines of each other
// (rowAt).
func (p printed) rowSplits() []string {
	var bad []string
	page, off := 0, 0
	for _, cells := range p.rows {
		first, last := firstWord(cells), lastWord(cells)
		if first == "" {
			continue
		}
		found := false
		for pg := page; pg < len(p.pages) && !found; pg++ {
			start := 0
			if pg == page {
				start = off
			}
			i, whole := p.rowAt(pg, start, first, last)
			if i < 0 {
				continue
			}
			if !whole {
				bad = append(bad, fmt.Sprintf("row %q ... %q: its end is not on page %d", first, last, pg+1))
			}
			page, off, found = pg, i+len(first), true
		}
		if !found {
			bad = append(bad, fmt.Sprintf("row %q not found after page %d", first, page+1))
		}
	}
	return bad
}

// rowAt finds a row by its first and last words on page pg from byte
// start: the first place first is followed within seven lines by last
// (whole), else the first place first is (not whole); -1 when first is
// not on the page after start. Trying each place of first on the page
// passes over a receptor named in prose before the table (the verdict
// sentence); spaces are ignored in matching last, so a word the layout
// broke at a hyphen ("cis-1,2-" / "dce") is still found.
func (p printed) rowAt(pg, start int, first, last string) (int, bool) {
	text := p.pages[pg]
	firstAt := -1
	for at := start; ; {
		i := strings.Index(text[at:], first)
		if i < 0 {
			return firstAt, false
		}
		i += at
		if firstAt < 0 {
			firstAt = i
		}
		rest := text[i:]
		if lines := strings.SplitAfterN(rest, "\n", 8); len(lines) == 8 {
			rest = strings.Join(lines[:7], "")
		}
		if strings.Contains(strings.Join(strings.Fields(rest), ""), strings.Join(strings.Fields(last), "")) {
			return i, true
		}
		at = i + len(first)
	}
}

func firstWord(cells []string) string {
	if len(cells) == 0 {
		return ""
	}
	f := strings.Fields(cells[0])
	if len(f) == 0 {
		return ""
	}
	return f[0]
}

func lastWord(cells []string) string {
	for i := len(cells) - 1; i >= 0; i-- {
		if f := strings.Fields(cells[i]); len(f) > 0 {
			return f[len(f)-1]
		}
	}
	return ""
}

// The report printed through Chromium's print-to-PDF: the demo (plain, and
// with its memo header, sources and uncertainty section) and a chain of
// four compounds on at most 8 A4 pages, a 500-receptor layer on at most
// one page per five receptors; no table row split across pages; every
// receptor id and the screening caution in the text.
func TestReportPrint(t *testing.T) {
	if testing.Short() {
		t.Skip("print check skipped in -short mode")
	}
	ts := newTestServer(t, Config{})
	// The fullest demo memo: header, sources of values and the uncertainty section.
	env := uncertaintyMap(t)
	env["realizations"] = 200
	sc := env["scenario"].(map[string]any)
	for k, v := range memoMap(t) {
		if k == "memo" || k == "sources_of_values" {
			sc[k] = v
		}
	}
	cases := []struct {
		name        string
		body, plain []byte
		maxPages    int
	}{
		{"demo", demoBody(t), demoBody(t), 8},
		{"demo with memo and uncertainty", mustJSON(t, env), demoBody(t), 8},
		{"500-receptor layer", mustJSON(t, layerMap(t, 500)), mustJSON(t, layerMap(t, 500)), 100},
		// Four compounds with one retardation factor: every compound has a
		// map, and the memo draws two (TestReportChainMaps); the invented
		// dry cleaner as given prints in TestReportChainPictures.
		{"dry-cleaner chain, equal retardation", mustJSON(t, equalRDryCleaner(t)), mustJSON(t, equalRDryCleaner(t)), 8},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			page := report(t, ts, "", c.body)
			var res plume.Result
			if err := json.Unmarshal(ts.call(t, "POST", "/v1/screenings", c.plain, nil).Body.Bytes(), &res); err != nil || len(res.Receptors) == 0 {
				t.Fatalf("screening: %v", err)
			}
			var ids []string
			for _, rr := range res.Receptors {
				ids = append(ids, rr.ID)
			}
			checkPrint(t, c.name, page, c.maxPages, ids)
		})
	}
}

// checkPrint prints a report page and checks the print: at most maxPages
// A4 pages, no table row split across pages, the screening caution and
// every receptor id in the text. REPORT_PDF_DIR keeps the PDF.
func checkPrint(t *testing.T, name, page string, maxPages int, ids []string) {
	t.Helper()
	pr := printReport(t, []byte(page))
	t.Logf("%s: %d pages, %d table rows", name, len(pr.pages), len(pr.rows))
	if len(pr.pages) > maxPages {
		t.Errorf("%d pages, want at most %d", len(pr.pages), maxPages)
	}
	for _, b := range pr.rowSplits() {
		t.Error(b)
	}
	flat := strings.Join(strings.Fields(strings.Join(pr.pages, " ")), " ")
	if !strings.Contains(flat, plume.ScreeningCaution) {
		t.Error("the PDF text lacks the screening caution")
	}
	for _, id := range ids {
		if !strings.Contains(flat, id) {
			t.Errorf("the PDF text lacks receptor %q", id)
		}
	}
	if dir := os.Getenv("REPORT_PDF_DIR"); dir != "" {
		_ = os.WriteFile(dir+"/"+strings.ReplaceAll(name, " ", "-")+".pdf", pr.pdf, 0o644)
	}
}

// The split check itself: a row whose end lies on the next page is found;
// rows laid out whole pass.
func TestRowSplitCheck(t *testing.T) {
	rows := [][]string{{"MW-1", "1287.6", "ABOVE LEVEL"}, {"MW-2", "1331.2", "ABOVE LEVEL"}, {"S-1 creek bank", "1813.8", "BELOW LEVEL"}}
	whole := printed{rows: rows, pages: []string{"MW-1  1287.6  ABOVE LEVEL\nMW-2  1331.2  ABOVE LEVEL\n", "S-1 creek bank 1813.8 BELOW LEVEL\n"}}
	if bad := whole.rowSplits(); len(bad) > 0 {
		t.Errorf("whole rows reported split: %v", bad)
	}
	split := printed{rows: rows, pages: []string{"MW-1  1287.6  ABOVE LEVEL\nMW-2  1331.2\n", "ABOVE LEVEL\nS-1 creek bank 1813.8 BELOW LEVEL\n"}}
	if bad := split.rowSplits(); len(bad) != 1 || !strings.Contains(bad[0], "MW-2") {
		t.Errorf("split row not found: %v", bad)
	}
	// Receptors named in a sentence above the table, and a last word
	// broken at a hyphen by the layout: whole rows.
	prose := printed{rows: [][]string{{"MW-3", "PCE", "ABOVE LEVEL"}, {"Screening level", "50", "entry cis-1,2-dce"}},
		pages: []string{"Exceeding: PCE at MW-3, MW-6;\nvinyl chloride at MW-3.\n\n\n\n\n\n\n\nMW-3  PCE  ABOVE LEVEL\n" +
			"Screening level  50  entry cis-1,2-\n                      dce\n"}}
	if bad := prose.rowSplits(); len(bad) > 0 {
		t.Errorf("whole rows after prose reported split: %v", bad)
	}
	// A row split at the bottom of a page after prose naming it is still found.
	prose.pages = []string{"Exceeding: PCE at MW-3.\n\n\n\n\n\n\n\nMW-3  PCE\n", "ABOVE LEVEL\nScreening level  50  entry cis-1,2-dce\n"}
	if bad := prose.rowSplits(); len(bad) != 1 || !strings.Contains(bad[0], "MW-3") {
		t.Errorf("split row after prose not found: %v", bad)
	}
}
