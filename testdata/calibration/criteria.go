package main

import (
	"fmt"
	"io"
	"math"
	"strings"
)

// The acceptance figures of the honest-answers issue.
const (
	rigFreqWorstPct     = 0.25 // rig, 5-minute logs: worst |frequency error|, %
	rigZetaWorst        = 0.005
	rigZetaUpTo         = 0.35 // the rig limits hold for modes damped up to this ratio
	dropFreqWorstPct    = 0.5  // drop, 2 % noise
	dropZetaWorst       = 0.01
	dropNoise           = 0.02
	longWorstZ          = 3 // hour-long logs: every error within this many sd
	coverageAtLeast     = 0.90
	rmsZLow, rmsZHigh   = 0.7, 1.3
	flaggedShareNoiseLo = 0.02 // the noise level whose flagged share is reported
)

// gather returns the group of the results that pass sel, with the
// estimates that pass keep (nil: all).
func gather(name string, results []caseResult, sel func(condition) bool, keep func(estimate) bool) *group {
	g := newGroup(name)
	for _, r := range results {
		if sel(r.job.cond) {
			g.add(r, keep)
		}
	}
	return g
}

// verdict is PASS or FAIL.
func verdict(ok bool) string {
	if ok {
		return "PASS"
	}
	return "FAIL"
}

// worstOf returns the stat with the largest worst |error| among the named
// figures of g (nil when none has an estimate).
func worstOf(g *group, names ...string) *stat {
	var w *stat
	for _, s := range g.stats {
		for _, n := range names {
			if s.fig.name == n && s.n() > 0 && (w == nil || s.worstErr > w.worstErr) {
				w = s
			}
		}
	}
	return w
}

// writeCriteria judges the results against the acceptance figures
// and writes a PASS or FAIL line for each (n/a when the run left out every
// case a criterion needs). routes are the per-route groups.
func writeCriteria(w io.Writer, results []caseResult, routes []*group) {
	fmt.Fprintln(w, "Acceptance (flagged and missing estimates are counted above, not judged here):")
	fmt.Fprintln(w)
	limit := func(what string, s *stat, lim float64, unit string) {
		if s == nil {
			fmt.Fprintf(w, "- n/a %s: no case in this run\n", what)
			return
		}
		fmt.Fprintf(w, "- %s %s <= %g%s: worst %s%s (%s, %s)\n", verdict(s.worstErr <= lim), what, lim, unit,
			s.fig.format(s.worstErr), unit, s.fig.name, s.worstErrCase)
	}
	upTo := func(e estimate) bool { return e.trueDamping <= rigZetaUpTo }
	rig5 := gather("rig 5 min", results, condition.fiveMinute, upTo)
	limit(fmt.Sprintf("rig 5-minute logs (damping up to %g), |frequency error|", rigZetaUpTo),
		worstOf(rig5, "bounce: natural frequency", "pitch: natural frequency"), rigFreqWorstPct, " %")
	limit(fmt.Sprintf("rig 5-minute logs (damping up to %g), |damping ratio error|", rigZetaUpTo),
		worstOf(rig5, "bounce: damping ratio", "pitch: damping ratio"), rigZetaWorst, "")
	drop2 := gather("drop 2 %", results, func(c condition) bool { return c.route == routeDrop && c.noise == dropNoise }, nil)
	limit("drop at 2 % noise, |frequency error|", worstOf(drop2, "bounce: natural frequency", "pitch: natural frequency"), dropFreqWorstPct, " %")
	limit("drop at 2 % noise, |damping ratio error|", worstOf(drop2, "bounce: damping ratio", "pitch: damping ratio"), dropZetaWorst, "")

	long := gather("rig 1 h", results, condition.long, nil)
	var worst *stat
	over := 0
	for _, s := range long.stats {
		for _, z := range s.zs {
			if math.Abs(z) > longWorstZ {
				over++
			}
		}
		if len(s.zs) > 0 && (worst == nil || s.worstZ > worst.worstZ) {
			worst = s
		}
	}
	if worst == nil {
		fmt.Fprintf(w, "- n/a hour-long rig logs within %d sd on every figure: no case in this run\n", longWorstZ)
	} else {
		fmt.Fprintf(w, "- %s hour-long rig logs within %d sd on every figure: %d estimates outside, worst %.1f sd (%s, %s)\n",
			verdict(over == 0), longWorstZ, over, worst.worstZ, worst.fig.name, worst.worstZCase)
	}

	for _, g := range routes {
		var badCover, badRMS []string
		judged := 0
		for _, s := range g.stats {
			if len(s.zs) == 0 {
				continue
			}
			judged++
			if c := s.coverage(); c < coverageAtLeast {
				badCover = append(badCover, fmt.Sprintf("%s %.0f %%", s.fig.name, 100*c))
			}
			if r := s.rmsZ(); r < rmsZLow || r > rmsZHigh {
				badRMS = append(badRMS, fmt.Sprintf("%s %.2f", s.fig.name, r))
			}
		}
		if judged == 0 {
			fmt.Fprintf(w, "- n/a %s: no case in this run\n", g.name)
			continue
		}
		fmt.Fprintf(w, "- %s %s, every figure within 2 sd in >= %.0f %% of cases: %d of %d figures fail%s\n",
			verdict(len(badCover) == 0), g.name, 100*coverageAtLeast, len(badCover), judged, listOf(badCover))
		fmt.Fprintf(w, "- %s %s, every figure's RMS z in %g-%g: %d of %d figures fail%s\n",
			verdict(len(badRMS) == 0), g.name, rmsZLow, rmsZHigh, len(badRMS), judged, listOf(badRMS))
	}

	low := gather("2 % noise", results, func(c condition) bool { return c.noise == flaggedShareNoiseLo }, nil)
	modes, flagged := 0, 0
	for _, s := range low.stats {
		if s.fig.mode != "" && s.fig.unit == "%" {
			modes += s.n() + s.flagged
			flagged += s.flagged
		}
	}
	if modes > 0 {
		fmt.Fprintf(w, "- info: flagged modes at 2 %% noise: %d of %d (%.1f %%)\n", flagged, modes, 100*float64(flagged)/float64(modes))
	}
	failed := 0
	for _, r := range results {
		if r.err != nil {
			failed++
		}
	}
	fmt.Fprintf(w, "- info: failed runs: %d of %d\n", failed, len(results))
	fmt.Fprintln(w)
}

func listOf(items []string) string {
	if len(items) == 0 {
		return ""
	}
	return ": " + strings.Join(items, ", ")
}
