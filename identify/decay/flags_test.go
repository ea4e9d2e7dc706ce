package decay

import (
	"errors"
	"flag"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// flagWithin is how many of its stated sd a value that is not flagged may
// lie from the truth (the issue's acceptance: flagged, or within 3 sd).
const flagWithin = 3

// exampleCar reads an invented car's setup (the examples of testdata/ and
// the demo) and returns its design model and sensors.
func exampleCar(t *testing.T, path string) (compare.Vehicle, []ingest.Sensor) {
	t.Helper()
	s, err := ingest.LoadSetup(path)
	if err != nil {
		t.Fatal(err)
	}
	return compare.DesignOf(s.Vehicle), s.Sensors
}

// dropFit simulates a drop of car (compare/simulate: exact, the truth is the
// model) with the given noise, rear delay and seed at the defaults of
// simulate (200 Hz, 10 s, 0.04 m blocks) and fits it with opt.
func dropFit(t *testing.T, car compare.Vehicle, sensors []ingest.Sensor, noise, delayS float64, seed uint64,
	opt Options) (*Result, error) {
	t.Helper()
	o := simulate.Defaults("drop")
	o.NoiseFraction, o.RearDelayS, o.Seed = noise, delayS, seed
	lg, err := simulate.Drop(car, sensors, o)
	if err != nil {
		t.Fatal(err)
	}
	var ch [][]float64
	for _, c := range lg.Columns {
		ch = append(ch, c.Data)
	}
	return Fit(o.RateHz, ch, ingest.SensorPositionsM(sensors), opt)
}

// unsupported returns a description of each mode of res that is neither
// flagged nor within flagWithin sd of the truth (by label) in natural
// frequency and damping ratio.
func unsupported(t *testing.T, car compare.Vehicle, res *Result) []string {
	t.Helper()
	truth, err := car.DampedModes()
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, m := range res.Modes {
		for _, tr := range truth {
			if tr.Label != m.Label || m.Flagged {
				continue
			}
			zf := (m.NaturalFrequencyHz - tr.NaturalFrequencyHz) / m.SD.NaturalFrequencyHz
			zz := (m.DampingRatio - tr.DampingRatio) / m.SD.DampingRatio
			if !(math.Abs(zf) <= flagWithin && math.Abs(zz) <= flagWithin) {
				out = append(out, fmt.Sprintf("%s %.3f ± %.3f Hz (truth %.3f, %.1f sd), zeta %.3f ± %.3f (truth %.3f, %.1f sd)",
					m.Label, m.NaturalFrequencyHz, m.SD.NaturalFrequencyHz, tr.NaturalFrequencyHz, zf,
					m.DampingRatio, m.SD.DampingRatio, tr.DampingRatio, zz))
			}
		}
	}
	return out
}

// TestIssueDropExamples: the drops of the issue, on the example hatchback
// (testdata/example/hatchback.toml) at 5 % noise, rolled off the blocks
// with the rear 0.3 s after the front and dropped at once, seeds 1-5 (the
// issue's 2.41 +- 0.04 Hz pitch against a true 1.47 Hz, and a plain drop's
// pitch 58 % high with a passing check): every mode ends flagged or within
// 3 sd of the truth, or the fit is refused with a message that says what
// to do. The plain drop's seed 1 is the issue's +58 % pitch, now flagged.
func TestIssueDropExamples(t *testing.T) {
	car, sensors := exampleCar(t, "../../testdata/example/hatchback.toml")
	for _, delayS := range []float64{0.3, 0} {
		for seed := uint64(1); seed <= 5; seed++ {
			res, err := dropFit(t, car, sensors, 0.05, delayS, seed, Options{})
			if err != nil {
				if !errors.Is(err, ErrTooFewModes) && !errors.Is(err, ErrShortDecay) ||
					!strings.Contains(err.Error(), "drop from higher blocks") {
					t.Errorf("rear delay %g s, seed %d: refused without advice: %v", delayS, seed, err)
				}
				continue
			}
			for _, u := range unsupported(t, car, res) {
				t.Errorf("rear delay %g s, seed %d: unflagged and off: %s", delayS, seed, u)
			}
			if delayS == 0 && seed == 1 {
				if p := res.Modes[1]; p.Label != "pitch" || p.NaturalFrequencyHz < 2 || !p.Flagged {
					t.Errorf("the issue's plain drop: pitch %+v, want the 2.3 Hz pitch flagged", p)
				}
			}
		}
	}
}

// TestMissedStepIsFlagged: the issue's rolled-off drop whose rear step the
// former detector (a step threshold of 8 sd, DefaultThresholdK) missed
// (seed 2): with that threshold the step is missed again and the fit, which
// then spans the step, is flagged on its residual; the default step
// threshold finds the step.
func TestMissedStepIsFlagged(t *testing.T) {
	car, sensors := exampleCar(t, "../../testdata/example/hatchback.toml")
	old, err := dropFit(t, car, sensors, 0.05, 0.3, 2, Options{Detect: DetectOptions{StepThresholdK: DefaultThresholdK}})
	if err != nil {
		t.Fatal(err)
	}
	if len(old.Event.Steps) != 1 {
		t.Fatalf("steps %v at 8 sd: the case no longer misses the rear step", old.Event.Steps)
	}
	for _, m := range old.Modes {
		if !m.Flagged || !strings.Contains(strings.Join(m.FlagReasons, " "), "residual") {
			t.Errorf("missed step: %s %.3f Hz flagged %v %q, want flagged on the residual", m.Label,
				m.NaturalFrequencyHz, m.Flagged, m.FlagReasons)
		}
	}
	t.Logf("missed step: residual over noise %.2f, %.2f", old.Support.ResidualOverNoise[0], old.Support.ResidualOverNoise[1])
	now, err := dropFit(t, car, sensors, 0.05, 0.3, 2, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(now.Event.Steps) != 2 {
		t.Errorf("default step threshold: steps %v, want the release and the rear step", now.Event.Steps)
	}
}

// TestDropFlagShareAtTwoPercent: at 2 % noise the flags stay rare where the
// drop can resolve the modes: the demo's built car (cmd/cli/demo/built.toml,
// invented; bounce 1.24 Hz, pitch 1.54 Hz, damping ratios 0.23 and 0.26),
// dropped at once and rolled off 0.3 s apart, seeds 1-5: at most
// maxFlagShare of the modes flagged (0 of 80 on seeds 1-20 when measured),
// and none off by more than 3 sd unflagged.
func TestDropFlagShareAtTwoPercent(t *testing.T) {
	const maxFlagShare = 0.1
	car, sensors := exampleCar(t, "../../cmd/cli/demo/built.toml")
	flagged, total := 0, 0
	for _, delayS := range []float64{0, 0.3} {
		for seed := uint64(1); seed <= 5; seed++ {
			res, err := dropFit(t, car, sensors, 0.02, delayS, seed, Options{})
			if err != nil {
				t.Fatalf("rear delay %g s, seed %d: %v", delayS, seed, err)
			}
			for _, m := range res.Modes {
				total++
				if m.Flagged {
					flagged++
					t.Logf("rear delay %g s, seed %d: %s flagged: %q", delayS, seed, m.Label, m.FlagReasons)
				}
			}
			for _, u := range unsupported(t, car, res) {
				t.Errorf("rear delay %g s, seed %d: unflagged and off: %s", delayS, seed, u)
			}
		}
	}
	if share := float64(flagged) / float64(total); share > maxFlagShare {
		t.Errorf("%d of %d modes flagged at 2 %% noise, want at most %.0f %%", flagged, total, 100*maxFlagShare)
	}
}

// TestDropFlagRulesAtThresholds checks the drop route's own rules just
// inside and just beyond their thresholds on a hand-made fit whose modes
// the common rules leave alone.
func TestDropFlagRulesAtThresholds(t *testing.T) {
	opt := Options{}.withDefaults()
	for _, c := range []struct {
		name    string
		s       Support
		flagged [2]bool
		word    string
	}{
		{"clean", Support{ResidualOverNoise: []float64{1.1, 1.0}}, [2]bool{false, false}, ""},
		{"residual 1.29 noise", Support{ResidualOverNoise: []float64{1.0, 1.29}}, [2]bool{false, false}, ""},
		{"residual 1.31 noise", Support{ResidualOverNoise: []float64{1.0, 1.31}}, [2]bool{true, true}, "residual"},
		{"late jump 4.9 sd", Support{ResidualOverNoise: []float64{1, 1}, LargestJumpS: 1.3, LargestJumpSDs: 4.9},
			[2]bool{false, false}, ""},
		{"late jump 5.1 sd", Support{ResidualOverNoise: []float64{1, 1}, LargestJumpS: 1.3, LargestJumpSDs: 5.1},
			[2]bool{true, true}, "jump of 5.1 noise sd at 1.300 s"},
		{"pitch 5.1 sd at the start", Support{ResidualOverNoise: []float64{1, 1},
			Modes: []ModeSupport{{StartSNR: 40}, {StartSNR: 5.1}}}, [2]bool{false, false}, ""},
		{"pitch 4.9 sd at the start", Support{ResidualOverNoise: []float64{1, 1},
			Modes: []ModeSupport{{StartSNR: 40}, {StartSNR: 4.9}}}, [2]bool{false, true}, "excites this mode weakly"},
	} {
		if c.s.Modes == nil {
			c.s.Modes = []ModeSupport{{StartSNR: 40}, {StartSNR: 30}}
		}
		res := &Result{Support: c.s, Modes: []body.Mode{
			{Label: "bounce", NaturalFrequencyHz: 1.24, DampingRatio: 0.29, PitchPerBounceRadPerM: -0.40,
				SD: body.SD{NaturalFrequencyHz: 0.01, DampingRatio: 0.01, PitchPerBounceRadPerM: 0.02}},
			{Label: "pitch", NaturalFrequencyHz: 1.47, DampingRatio: 0.34, PitchPerBounceRadPerM: 1.79,
				SD: body.SD{NaturalFrequencyHz: 0.02, DampingRatio: 0.02, PitchPerBounceRadPerM: 0.2}}}}
		flagModes(res, []float64{0.85, -1.30}, opt)
		for i, m := range res.Modes {
			if m.Flagged != c.flagged[i] {
				t.Errorf("%s: %s flagged %v %q, want %v", c.name, m.Label, m.Flagged, m.FlagReasons, c.flagged[i])
			}
			if m.Flagged && !strings.Contains(strings.Join(m.FlagReasons, " "), c.word) {
				t.Errorf("%s: %s reasons %q do not name %q", c.name, m.Label, m.FlagReasons, c.word)
			}
		}
	}
}

// TestLargestLateJump: on a hand-made event (noise sd 1, release at sample
// 10, a free "decay" that is zero), a jump of 5.5 sqrt(5) after the release
// reads as 5.5 noise sd of the jump measure at its sample (jumpAt returns J
// for a step of J); beside a release 40 times that size it falls under
// possibleStepShare of the largest jump and is not counted.
func TestLargestLateJump(t *testing.T) {
	const rateHz = 100
	j := 5.5 * math.Sqrt(5)
	for _, c := range []struct {
		release float64
		wantSDs float64
	}{{100, 5.5}, {40 * j, 0}} {
		x := make([]float64, 200)
		for i := range x {
			if i >= 10 {
				x[i] = c.release
			}
			if i >= 120 {
				x[i] += j
			}
		}
		ev := Event{ReleaseIndex: 10, Steps: []int{10}, RestIndex: 190, NoiseSD: []float64{1}}
		atS, sds := largestLateJump([][]float64{x}, ev, rateHz)
		if math.Abs(sds-c.wantSDs) > 1e-9 || (c.wantSDs > 0 && atS != 1.2) {
			t.Errorf("release %g: largest late jump %.3f sd at %.3f s, want %.3f sd at 1.2 s", c.release, sds, atS, c.wantSDs)
		}
	}
}

// flagSweepSeeds sets how many seeds TestDropFlagSweep runs per car, noise
// and kind of drop; 0 (the default) skips it: go test ./identify/decay -run
// DropFlagSweep -decay.flagsweep 20 -v (about 30 s on two cores).
var flagSweepSeeds = flag.Int("decay.flagsweep", 0, "seeds per case of TestDropFlagSweep (0 skips it)")

// TestDropFlagSweep measures the flags of the drop route on the three
// example cars and the first six accuracy scenarios' cars (randomScenario,
// 200 Hz), at 2 % and 5 % noise, dropped at once and rolled off 0.3 s
// apart: per noise and kind, the share of modes flagged, the fits refused,
// and the unflagged modes off by more than 3 sd in natural frequency or
// damping ratio, which must stay at the rate that chance alone gives a
// calibrated sd (0.27 % per value, two values per mode): at most
// maxOffShare of the modes. The share flagged at 2 % is logged per car.
func TestDropFlagSweep(t *testing.T) {
	const maxOffShare = 0.01
	if *flagSweepSeeds == 0 {
		t.Skip("a sweep: run with -decay.flagsweep N")
	}
	type car struct {
		name    string
		v       compare.Vehicle
		sensors []ingest.Sensor
	}
	var cars []car
	for _, path := range []string{"../../testdata/example/hatchback.toml", "../../testdata/example/coupe-springs.toml",
		"../../cmd/cli/demo/built.toml"} {
		v, s := exampleCar(t, path)
		cars = append(cars, car{path[strings.LastIndex(path, "/")+1:], v, s})
	}
	for seed := uint64(1); seed <= 6; seed++ {
		s := randomScenario(seed, 200)
		cars = append(cars, car{fmt.Sprintf("scenario %d", seed), s.car, s.sensors})
	}
	for _, noise := range []float64{0.02, 0.05} {
		for _, delayS := range []float64{0, 0.3} {
			modes, flagged, off, refused := 0, 0, 0, 0
			for _, c := range cars {
				carModes, carFlagged := 0, 0
				for seed := uint64(1); seed <= uint64(*flagSweepSeeds); seed++ {
					res, err := dropFit(t, c.v, c.sensors, noise, delayS, seed, Options{})
					if err != nil {
						refused++
						continue
					}
					for _, m := range res.Modes {
						carModes++
						if m.Flagged {
							carFlagged++
						}
					}
					for _, u := range unsupported(t, c.v, res) {
						off++
						t.Logf("%s, noise %g, rear delay %g s, seed %d: unflagged and off: %s", c.name, noise, delayS, seed, u)
					}
				}
				modes, flagged = modes+carModes, flagged+carFlagged
				if noise == 0.02 {
					t.Logf("  %s, rear delay %g s: %d of %d modes flagged", c.name, delayS, carFlagged, carModes)
				}
			}
			t.Logf("noise %g, rear delay %g s: %d modes, %d flagged (%.0f %%), %d unflagged beyond 3 sd, %d fits refused",
				noise, delayS, modes, flagged, 100*float64(flagged)/float64(max(modes, 1)), off, refused)
			if float64(off) > maxOffShare*float64(modes) {
				t.Errorf("noise %g, rear delay %g s: %d of %d modes unflagged beyond 3 sd", noise, delayS, off, modes)
			}
		}
	}
}
