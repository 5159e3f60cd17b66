package api

import (
	"bytes"
	"context"
	_ "embed"
	"html/template"
	"strings"

	"github.com/labstack/echo/v4"
	"gonum.org/v1/plot/vg"

	"downgradient/plots"
	"downgradient/plume"
	"downgradient/plume/maps"
)

// maxReportReceptorPlots is the most breakthrough plots one report holds.
const maxReportReceptorPlots = 12

//go:embed reports_page.html
var reportPage string

//go:embed reports_style.css
var reportStyle string

var reportTemplate = template.Must(template.New("report").Funcs(template.FuncMap{
	"num": fmtReportNumber,
	"nump": func(p *float64) string {
		if p == nil {
			return "—"
		}
		return fmtReportNumber(*p)
	},
	"lower": strings.ToLower,
	"inc":   func(i int) int { return i + 1 },
}).Parse(reportPage))

// reports is POST /v1/reports: one self-contained HTML memo of a scenario,
// or of an uncertainty run when the body is the /v1/uncertainty envelope.
func (s *server) reports(c echo.Context) error {
	opts, p := figureOptionsOf(c)
	if p != nil {
		return p
	}
	rq, p := s.decodeReportRequest(c)
	if p != nil {
		return p
	}
	ctx := c.Request().Context()
	sc := rq.body.Scenario
	res, p := s.screen(ctx, sc, rq.rename)
	if p != nil {
		return p
	}
	runAt := s.cfg.Clock()
	rename := func(f string) string {
		if rq.rename != nil {
			f = rq.rename(f)
		}
		return renameFigureField(f)
	}
	page, p := compute(ctx, s, rename, func(ctx context.Context) ([]byte, error) {
		opts.compact = true
		views, err := memoViews(res)
		if err != nil {
			return nil, err
		}
		var md *plume.Model
		if len(views) > 1 {
			if md, err = plume.Prepare(sc); err != nil {
				return nil, err
			}
		}
		plan := planMemoMaps(md, sc, views, opts)
		needs := figureNeeds{breakthrough: plotReceptors(plotRows(views)), profile: true, planMap: true, section: true, mapped: plan.targets,
			mapCells: reportMapCells, sectionCells: reportSectionCells, opts: opts, unc: rq.unc}
		fi, err := s.computeFigures(ctx, sc, res, needs)
		if err != nil {
			return nil, err
		}
		rv, err := buildReport(rq.body, res, views, plan, fi, opts)
		if err != nil {
			return nil, err
		}
		rv.RunAt = runAt.UTC().Format("2006-01-02 15:04 UTC")
		var buf bytes.Buffer
		if err := reportTemplate.Execute(&buf, rv); err != nil {
			return nil, err
		}
		return buf.Bytes(), nil
	})
	if p != nil {
		return p
	}
	return s.send(c, &reply{contentType: "text/html; charset=utf-8", body: page, header: [][2]string{{headerCSP, contentPolicy}}})
}

// peakMapTime is the time of the memo's map and section of a compound
// when none was asked for: when values peak and fall (a spill, a finite
// or depleting source, whose steady state shows little or nothing), the
// time of the compound's peak at the first receptor of the results table
// (res: the screening seen through the compound); else nil, the steady
// state.
func peakMapTime(res *plume.Result) *maps.MapTime {
	for _, i := range receptorOrder(res) {
		rr := res.Receptors[i]
		if rr.Status != plume.StatusUpgradient && rr.Peak.Time != nil && rr.Peak.Concentration > 0 {
			return &maps.MapTime{Value: *rr.Peak.Time}
		}
	}
	return nil
}

// renderInline renders a figure at the full page width as inline SVG.
func renderInline(f *plots.Figure, err error) (template.HTML, error) {
	return renderAt(f, err, plots.DefaultWidth)
}

// renderCompact renders a figure at half the page width as inline SVG.
func renderCompact(f *plots.Figure, err error) (template.HTML, error) {
	return renderAt(f, err, plots.CompactWidth)
}

func renderAt(f *plots.Figure, err error, width vg.Length) (template.HTML, error) {
	if err != nil {
		return "", err
	}
	w, h := f.Size(width)
	b, err := plots.Render(f, w, h, plots.SVG)
	if err != nil {
		return "", err
	}
	return template.HTML(plots.InlineSVG(b)), nil // our own SVG: text escaped by the SVG writer
}
