package decay

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"testing"
)

// TestStepsOfTheEvent: a drop of both axles at once has one step, the
// release, on every accuracy scenario and without noise; a car rolled off
// the blocks (rollOffScenario) has a second, at the first sample at or
// after the rear step of compare/simulate (release + RearDelayS*rate), and
// Fit starts its window SettleS after it and says so.
func TestStepsOfTheEvent(t *testing.T) {
	var margins []float64 // the rear step's jump over the noise threshold, best channel
	for seed := uint64(1); seed <= accuracyCases; seed++ {
		rate := accuracyRatesHz[seed%uint64(len(accuracyRatesHz))]
		for _, noise := range []float64{scenarioNoise, 0} {
			s := randomScenario(seed, rate)
			s.opt.NoiseFraction = noise
			ch, _ := s.log(t)
			evs, err := Detect(rate, ch, DetectOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if st := evs[0].Steps; len(st) != 1 || st[0] != evs[0].ReleaseIndex {
				t.Errorf("seed %d, noise %g, both axles at once: steps %v, want the release %d only", seed, noise, st,
					evs[0].ReleaseIndex)
			}
		}
		s := rollOffScenario(seed, rate)
		ch, pos := s.log(t)
		res, err := Fit(rate, ch, pos, Options{})
		if err != nil {
			t.Fatal(err)
		}
		ev := res.Event
		want := int(math.Ceil(math.Round(s.opt.PreTriggerS*rate) + s.opt.RearDelayS*rate))
		if len(ev.Steps) != 2 || ev.Steps[0] != ev.ReleaseIndex || ev.Steps[1] != want {
			t.Errorf("seed %d, rear %.3f s later: steps %v, want %d and %d", seed, s.opt.RearDelayS, ev.Steps,
				ev.ReleaseIndex, want)
			continue
		}
		margin := 0.0
		for c, x := range ch {
			margin = math.Max(margin, math.Abs(jumpAt(x, want))/(DefaultStepThresholdK*math.Sqrt(5)*ev.NoiseSD[c]))
		}
		margins = append(margins, margin)
		if start := float64(want)/rate + DefaultSettleS; res.WindowStartS < start-0.5/rate {
			t.Errorf("seed %d: window starts at %.3f s, before %.3f s (settling after the rear step)", seed,
				res.WindowStartS, start)
		}
		if !strings.Contains(strings.Join(res.Reasons, "\n"), "after the last") {
			t.Errorf("seed %d: the reasons do not say the window follows the last step:\n%s", seed,
				strings.Join(res.Reasons, "\n"))
		}
	}
	sort.Float64s(margins)
	t.Logf("rear steps: jump over the noise threshold %.2f-%.2f (median %.2f)", margins[0], margins[len(margins)-1],
		medianOf(margins))
}

// Roll-off accuracy aims: the median standard deviation of the pitch mode's
// natural frequency and damping ratio over the accuracy scenarios must
// shrink by at least minSigmaShrink when the same cars are rolled off the
// blocks instead of dropped at once.
const minSigmaShrink = 2

// pitchStats are the pitch mode's errors and sigmas over the scenarios.
type pitchStats struct {
	freqErr, zetaErr, freqSig, zetaSig []float64 // |df|/f, |dzeta|, sigma_f/f, sigma_zeta
	share                              []float64 // modeShare at the start of the free decay
}

func (p *pitchStats) add(es []modeError, res *Result, truthPitch int) {
	e, md := es[truthPitch], res.Modes[truthPitch]
	p.freqErr = append(p.freqErr, math.Abs(e.freqRel))
	p.zetaErr = append(p.zetaErr, math.Abs(e.zetaAbs))
	p.freqSig = append(p.freqSig, md.SD.NaturalFrequencyHz/md.NaturalFrequencyHz)
	p.zetaSig = append(p.zetaSig, md.SD.DampingRatio)
	p.share = append(p.share, e.share)
}

// weak counts the scenarios whose pitch mode is not well excited.
func (p *pitchStats) weak() int {
	n := 0
	for _, s := range p.share {
		if s < wellExcitedShare {
			n++
		}
	}
	return n
}

func rmsOf(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s / float64(len(x)))
}

func maxOf(x []float64) float64 {
	y := append([]float64(nil), x...)
	sort.Float64s(y)
	return y[len(y)-1]
}

// TestRollOffAccuracy fits the 24 accuracy scenarios (randomScenario: the
// same cars, sensors, 2 % noise, offsets and rates) twice, dropped at once
// and rolled off the blocks with a rear delay of 0.2-0.8 s
// (rollOffScenario), and compares the pitch-like mode (labelled pitch by the
// model, compare.Vehicle.DampedModes, the truth) between the two. The
// rolled-off fits must find both modes, meet the coverage asked of the
// simultaneous ones (TestAccuracyOnSimulatedDrops) and shrink the pitch
// mode's median sigmas by minSigmaShrink. The log gives the figures.
func TestRollOffAccuracy(t *testing.T) {
	var at, rolled pitchStats
	var lines []string
	within, total := 0, 0
	for seed := uint64(1); seed <= accuracyCases; seed++ {
		rate := accuracyRatesHz[seed%uint64(len(accuracyRatesHz))]
		s0, s1 := randomScenario(seed, rate), rollOffScenario(seed, rate)
		truth := s0.truth(t)
		p := 0
		if truth[1].Label == "pitch" {
			p = 1
		}
		e0, r0 := runCase(t, s0)
		e1, r1 := runCase(t, s1)
		at.add(e0, r0, p)
		rolled.add(e1, r1, p)
		lines = append(lines, fmt.Sprintf("seed %2d %4g Hz rear +%.3f s pitch %.3f Hz zeta %.3f: share %.2f -> %.2f, "+
			"df %+.4f (sd %.4f) -> %+.4f (sd %.4f), dzeta %+.4f (sd %.4f) -> %+.4f (sd %.4f)", seed, rate,
			s1.opt.RearDelayS, truth[p].NaturalFrequencyHz, truth[p].DampingRatio, e0[p].share, e1[p].share,
			e0[p].freqRel, at.freqSig[seed-1], e1[p].freqRel, rolled.freqSig[seed-1], e0[p].zetaAbs,
			at.zetaSig[seed-1], e1[p].zetaAbs, rolled.zetaSig[seed-1]))
		for i, e := range e1 {
			md := r1.Modes[i]
			for k, z := range []float64{e.zFreq, e.zZeta, e.zPPB} {
				total++
				if math.Abs(z) <= coverageSigmas {
					within++
				}
				if math.Abs(z) > maxZ {
					t.Errorf("seed %d %s rolled off: an error of %.1f sigma (quantity %d)", seed, e.label, z, k)
				}
			}
			if determined(md.SD.NaturalFrequencyHz/md.NaturalFrequencyHz, aimFreqRel) && math.Abs(e.freqRel) > aimFreqRel {
				t.Errorf("seed %d %s rolled off: frequency determined but off by %.4f", seed, e.label, e.freqRel)
			}
			if determined(md.SD.DampingRatio, aimZetaAbs) && math.Abs(e.zetaAbs) > aimZetaAbs {
				t.Errorf("seed %d %s rolled off: damping ratio determined but off by %.4f", seed, e.label, e.zetaAbs)
			}
		}
	}
	t.Logf("pitch mode, dropped at once -> rolled off:\n%s", strings.Join(lines, "\n"))
	row := func(name string, a, b []float64) string {
		return fmt.Sprintf("%-22s median %.4f -> %.4f (%.1f times smaller), RMS %.4f -> %.4f, worst %.4f -> %.4f",
			name, medianOf(a), medianOf(b), medianOf(a)/medianOf(b), rmsOf(a), rmsOf(b), maxOf(a), maxOf(b))
	}
	t.Logf("pitch mode's share of the channel peak: median %.2f -> %.2f; under %.2f in %d -> %d of %d cars",
		medianOf(at.share), medianOf(rolled.share), wellExcitedShare, at.weak(), rolled.weak(), accuracyCases)
	t.Logf("pitch mode over %d cars:\n%s\n%s\n%s\n%s", accuracyCases,
		row("|df|/f", at.freqErr, rolled.freqErr), row("sigma_f/f", at.freqSig, rolled.freqSig),
		row("|dzeta|", at.zetaErr, rolled.zetaErr), row("sigma_zeta", at.zetaSig, rolled.zetaSig))
	cov := float64(within) / float64(total)
	t.Logf("rolled off, both modes: %.3f of %d errors (frequency, damping ratio, pitch per bounce) within 2 sigma",
		cov, total)
	if cov < minCoverage {
		t.Errorf("rolled off: only %.2f of the errors lie within 2 sigma, want at least %.2f", cov, minCoverage)
	}
	for _, c := range []struct {
		name string
		a, b []float64
	}{{"frequency", at.freqSig, rolled.freqSig}, {"damping ratio", at.zetaSig, rolled.zetaSig}} {
		if medianOf(c.b)*minSigmaShrink > medianOf(c.a) {
			t.Errorf("pitch %s: median sigma %.4f rolled off against %.4f at once; want %g times smaller", c.name,
				medianOf(c.b), medianOf(c.a), float64(minSigmaShrink))
		}
	}
}
