package plots

import (
	_ "embed"
	"errors"
	"fmt"
	"html/template"
	"math"
	"slices"
	"strings"
	"sync"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/trend"
)

// TrendReportFile is the name of the trend report inside its directory.
const TrendReportFile = "index.html"

//go:embed trend.tmpl
var trendSource string

// trendTemplate is the trend page; it shares the run report's style.
var trendTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(parseReport().New("trend").Parse(trendSource))
})

// trendView is what the trend template renders: every number already
// formatted.
type trendView struct {
	Title, Subject  string
	Verdict         verdictView
	Findings, Notes []string
	Cautions        string
	Errors          []string
	Columns         []string
	Rows            []trendRow
	Figures         []figureView
}

// trendRow is one run in the runs table.
type trendRow struct {
	Label, Car, Run, Analysed, Test, Verdict, VerdictClass string
	Cells                                                  []string
	Meta, Log                                              string
}

// verdictStyle gives the word and style class of a verdict.
func verdictStyle(v string) (word, class string) {
	switch v {
	case compare.StatusPass:
		return "PASS", "verdict-pass"
	case compare.StatusFail:
		return "FAIL", "verdict-fail"
	case compare.StatusInconclusive:
		return "INCONCLUSIVE", "verdict-warn"
	case compare.StatusNone:
		return "NOT JUDGED", "verdict-other"
	}
	return strings.ToUpper(v), "verdict-other"
}

// WriteTrendReport writes the trend report of a campaign into dir:
// TrendReportFile (the campaign's worst verdict first, the runs the drift
// check names, a table of the runs with their metadata, and one figure per
// followed quantity: the values with ± 2 sd bars, the design values and the
// individuals and moving-range control charts), and each figure as
// trend-KEY.png. Files are written as WriteReport writes them: nothing is
// left behind on failure. It returns the paths written, the page last.
func WriteTrendReport(dir string, c *trend.Campaign) ([]string, error) {
	if c == nil {
		return nil, errors.New("plots: trend report: no campaign")
	}
	view := newTrendView(c)
	var specs []figureSpec
	for _, s := range c.Series {
		d := trendData(c, s)
		unit := ""
		if d.Unit != "" {
			unit = " [" + d.Unit + "]"
		}
		caption := fmt.Sprintf("%s%s per run, in time order, with ± 2 sd bars; dotted step: design value; ringed: runs named by the drift check.", s.Quantity.Name, unit)
		if d.Limits {
			caption += " Upper panel: individuals chart, centre line the mean, dashed limits mean ± 2.66 × mean moving range; lower panel: moving ranges with their mean and upper limit 3.267 × mean moving range."
		} else {
			caption += fmt.Sprintf(" Too few runs for control limits (at least %d).", trend.MinChartRuns)
		}
		specs = append(specs, figureSpec{"trend-" + s.Quantity.Key() + ".png", s.Quantity.Name, caption,
			func() (*Figure, error) { return TrendFigure(d) }})
	}
	return writePage(dir, specs, trendTemplate(), &view, &view.Figures, TrendReportFile, "trend report")
}

// trendData is the figure input of one series of c.
func trendData(c *trend.Campaign, s trend.Series) TrendData {
	d := TrendData{Name: s.Quantity.Name, Unit: s.Quantity.Symbol}
	for k, v := range s.Values {
		i := s.Runs[k]
		d.Runs = append(d.Runs, c.Runs[i].Run)
		d.Values = append(d.Values, v.Value)
		d.SD = append(d.SD, v.SD)
		d.Design = append(d.Design, v.Design)
		d.Named = append(d.Named, slices.ContainsFunc(c.Findings, func(f trend.Finding) bool {
			return f.Run == i && f.Quantity == s.Quantity && f.Kind != "jump"
		}))
	}
	if ch := s.Chart; ch != nil {
		d.Limits = true
		d.Center, d.Lower, d.Upper = ch.Center, ch.Lower, ch.Upper
		d.MR, d.MeanMR, d.UpperMR = ch.MR, ch.MeanMR, ch.UpperMR
	}
	return d
}

// newTrendView formats c for the template.
func newTrendView(c *trend.Campaign) trendView {
	v := trendView{Title: "Campaign trend report", Subject: "every car in the store", Notes: c.Notes, Cautions: compare.Cautions,
		Verdict: verdictView{Status: c.Verdict, Headline: c.Summary}}
	if c.Car != "" {
		v.Subject = "car " + c.Car
	}
	v.Verdict.Word, v.Verdict.Class = verdictStyle(c.Verdict)
	// The badge says the verdict; the summary need not start with it.
	if word, rest, ok := strings.Cut(c.Summary, ": "); ok && strings.EqualFold(word, c.Verdict) {
		v.Verdict.Headline = rest
	}
	for _, f := range c.Findings {
		v.Findings = append(v.Findings, f.Sentence+".")
	}
	for _, q := range trend.Quantities {
		h := q.Name
		if q.Symbol != "" {
			h += " [" + q.Symbol + "]"
		}
		v.Columns = append(v.Columns, h)
	}
	for i, r := range c.Runs {
		row := trendRow{Label: c.Labels[i], Car: r.Car, Run: r.Run, Analysed: r.AnalysedAt.UTC().Format("2006-01-02 15:04"),
			Test: r.Test, Log: r.LogPath}
		row.Verdict, row.VerdictClass = verdictStyle(r.Verdict)
		for _, q := range trend.Quantities {
			row.Cells = append(row.Cells, trendCell(c, i, q))
		}
		var meta []string
		for _, k := range sortedKeys(r.Meta) {
			meta = append(meta, k+": "+r.Meta[k])
		}
		row.Meta = strings.Join(meta, "; ")
		v.Rows = append(v.Rows, row)
		if r.Error != "" {
			v.Errors = append(v.Errors, fmt.Sprintf("%s could not be analysed: %s", c.Labels[i], r.Error))
		}
	}
	return v
}

// trendCell is run i's value of q as "x ± sd", or noValue.
func trendCell(c *trend.Campaign, i int, q trend.Quantity) string {
	for _, s := range c.Series {
		if s.Quantity != q {
			continue
		}
		if k := slices.Index(s.Runs, i); k >= 0 {
			val := s.Values[k]
			sd := &val.SD
			if math.IsNaN(val.SD) {
				sd = nil
			}
			cell := withSigma(val.Value, sd, q.Decimals)
			if val.Flagged {
				cell += " (flagged)"
			}
			return cell
		}
	}
	return noValue
}

// sortedKeys are m's keys in order.
func sortedKeys(m map[string]string) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}
