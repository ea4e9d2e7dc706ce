package job

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// AnalyzeRuns does the whole job on several logs of one car in one state
// (repeated drops, repeated rig runs) with one setup and one set of
// options: each log is identified on its own, the modes are pooled
// (body.Pool: inverse-variance weights, a chi-square consistency test that
// names a run that disagrees), and the pooled modes are compared with the
// design model and judged once. The result holds the pooled modes, each
// run's own modes under "runs", and the consistency tests under "pooling".
// One log is Analyze.
func AnalyzeRuns(ctx context.Context, o Options, logPaths []string) (*Outcome, error) {
	if len(logPaths) == 1 {
		o.LogPath = logPaths[0]
		return Analyze(ctx, o)
	}
	if len(logPaths) == 0 {
		return nil, compare.OptionErrorf("no log to analyse")
	}
	p, err := o.resolve()
	if err != nil {
		return nil, err
	}
	var (
		modes [][]body.Mode
		runs  []compare.RunJSON
		ids   []*identify.Identified
	)
	for _, path := range logPaths {
		id, info, err := o.identifyLog(ctx, p, path)
		if err != nil {
			return nil, err
		}
		r := o.result(p, path, info, id)
		runs = append(runs, compare.RunJSON{Log: r.Log, Modes: r.Modes, Warnings: r.Warnings})
		modes = append(modes, id.Modes)
		ids = append(ids, id)
	}
	pooled, err := body.Pool(modes, logPaths)
	if err != nil {
		return nil, err
	}
	res := pooledResult(o, p, ids, logPaths, pooled)
	res.Runs = runs
	for _, r := range runs {
		for _, w := range r.Warnings {
			res.Warnings = append(res.Warnings, r.Log.Path+": "+w)
		}
	}
	res.Warnings = append(res.Warnings, pooled.Disagreements...)
	if err := res.AssessAgainst(p.setup); err != nil {
		return nil, err
	}
	return &Outcome{Result: res, Setup: p.setup, Runs: ids, Verdict: res.Verdict.Status}, nil
}

// poolingMethod names how the runs are combined.
const poolingMethod = "inverse-variance weighted mean per value, chi-square consistency test, sd widened by the Birge ratio where the runs disagree"

// pooledResult writes the pooled modes in the contract's form.
func pooledResult(o Options, p *plan, ids []*identify.Identified, logPaths []string, pooled *body.Pooled) *compare.Result {
	res := &compare.Result{Tool: compare.Tool{Name: "ridemodes", Version: o.ToolVersion}, Test: p.test,
		Warnings: []string{}}
	if sum, err := ingest.FileSHA256(p.setup.Path); err == nil {
		res.Setup = &compare.FileRef{Path: p.setup.Path, SHA256: sum}
	}
	res.Analysis = &compare.Analysis{BandLowHz: p.loHz, BandHighHz: p.hiHz, Choices: []string{
		fmt.Sprintf("%d logs of one car in one state pooled: %s", len(ids), poolingMethod)}}
	method := fmt.Sprintf("pooled over %d logs (%s); each: %s", len(ids), poolingMethod, ids[0].Method)
	pos := ingest.SensorPositionsM(p.setup.Sensors)
	for _, m := range pooled.Modes {
		mj := compare.MeasuredJSON(m, pos, method)
		// A value on which the runs disagree cannot be stated with the
		// confidence its pooled sd suggests: the mode is flagged.
		for _, c := range pooled.Checks {
			if c.Label == m.Label && c.Disagreement != "" {
				mj.Flagged, mj.FlagReasons = true, append(mj.FlagReasons, c.Disagreement)
			}
		}
		res.Modes = append(res.Modes, mj)
	}
	pj := &compare.PoolingJSON{Runs: len(ids), Method: poolingMethod, Significance: body.PoolSignificance}
	for _, c := range pooled.Checks {
		cj := compare.PoolingCheckJSON{Label: c.Label, Value: c.Value, ChiSquare: c.ChiSquare, DOF: c.DOF,
			PValue: c.PValue, Consistent: c.Consistent, SDScale: c.Scale}
		if c.Outlier >= 0 {
			path, z := logPaths[c.Outlier], c.OutlierZ
			cj.OutlierLog, cj.OutlierZ = &path, &z
		}
		pj.Checks = append(pj.Checks, cj)
	}
	res.Pooling = pj
	return res
}

// repeatNodeSDFraction is the node's relative standard deviation from which
// a single drop's result advises repeating the drop and pooling the logs: a
// node known to 5 % (about 3 cm on a 0.6 m pitch node) places the pitch
// centre well enough to judge it against a design (our choice, stated in
// the advice).
const repeatNodeSDFraction = 0.05

// repeatAdvice advises, for a drop whose node or frequency is loosely
// pinned, the command that repeats the drop and pools the logs.
func repeatAdvice(id *identify.Identified, path string, p *plan) []string {
	if id.Test != identify.TestDrop {
		return nil
	}
	var loose []string
	for _, m := range id.Modes {
		if r := m.SD.NodeM / math.Abs(m.NodeM); r > repeatNodeSDFraction {
			loose = append(loose, fmt.Sprintf("the %s node (%+.3f m ± %.0f %%)", m.Label, m.NodeM, 100*r))
		}
	}
	if len(loose) == 0 {
		return nil
	}
	stem := strings.TrimSuffix(path, ".csv")
	return []string{fmt.Sprintf("one drop pins %s only loosely: repeat the drop two or three times and pool the logs, "+
		"e.g. ridemodes analyze %s %s-2.csv %s-3.csv --setup %s --test drop (n drops cut the sd by about 1/sqrt(n))",
		strings.Join(loose, " and "), path, stem, stem, p.setup.Path)}
}
