package decay

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// Accuracy aims of the brief, asked of every mode the drop excites well, and
// the coverage asked of the standard deviations.
const (
	aimFreqRel = 0.01 // natural frequency, relative
	aimZetaAbs = 0.02 // damping ratio, absolute
	// aimNodeRel: node within 10 % when it lies within a wheelbase of the CG;
	// a farther node (a nearly pure bounce) is judged by its pitch per bounce,
	// which must lie within aimNodeRel/L rad/m (L the wheelbase).
	aimNodeRel = 0.10
	// wellExcitedShare: a mode is well excited when its initial amplitude at
	// its best sensor is at least this share of that channel's peak (12.5
	// noise sd at 2 % noise).
	wellExcitedShare = 0.25
	coverageSigmas   = 2
	// minCoverage: "most errors within 2 sigma"; Gaussian errors would give
	// 0.95.
	minCoverage = 0.8
	// maxZ: no error of frequency, damping ratio or pitch per bounce of any
	// mode, however weakly excited, beyond this many of its own standard
	// deviations.
	maxZ          = 4
	accuracyCases = 24
	// noiseFreeTol: on a noise-free log the fit must reproduce the model's
	// poles and shapes to rounding (the decimator's FIR is linear and keeps
	// the poles of a free decay exactly).
	noiseFreeTol = 1e-9
)

var accuracyRatesHz = []float64{100, 200, 500, 1000}

// modeError is one fitted mode set beside the truth of its scenario.
type modeError struct {
	seed                      uint64
	rateHz                    float64
	label                     string
	share                     float64
	freqRel, zetaAbs, ppbAbs  float64   // errors
	nodeRel                   float64   // NaN when the true node is beyond a wheelbase
	zFreq, zZeta, zPPB, zNode float64   // errors over sigmas (zNode NaN when the node is undetermined)
	zShape                    []float64 // of the shape at each sensor, real and imaginary parts
	wheelbaseM                float64
}

// runCase fits one scenario and compares both modes with the model's
// damped modes (compare.Vehicle.DampedModes): the truth.
func runCase(t testing.TB, s scenario) ([]modeError, *Result) {
	t.Helper()
	ch, pos := s.log(t)
	res, err := Fit(s.opt.RateHz, ch, pos, Options{})
	if err != nil {
		t.Fatalf("seed %d at %g Hz: %v", s.opt.Seed, s.opt.RateHz, err)
	}
	if len(res.Modes) != 2 || res.Modes[0].Label == res.Modes[1].Label {
		t.Fatalf("seed %d: want bounce and pitch, got %+v", s.opt.Seed, res.Modes)
	}
	truth := s.truth(t)
	peaks := make([]float64, len(ch))
	for c, x := range ch {
		for _, v := range x {
			peaks[c] = math.Max(peaks[c], math.Abs(v-x[0]))
		}
	}
	share := s.modeShare(t, peaks)
	var out []modeError
	for i, md := range res.Modes {
		tr := truth[i]
		e := modeError{seed: s.opt.Seed, rateHz: s.opt.RateHz, label: md.Label, share: share[i],
			freqRel:    md.NaturalFrequencyHz/tr.NaturalFrequencyHz - 1,
			zetaAbs:    md.DampingRatio - tr.DampingRatio,
			ppbAbs:     md.PitchPerBounceRadPerM - tr.PitchPerBounceRadPerM,
			nodeRel:    math.NaN(),
			wheelbaseM: s.car.WheelbaseM()}
		e.zFreq = (md.NaturalFrequencyHz - tr.NaturalFrequencyHz) / md.SD.NaturalFrequencyHz
		e.zZeta = e.zetaAbs / md.SD.DampingRatio
		e.zPPB = e.ppbAbs / md.SD.PitchPerBounceRadPerM
		e.zNode = (md.NodeM - tr.NodeM) / md.SD.NodeM
		for k, w := range md.Shape {
			d := w - tr.ShapeAt(pos[k]) // both scaled to z = 1
			e.zShape = append(e.zShape, real(d)/md.SD.ShapeRe[k], imag(d)/md.SD.ShapeIm[k])
		}
		if math.Abs(tr.NodeM) <= e.wheelbaseM {
			e.nodeRel = md.NodeM/tr.NodeM - 1
		}
		if md.Label != tr.Label && share[0] >= wellExcitedShare && share[1] >= wellExcitedShare {
			t.Errorf("seed %d: mode %d labelled %s, the model says %s", s.opt.Seed, i, md.Label, tr.Label)
		}
		out = append(out, e)
	}
	return out, res
}

// determined reports whether a stated sigma is small enough for an aim:
// three sigma inside it.
func determined(sigma, aim float64) bool { return 3*sigma <= aim }

// TestAccuracyOnSimulatedDrops fits 24 seeded simulated drops (invented cars
// from randomScenario: damping ratios 0.1-0.4, modes 15-40 % apart, sensors
// inboard of the axles, 2 % noise, common and per-channel DC offsets, 100 to
// 1000 Hz, default options) and checks against the model's modes
// (compare.Vehicle.DampedModes):
//   - both modes found in every case (two distinct physical poles in the band);
//   - the stated sigmas cover the errors: most within 2 sigma, none beyond
//     maxZ (nodes without a sigma, undetermined, are counted apart);
//   - every value whose own sigma says it is determined to its aim (3 sigma
//     inside it) meets the aim;
//   - the labels agree with the model when both modes are well excited.
//
// The log shows each mode's errors, and how many meet the aims.
func TestAccuracyOnSimulatedDrops(t *testing.T) {
	var all []modeError
	var results []*Result
	for seed := uint64(1); seed <= accuracyCases; seed++ {
		es, res := runCase(t, randomScenario(seed, accuracyRatesHz[seed%uint64(len(accuracyRatesHz))]))
		all = append(all, es...)
		results = append(results, res, res)
	}
	var worst [2][3]float64 // [well excited?][frequency, damping, node]
	var meet, det [3]int
	within, total, undetermined := 0, 0, 0
	var lines []string
	for n, e := range all {
		md := results[n].Modes[n%2]
		lines = append(lines, fmt.Sprintf("seed %2d %4g Hz %-6s share %.2f  df %+.4f dzeta %+.4f dppb %+.4f "+
			"dnode %+.3f  z %+.1f %+.1f %+.1f %+.1f", e.seed, e.rateHz, e.label, e.share, e.freqRel, e.zetaAbs,
			e.ppbAbs, e.nodeRel, e.zFreq, e.zZeta, e.zPPB, e.zNode))
		for k, z := range []float64{e.zFreq, e.zZeta, e.zPPB, e.zNode} {
			if k == 3 && math.IsNaN(md.SD.NodeM) {
				undetermined++
				continue
			}
			total++
			if math.Abs(z) <= coverageSigmas {
				within++
			}
			// The node is 1/(pitch per bounce): its linearised sigma is only
			// a guide, so the bound applies to the other three.
			if k < 3 && math.Abs(z) > maxZ {
				t.Errorf("seed %d %s: an error of %.1f sigma (quantity %d)", e.seed, e.label, z, k)
			}
		}
		nodeErr, nodeSig := math.Abs(e.ppbAbs)*e.wheelbaseM, md.SD.PitchPerBounceRadPerM*e.wheelbaseM
		if !math.IsNaN(e.nodeRel) {
			nodeErr, nodeSig = math.Abs(e.nodeRel), md.SD.NodeM/math.Abs(md.NodeM)
		}
		errs := [3]float64{math.Abs(e.freqRel), math.Abs(e.zetaAbs), nodeErr}
		sigs := [3]float64{md.SD.NaturalFrequencyHz / md.NaturalFrequencyHz, md.SD.DampingRatio, nodeSig}
		aims := [3]float64{aimFreqRel, aimZetaAbs, aimNodeRel}
		well := 0
		if e.share >= wellExcitedShare {
			well = 1
		}
		for k := range errs {
			worst[well][k] = math.Max(worst[well][k], errs[k])
			if errs[k] <= aims[k] {
				meet[k]++
			}
			if determined(sigs[k], aims[k]) {
				det[k]++
				if errs[k] > aims[k] {
					t.Errorf("seed %d %s: quantity %d determined to %.3g (1 sigma) but off by %.3g, aim %.3g",
						e.seed, e.label, k, sigs[k], errs[k], aims[k])
				}
			}
		}
	}
	cov := float64(within) / float64(total)
	t.Logf("per mode:\n%s", strings.Join(lines, "\n"))
	t.Logf("%d modes: within the aims (frequency, damping, node) %d, %d, %d; determined to the aims by their own "+
		"sigma %d, %d, %d", len(all), meet[0], meet[1], meet[2], det[0], det[1], det[2])
	t.Logf("worst errors, modes excited at %.2f of the peak or more: |df| %.4f, |dzeta| %.4f, node %.3f; "+
		"weaker modes: %.4f, %.4f, %.3f (node: relative within a wheelbase, else |dppb|*L)", wellExcitedShare,
		worst[1][0], worst[1][1], worst[1][2], worst[0][0], worst[0][1], worst[0][2])
	t.Logf("coverage: %.3f of %d errors within 2 sigma (%d undetermined nodes left out)", cov, total, undetermined)
	if cov < minCoverage {
		t.Errorf("only %.2f of the errors lie within 2 sigma, want at least %.2f", cov, minCoverage)
	}
}

// TestNoiseFreeDropIsExact: without noise the fit must return the model's
// poles and pitch per bounce to rounding, with and without decimation (a
// physical check: the simulated decay is an exact sum of the model's modes).
func TestNoiseFreeDropIsExact(t *testing.T) {
	for _, rate := range []float64{100, 1000} {
		s := randomScenario(22, rate)
		s.opt.NoiseFraction = 0
		ch, pos := s.log(t)
		res, err := Fit(rate, ch, pos, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for i, tr := range s.truth(t) {
			md := res.Modes[i]
			if d := math.Abs(md.NaturalFrequencyHz/tr.NaturalFrequencyHz - 1); d > noiseFreeTol {
				t.Errorf("%g Hz %s: frequency off by %g", rate, md.Label, d)
			}
			if d := math.Abs(md.DampingRatio - tr.DampingRatio); d > noiseFreeTol {
				t.Errorf("%g Hz %s: damping ratio off by %g", rate, md.Label, d)
			}
			if d := math.Abs(md.PitchPerBounceRadPerM - tr.PitchPerBounceRadPerM); d > noiseFreeTol {
				t.Errorf("%g Hz %s: pitch per bounce off by %g", rate, md.Label, d)
			}
			if md.Label != tr.Label {
				t.Errorf("%g Hz: label %s, the model says %s", rate, md.Label, tr.Label)
			}
		}
		if res.NormalisedResidual > noiseFreeTol {
			t.Errorf("%g Hz: normalised residual %g on a noise-free log", rate, res.NormalisedResidual)
		}
	}
}

// Monte Carlo settings.
const (
	mcRuns = 40
	// mcMinCoverage: of mcRuns Gaussian errors, 95 % fall within 2 sigma;
	// 0.85 leaves room for sampling (binomial sd 0.034 at 40 runs).
	mcMinCoverage = 0.85
)

// TestSigmaCoverageMonteCarlo repeats one well-excited car (scenario 22)
// with 40 noise seeds, without and with decimation, and asks that the stated
// sigmas of natural frequency, damping ratio, pitch per bounce, node and the
// shape at the sensors cover the errors against the model's modes as
// Gaussian sigmas would.
func TestSigmaCoverageMonteCarlo(t *testing.T) {
	for _, rate := range []float64{200, 1000} {
		base := randomScenario(22, rate)
		var n [2][4]int
		var sumSq, sumSig [2][4]float64
		var shapeIn, shapeAll [2]int
		for run := 0; run < mcRuns; run++ {
			s := base
			s.opt.Seed = 1000 + uint64(run)
			es, res := runCase(t, s)
			for i, e := range es {
				for _, z := range e.zShape {
					shapeAll[i]++
					if math.Abs(z) <= coverageSigmas {
						shapeIn[i]++
					}
				}
				sig := res.Modes[i].SD
				errs := [4]float64{e.zFreq * sig.NaturalFrequencyHz, e.zetaAbs, e.ppbAbs, e.zNode * sig.NodeM}
				sigs := [4]float64{sig.NaturalFrequencyHz, sig.DampingRatio, sig.PitchPerBounceRadPerM, sig.NodeM}
				for k, z := range []float64{e.zFreq, e.zZeta, e.zPPB, e.zNode} {
					if math.Abs(z) <= coverageSigmas {
						n[i][k]++
					}
					sumSq[i][k] += errs[k] * errs[k]
					sumSig[i][k] += sigs[k]
				}
			}
		}
		for i := range n {
			cov := float64(shapeIn[i]) / float64(shapeAll[i])
			t.Logf("%g Hz mode %d %-16s: within 2 sigma %.3f (%d values)", rate, i, "shape", cov, shapeAll[i])
			if cov < mcMinCoverage {
				t.Errorf("%g Hz mode %d shape: only %.2f of the errors within 2 sigma", rate, i, cov)
			}
			for k, name := range []string{"frequency", "damping ratio", "pitch per bounce", "node"} {
				cov := float64(n[i][k]) / mcRuns
				t.Logf("%g Hz mode %d %-16s: within 2 sigma %.3f; RMS error / mean sigma %.2f", rate, i, name, cov,
					math.Sqrt(sumSq[i][k]/mcRuns)/(sumSig[i][k]/mcRuns))
				if cov < mcMinCoverage {
					t.Errorf("%g Hz mode %d %s: only %.2f of the errors within 2 sigma", rate, i, name, cov)
				}
			}
		}
	}
}

// TestFitErrors checks the data errors a caller can match.
func TestFitErrors(t *testing.T) {
	s := randomScenario(22, 200)
	ch, pos := s.log(t)
	if _, err := Fit(200, ch, pos, Options{Event: 1}); !errors.As(err, new(*EventRangeError)) {
		t.Errorf("event 1 of 1: got %v", err)
	}
	bad := [][]float64{append([]float64(nil), ch[0]...), ch[1]}
	bad[0][500] = math.NaN()
	if _, err := Fit(200, bad, pos[:2], Options{}); !errors.Is(err, ErrNonFinite) {
		t.Errorf("NaN sample: got %v", err)
	}
	// A settling time that eats the whole decay leaves too little to fit.
	if _, err := Fit(200, ch, pos, Options{SettleS: 3}); !errors.Is(err, ErrShortDecay) {
		t.Errorf("long settling: got %v", err)
	}
}

// TestCallerMistakesPanic: one sensor, positions that do not match, sensors
// at one position.
func TestCallerMistakesPanic(t *testing.T) {
	s := randomScenario(22, 200)
	ch, pos := s.log(t)
	for name, f := range map[string]func(){
		"one channel":   func() { Fit(200, ch[:1], pos[:1], Options{}) },
		"positions":     func() { Fit(200, ch, pos[:1], Options{}) },
		"same position": func() { Fit(200, ch[:2], []float64{0.5, 0.5}, Options{}) },
		"odd order":     func() { Fit(200, ch, pos, Options{MaxOrder: 5}) },
	} {
		func() {
			defer func() {
				r := recover()
				if msg, ok := r.(string); !ok || !strings.HasPrefix(msg, "decay: ") {
					t.Errorf("%s: want a decay: panic, got %v", name, r)
				}
			}()
			f()
		}()
	}
}

// BenchmarkFit times the whole fit (detection, decimation, ERA sweep, refinement)
// of a 10 s drop log at 1000 Hz (scenario 22).
func BenchmarkFit(b *testing.B) {
	s := randomScenario(22, 1000)
	ch, pos := s.log(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Fit(1000, ch, pos, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
