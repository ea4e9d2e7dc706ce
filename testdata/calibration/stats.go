package main

import (
	"fmt"
	"io"
	"math"
	"strings"
)

// coverSDs is the interval, in stated standard deviations, that should hold
// about 95 % of the errors of a calibrated Gaussian uncertainty (common
// practice); the issue asks for at least 90 % within it.
const coverSDs = 2

// stat gathers the errors of one figure over a group of cases. Flagged and
// missing estimates are counted, not judged: a flagged mode says itself
// that it is not to be trusted.
type stat struct {
	fig              figure
	errs, zs         []float64
	flagged, missing int
	worstErr         float64 // the largest |error|, in the figure's error unit
	worstZ           float64 // the largest |z|
	worstErrCase     string
	worstZCase       string
}

func (s *stat) add(e estimate, label string) {
	switch {
	case math.IsNaN(e.est):
		s.missing++
		return
	case e.flagged:
		s.flagged++
		return
	}
	err := e.fig.errorOf(e.est, e.truth)
	s.errs = append(s.errs, err)
	if math.Abs(err) > s.worstErr || len(s.errs) == 1 {
		s.worstErr, s.worstErrCase = math.Abs(err), label
	}
	if !(e.sd > 0) { // no stated sd (an undetermined node): in n, not in z
		return
	}
	z := e.z()
	s.zs = append(s.zs, z)
	if math.Abs(z) > s.worstZ || len(s.zs) == 1 {
		s.worstZ, s.worstZCase = math.Abs(z), label
	}
}

func (s *stat) n() int { return len(s.errs) }

func (s *stat) bias() float64 { return mean(s.errs) }

func (s *stat) sdErr() float64 {
	m := mean(s.errs)
	var q float64
	for _, e := range s.errs {
		q += (e - m) * (e - m)
	}
	return math.Sqrt(q / float64(len(s.errs)-1))
}

// coverage returns the share of the estimates with a stated sd whose
// |error| <= coverSDs sd.
func (s *stat) coverage() float64 {
	in := 0
	for _, z := range s.zs {
		if math.Abs(z) <= coverSDs {
			in++
		}
	}
	return float64(in) / float64(len(s.zs))
}

// rmsZ returns the RMS of error/sd: 1 for a calibrated uncertainty.
func (s *stat) rmsZ() float64 {
	var q float64
	for _, z := range s.zs {
		q += z * z
	}
	return math.Sqrt(q / float64(len(s.zs)))
}

func mean(x []float64) float64 {
	var m float64
	for _, v := range x {
		m += v
	}
	return m / float64(len(x))
}

// group is the statistics of every figure over a set of cases.
type group struct {
	name         string
	logs, failed int
	resampled    int
	stats        []*stat  // in figures' order
	failedMsgs   []string // the first few failures
}

func newGroup(name string) *group {
	g := &group{name: name}
	for _, f := range figures {
		g.stats = append(g.stats, &stat{fig: f})
	}
	return g
}

func (g *group) add(r caseResult, keep func(estimate) bool) {
	g.logs++
	if r.resampled {
		g.resampled++
	}
	if r.err != nil {
		g.failed++
		for _, s := range g.stats {
			s.missing++
		}
		if len(g.failedMsgs) < 3 {
			// The message starts with the log's path, in a folder that is gone.
			msg := strings.TrimPrefix(r.err.Error(), r.logPath+": ")
			g.failedMsgs = append(g.failedMsgs, fmt.Sprintf("%s: %s", r.label(), msg))
		}
		return
	}
	for i, e := range r.estimates {
		if keep == nil || keep(e) {
			g.stats[i].add(e, r.label())
		}
	}
}

func (r caseResult) label() string {
	return fmt.Sprintf("%s %s seed %d", r.job.car.name, r.job.cond.name, r.job.seed)
}

// format writes x with the decimals that suit f's error unit.
func (f figure) format(x float64) string {
	if math.IsNaN(x) {
		return "-"
	}
	switch f.unit {
	case "%":
		return fmt.Sprintf("%.3f", x)
	case "m":
		return fmt.Sprintf("%.3f", x)
	default:
		return fmt.Sprintf("%.4f", x)
	}
}

// errorName is the figure's name with its error unit, for the table.
func (f figure) errorName() string {
	switch f.unit {
	case "%":
		return f.name + " (%)"
	case "1":
		return f.name
	}
	return f.name + " (" + f.unit + ")"
}

// writeFigureTable writes one Markdown table of g, a row per figure.
func writeFigureTable(w io.Writer, g *group) {
	fmt.Fprintf(w, "**%s**: %d logs, %d failed, %d read with resampling after the reader refused their time stamps.\n\n",
		g.name, g.logs, g.failed, g.resampled)
	fmt.Fprintln(w, "| figure (error unit) | n | bias | sd | worst abs | worst abs z | within 2 sd | RMS z | flagged | missing |")
	fmt.Fprintln(w, "| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |")
	for _, s := range g.stats {
		if s.n() == 0 {
			fmt.Fprintf(w, "| %s | 0 | - | - | - | - | - | - | %d | %d |\n", s.fig.errorName(), s.flagged, s.missing)
			continue
		}
		fmt.Fprintf(w, "| %s | %d | %s | %s | %s | %s | %s | %s | %d | %d |\n", s.fig.errorName(), s.n(),
			s.fig.format(s.bias()), s.fig.format(s.sdErr()), s.fig.format(s.worstErr),
			fmtOr(s.worstZ, len(s.zs), "%.1f"), pctOr(s.coverage, len(s.zs)), fmtOr(s.rmsZ(), len(s.zs), "%.2f"),
			s.flagged, s.missing)
	}
	fmt.Fprintln(w)
}

func fmtOr(x float64, n int, format string) string {
	if n == 0 {
		return "-"
	}
	return fmt.Sprintf(format, x)
}

func pctOr(f func() float64, n int) string {
	if n == 0 {
		return "-"
	}
	return fmt.Sprintf("%.0f %%", 100*f())
}

// figureShort are the column heads of the per-condition table, in figures'
// order.
var figureShort = []string{"b f", "b zeta", "b ppb", "b node", "p f", "p zeta", "p ppb", "p node",
	"kf", "kr", "cf", "cr"}

// writeConditionTable writes a Markdown table, a row per condition: the
// mean and worst frequency errors and the worst damping ratio error of
// either mode, then the share within 2 sd and the RMS z of every figure.
func writeConditionTable(w io.Writer, groups []*group) {
	fmt.Fprintln(w, "Per condition: the mean error of both modes' natural frequencies (%, a misread sample rate shifts both), "+
		"the worst |error| of either mode's natural frequency (%) and damping ratio, then for each "+
		"figure the share within 2 sd / RMS z (b, p: bounce, pitch; f: natural frequency; ppb: pitch per bounce; "+
		"kf, kr, cf, cr: front and rear rate and damping).")
	fmt.Fprintln(w)
	fmt.Fprintf(w, "| condition | logs | failed | f bias | worst f | worst zeta | %s |\n", strings.Join(figureShort, " | "))
	fmt.Fprintf(w, "| --- | --- | --- | --- | --- | --- |%s\n", strings.Repeat(" --- |", len(figureShort)))
	for _, g := range groups {
		cells := make([]string, len(g.stats))
		for i, s := range g.stats {
			cells[i] = "-"
			if len(s.zs) > 0 {
				cells[i] = fmt.Sprintf("%.0f/%.2f", 100*s.coverage(), s.rmsZ())
			}
		}
		worst := func(unit string) string {
			var ws *stat
			for _, s := range g.stats {
				if s.fig.mode != "" && s.fig.unit == unit && s.n() > 0 && (ws == nil || s.worstErr > ws.worstErr) {
					ws = s
				}
			}
			if ws == nil {
				return "-"
			}
			return ws.fig.format(ws.worstErr)
		}
		var freqErrs []float64
		for _, s := range g.stats {
			if s.fig.mode != "" && s.fig.unit == "%" {
				freqErrs = append(freqErrs, s.errs...)
			}
		}
		bias := "-"
		if len(freqErrs) > 0 {
			bias = fmt.Sprintf("%+.3f", mean(freqErrs))
		}
		fmt.Fprintf(w, "| %s | %d | %d | %s | %s | %s | %s |\n", g.name, g.logs, g.failed, bias, worst("%"), worst("1"),
			strings.Join(cells, " | "))
	}
	fmt.Fprintln(w)
}
