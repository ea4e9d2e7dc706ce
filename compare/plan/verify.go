package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/body"
)

// Seeds: the refining tests use 1, 2, ..., the verifying ones start
// at verifySeedBase, so the two never share a log.
const verifySeedBase = 1001

// Verification sets the spread achieved by simulated tests of a plan,
// through the real analysis, beside the plan's prediction.
type Verification struct {
	// Runs is the number of tests (rig records, or series of Drops drops
	// pooled); Failed of them could not be analysed.
	Runs     int      `json:"runs"`
	Failed   int      `json:"failed"`
	Failures []string `json:"failures,omitempty"`
	// FirstSeed is the seed of the first simulated log; the others follow.
	FirstSeed uint64 `json:"first_seed"`
	// Quantities: per value, the predicted sd, the achieved one (root mean
	// square of estimate minus truth) and their ratio.
	Quantities []VerifiedQuantity `json:"quantities"`
	// RatioRMS is the root mean square of error/predicted sd over every
	// run and regular value (natural frequency, damping ratio, pitch per
	// bounce, rates): the achieved spread over the predicted, pooled.
	RatioRMS float64 `json:"ratio_rms"`
	// Met is true when every wanted sd was achieved.
	Met bool `json:"met"`
}

// VerifiedQuantity is one value's predicted and achieved sd.
type VerifiedQuantity struct {
	Key         string  `json:"key"`
	Name        string  `json:"name"`
	Unit        string  `json:"unit"`
	PredictedSD float64 `json:"predicted_sd"`
	AchievedSD  float64 `json:"achieved_sd"`
	// Ratio is AchievedSD/PredictedSD.
	Ratio float64 `json:"ratio"`
	// StatedSD is the mean of the sd the analysis stated with the value
	// (null when it states none).
	StatedSD *float64 `json:"stated_sd"`
	// Runs is how many runs gave the value.
	Runs int `json:"runs"`
	// WantedSD and Met are null for a value nothing is wanted of.
	WantedSD *float64 `json:"wanted_sd"`
	Met      *bool    `json:"met"`
}

// simulateLog returns the log of one planned test (a rig record or one
// drop) with the seed given.
func (p *planner) simulateLog(seed uint64) (*simulate.Log, error) {
	if p.req.Test == identify.TestRig {
		o := simulate.Defaults("rig")
		t := p.rig
		o.DurationS, o.RateHz, o.Seed, o.NoiseSDMPerS2 = t.DurationS, t.RateHz, seed, t.NoiseMPerS2
		o.Drive, o.BandLowHz, o.BandHighHz, o.DriveRMSMPerS2 = simulate.DriveRandom, t.DriveLowHz, t.DriveHighHz, t.DriveRMSMPerS2
		return simulate.Rig(p.car, p.sensors, p.inputs, o)
	}
	o := simulate.Defaults("drop")
	t := p.drop
	o.DurationS, o.RateHz, o.Seed, o.NoiseSDMPerS2 = t.DurationS, t.RateHz, seed, t.NoiseMPerS2
	o.DropHeightM, o.PreTriggerS, o.RearDelayS = t.HeightM, t.PreTriggerS, t.RearDelayS
	return simulate.Drop(p.car, p.sensors, o)
}

// analyseSimulated simulates the logs of the seeds into dir and analyses
// them as one test by the real analysis: a rig record, or drops pooled
// (job.AnalyzeRuns). The logs are removed afterwards.
func (p *planner) analyseSimulated(ctx context.Context, dir string, seeds []uint64) (*compare.Result, error) {
	var paths []string
	defer func() {
		for _, path := range paths {
			os.Remove(path)
		}
	}()
	for _, seed := range seeds {
		log, err := p.simulateLog(seed)
		if err != nil {
			return nil, err
		}
		path := filepath.Join(dir, fmt.Sprintf("%s-%d.csv", p.req.Test, seed))
		paths = append(paths, path)
		if err := log.WriteFile(path); err != nil {
			return nil, err
		}
	}
	o := job.Options{Setup: p.setupWith(p.sensors), Test: p.req.Test, ToolVersion: "plan"}
	if p.req.Test == identify.TestRig {
		o.SegmentSamples = p.rig.SegmentSamples
	}
	out, err := job.AnalyzeRuns(ctx, o, paths)
	if err != nil {
		return nil, err
	}
	return out.Result, nil
}

// errorsOf returns estimate minus truth of every quantity of r.
func (p *planner) errorsOf(r *compare.Result) map[string]float64 {
	e := map[string]float64{}
	for _, q := range quantitiesOf(r) {
		if t, ok := p.truth[q.key]; ok && !math.IsNaN(t) {
			e[q.key] = q.value - t
		}
	}
	return e
}

// ownWeight is the weight of a modal value's own mean square z in its
// realism factor (refine): the modal values' own factors differed by
// about 15 % about k, and a value's own is pinned by DefaultRefineSeeds tests to
// about 15 %; the weight that minimises the error of such a blend is near
// a half. A rate takes its own alone: its asymptotic sd is off for a
// reason of its own (the analysis propagates the modal values as if
// independent; the rates' spread came out at 0.5-1 of it).
const ownWeight = 0.5

// refineInfo is what the small Monte Carlo of a plan gave.
type refineInfo struct{ runs, failed int }

// refine sets the realism factors: req.RefineSeeds single tests of the chosen
// conditions (one rig record, or one drop, each) are simulated and
// analysed, and with z = (error - asymptotic bias)/asymptotic random sd
// (ms, for one test), p.k is the root mean square of z over the tests and
// the regular values, and p.kq of each regular value the root of
// ownWeight times its own mean square z plus 1 - ownWeight times k^2.
//
// Why: the bias of the rig's expected estimate came out right (within
// 10 % of the mean error of 30 real analyses), its random sd up to twice
// the real one at coarse resolutions, where the window's leakage lowers
// the coherence that sets the error bands; a drop reaches the bound only
// at high signal-to-noise ratios; and the rates' sd, propagated by the
// analysis from modal values taken as independent, was up to twice the
// spread of the rates. A value's own mean square z from a few tests is
// pinned to about 18 % only, with long tails; the pooled k is firmer but
// misses such differences between values.
func (p *planner) refine(ctx context.Context, ms []body.Mode) (refineInfo, error) {
	dir, err := os.MkdirTemp("", "ridemodes-plan-")
	if err != nil {
		return refineInfo{}, err
	}
	defer os.RemoveAll(dir)
	pred := p.asymptotic(p.sensors, ms)
	var sum float64
	var n int
	own, count := map[string]float64{}, map[string]int{}
	info := refineInfo{runs: p.req.RefineSeeds}
	for s := uint64(1); s <= uint64(p.req.RefineSeeds); s++ {
		r, err := p.analyseSimulated(ctx, dir, []uint64{s})
		if err != nil {
			if ctx.Err() != nil {
				return info, ctx.Err()
			}
			info.failed++
			continue
		}
		errs := p.errorsOf(r)
		for _, q := range pred {
			if e, ok := errs[q.key]; ok && q.regular() && q.sd > 0 {
				z2 := (e - q.bias) / q.sd * (e - q.bias) / q.sd
				sum += z2
				n++
				own[q.key] += z2
				count[q.key]++
			}
		}
	}
	if n == 0 {
		return info, fmt.Errorf("plan: none of the %d simulated tests of the plan could be analysed: the planned test "+
			"is too weak for the analysis (raise the drive or the drop, or quieten the sensors)", p.req.RefineSeeds)
	}
	p.k = math.Sqrt(sum / float64(n))
	p.kq = map[string]float64{}
	for key, s := range own {
		w := ownWeight
		if strings.HasPrefix(key, "updated.") {
			w = 1
		}
		p.kq[key] = math.Sqrt(w*s/float64(count[key]) + (1-w)*p.k*p.k)
	}
	return info, nil
}

// factor returns the realism factor of the value of a key: its own, a
// node that of its mode's pitch per bounce (the node is 1/ppb), anything
// else the pooled one.
func (p *planner) factor(key string) float64 {
	if f, ok := p.kq[key]; ok {
		return f
	}
	if mode, ok := strings.CutSuffix(key, ".node_m"); ok {
		if f, ok := p.kq[mode+".pitch_per_bounce_rad_per_m"]; ok {
			return f
		}
	}
	return p.k
}

// settleRounds bounds the refinements of a plan (settle).
const settleRounds = 3

// settle measures the realism factors at the chosen conditions (refine,
// with their asymptotic modes ms), then has choose pick the conditions
// again with the prediction so refined; while that changes what one
// simulated test is, k is measured again there, at most settleRounds
// times in all. It returns the last refinement and the asymptotic modes
// of the conditions chosen last; the factors belong to the conditions of
// those modes unless the choice still moved after the last round, when they
// come from the conditions before.
func (p *planner) settle(ctx context.Context, ms []body.Mode, choose func() ([]body.Mode, bool, error)) (refineInfo, []body.Mode, error) {
	var ref refineInfo
	for round := 0; round < settleRounds; round++ {
		var err error
		if ref, err = p.refine(ctx, ms); err != nil {
			return ref, nil, err
		}
		next, changed, err := choose()
		if err != nil {
			return ref, nil, err
		}
		ms = next
		if !changed {
			break
		}
	}
	return ref, ms, nil
}

// weakRealism is the realism factor above which the plan warns: the real
// analysis's errors exceed the asymptotic sd by a third or more, as they
// do where a mode is weakly excited or a drop is noisy (its errors then
// have long tails, which a few tests pin only roughly).
const weakRealism = 1.33

// predictionJSON says what the prediction rests on.
func (p *planner) predictionJSON(ref refineInfo, asymptotic string) PredictionJSON {
	return PredictionJSON{Method: fmt.Sprintf("%s; refined by %d simulated tests of the plan through the real analysis, "+
		"which scale each value's random sd by its realism factor (overall k = %.2f, the RMS of (error - bias)/random sd); "+
		"the sd predicted combines that with the bias", asymptotic, ref.runs-ref.failed, p.k),
		RealismFactor: p.k, RealismFactors: p.kq, RefineRuns: ref.runs, RefineFailed: ref.failed, Margin: Margin}
}

// Verify simulates n tests of the plan (rig records, or series of the
// planned number of drops, pooled), analyses each by the real analysis
// and sets the spread of the estimates about the truth beside the
// prediction; it stores the outcome in pl.Verification and returns it.
// Its seeds differ from those of the refinement.
func Verify(ctx context.Context, pl *Plan, n int) (*Verification, error) {
	if pl.p == nil {
		return nil, errors.New("plan: Verify needs a plan made by Make")
	}
	if n < 2 {
		return nil, fmt.Errorf("plan: verifying needs at least 2 simulated tests (got %d)", n)
	}
	p := pl.p
	dir, err := os.MkdirTemp("", "ridemodes-verify-")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(dir)
	drops := 1
	if pl.Drops != nil {
		drops = *pl.Drops
	}
	pred := p.predicted(p.sensors, p.modes, p.scale)
	v := &Verification{Runs: n, FirstSeed: verifySeedBase}
	sq, stated := map[string]float64{}, map[string]float64{}
	count := map[string]int{}
	var zsum float64
	var zn int
	for run := range n {
		seeds := make([]uint64, drops)
		for i := range seeds {
			seeds[i] = verifySeedBase + uint64(run*drops+i)
		}
		r, err := p.analyseSimulated(ctx, dir, seeds)
		if err != nil {
			if ctx.Err() != nil {
				return nil, ctx.Err()
			}
			v.Failed++
			v.Failures = append(v.Failures, err.Error())
			continue
		}
		errs := p.errorsOf(r)
		for _, q := range quantitiesOf(r) {
			stated[q.key] += q.sd
		}
		for _, q := range pred {
			if e, ok := errs[q.key]; ok {
				sq[q.key] += e * e
				count[q.key]++
				if q.regular() && q.sd > 0 {
					zsum += (e / q.sd) * (e / q.sd)
					zn++
				}
			}
		}
	}
	if zn == 0 {
		return nil, fmt.Errorf("plan: none of the %d simulated tests could be analysed: %v", n, v.Failures)
	}
	v.RatioRMS = math.Sqrt(zsum / float64(zn))
	v.Met = true
	for _, q := range pred {
		c := count[q.key]
		if c == 0 || !(q.sd > 0) {
			continue
		}
		vq := VerifiedQuantity{Key: q.key, Name: q.name, Unit: q.unit, PredictedSD: q.sd,
			AchievedSD: math.Sqrt(sq[q.key] / float64(c)), Runs: c, StatedSD: compare.Finite(stated[q.key] / float64(c))}
		vq.Ratio = vq.AchievedSD / vq.PredictedSD
		if w := p.req.Wanted.wantedSD(quantity{key: q.key, value: p.truth[q.key]}, p.car.WheelbaseM()); !math.IsNaN(w) &&
			slices.Contains(p.wantedKeys(), q.key) {
			met := vq.AchievedSD <= w
			vq.WantedSD, vq.Met = &w, &met
			v.Met = v.Met && met
		}
		v.Quantities = append(v.Quantities, vq)
	}
	pl.Verification = v
	return v, nil
}
