package identify

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// Accuracy targets of the rig route (issue 5), checked on seeded simulated
// logs with known truth (compare/simulate is exact): natural frequency within
// 0.5 %, damping ratio within 0.015 absolute, node within 5 %, and most
// errors within two reported standard deviations.
//
// The 0.5 % frequency target holds where the README promises it: damping
// ratios up to heavyDampingZeta, or logs of at least longLogS. Beyond that
// (heavily damped, close modes on a 5-minute log) the information in the
// record does not pin a frequency to 0.5 %: the stated sd there is
// 0.3-0.4 %, so the frequency must lie within honestSDs stated sd of the
// truth, and within freqTolHeavyRel.
const (
	freqTolRel       = 0.005
	heavyDampingZeta = 0.3
	longLogS         = 600
	honestSDs        = 3
	freqTolHeavyRel  = 0.01
	dampingTolAbs    = 0.015
	nodeTolRel       = 0.05
	minCoverage2Sig  = 0.85 // share of errors within 2 sd (0.954 for exact Gaussian sds)
	// nodeRealShapeDeg: the node is a property of a real shape; it is checked
	// where the true theta/z is within 30 degrees of real (as identify/modal's
	// own accuracy test does), elsewhere 1/Re(theta/z) is ill-conditioned.
	nodeRealShapeDeg = 30
	// nodeFarWheelbases: a node more than two wheelbases from the CG belongs to
	// a nearly pure heave shape, where the node's relative error grows with
	// its distance; there pitch per bounce is checked instead, within
	// ppbTolPerM (5 % of 1/L for a 2.7 m wheelbase).
	nodeFarWheelbases = 2
	// nodeFloorWheelbases: the node's error is taken relative to its distance
	// from the CG, or to this share of the wheelbase when the node is nearer.
	nodeFloorWheelbases = 0.25
	ppbTolPerM          = 0.0185
)

type rigCase struct {
	v        compare.Vehicle
	sensors  []ingest.Sensor
	inputs   []ingest.Input
	opt      simulate.Options
	truth    []compare.Mode
	sepRatio float64
}

// drawRigCase draws an invented vehicle whose damped modes have damping ratios
// in [zLo, zHi] and lie 15 % to 40 % apart, with sensors away from the axles.
func drawRigCase(rng *rand.Rand, zLo, zHi float64) rigCase {
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	for {
		m := u(1000, 2000)
		v := compare.Vehicle{MassKg: m, PitchInertiaKgm2: u(1200, 3000), CGToFrontM: u(1.0, 1.7), CGToRearM: u(1.0, 1.7),
			FrontRateNPerM: u(25e3, 60e3), RearRateNPerM: u(25e3, 60e3)}
		z := u(zLo, zHi)
		// Dampers proportional to the rates give modal damping ratios near z.
		wRef := 2 * math.Pi * 1.3
		v.FrontDampingNsPerM = 2 * z * v.FrontRateNPerM / wRef
		v.RearDampingNsPerM = 2 * z * v.RearRateNPerM / wRef
		ms, err := v.DampedModes()
		if err != nil {
			continue
		}
		sep := ms[1].NaturalFrequencyHz/ms[0].NaturalFrequencyHz - 1
		if sep < 0.15 || sep > 0.40 || ms[0].DampingRatio < 0.05 || ms[1].DampingRatio > 0.40 ||
			ms[0].NaturalFrequencyHz < 0.8 || ms[1].NaturalFrequencyHz > 2.6 {
			continue
		}
		a, b := v.CGToFrontM, v.CGToRearM
		sensors := []ingest.Sensor{{Channel: "body_f", XM: a - u(0.15, 0.4)}, {Channel: "body_r", XM: -b + u(0.15, 0.4)}}
		if rng.IntN(2) == 0 {
			sensors = append(sensors, ingest.Sensor{Channel: "body_mid", XM: u(-0.3, 0.3)})
		}
		o := simulate.Defaults("rig")
		o.Seed = rng.Uint64()
		o.DurationS = []float64{300, 450, 600}[rng.IntN(3)]
		o.RateHz = []float64{100, 200, 256}[rng.IntN(3)]
		o.NoiseFraction = 0.05
		o.Units = simulate.UnitsMixed
		return rigCase{v: v, sensors: sensors, opt: o, truth: ms, sepRatio: sep,
			inputs: []ingest.Input{{Channel: "pan_f", Axle: "front"}, {Channel: "pan_r", Axle: "rear"}}}
	}
}

// runRig takes a case through the whole route as analyze does: simulate, the
// CSV text, the streaming reader, the FRF stage with its automatic choices,
// and the fit (fitRig); an error fails the test.
func runRig(t *testing.T, c rigCase) *modal.Result {
	t.Helper()
	fit, err := fitRig(c)
	if err != nil {
		t.Fatal(err)
	}
	return fit
}

// fitRig is runRig returning the error.
func fitRig(c rigCase) (*modal.Result, error) {
	csv, err := rigCSV(c)
	if err != nil {
		return nil, err
	}
	_, fit, err := readRigLog(c, csv)
	return fit, err
}

// rigCSV simulates the case's log as CSV text, the time column exact to
// ten significant digits.
func rigCSV(c rigCase) ([]byte, error) {
	log, err := simulate.Rig(c.v, c.sensors, c.inputs, c.opt)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := log.Write(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// readRigLog reads a log of the case's channels through the streaming
// reader into the FRF stage and fits the FRFs.
func readRigLog(c rigCase, csv []byte) (*FRFResult, *modal.Result, error) {
	r, err := ingest.NewReader(bytes.NewReader(csv), "sim.csv", int64(len(csv)), ingest.Options{})
	if err != nil {
		return nil, nil, err
	}
	stage, err := NewFRFStage(r.Info().Channels, c.sensors, c.inputs, FRFOptions{})
	if err != nil {
		return nil, nil, err
	}
	sum, err := r.Stream(stage.Consume)
	if err != nil {
		return nil, nil, err
	}
	frf, err := stage.Result(sum.SampleRateHz)
	if err != nil {
		return nil, nil, err
	}
	_, fit, err := FitRig(frf, c.sensors, modal.Options{})
	if err != nil {
		return frf, nil, fmt.Errorf("%w (choices: %v)", err, frf.Reasons)
	}
	return frf, fit, nil
}

// fitRigLog is readRigLog failing the test on an error.
func fitRigLog(t *testing.T, c rigCase, csv []byte) (*FRFResult, *modal.Result) {
	t.Helper()
	frf, fit, err := readRigLog(c, csv)
	if err != nil {
		t.Fatal(err)
	}
	return frf, fit
}

// restamp rewrites the time column of a log written by ingest.WriteLog
// (from t = 0) with the given number of decimals, as acquisition exports
// write it.
func restamp(csv []byte, rateHz float64, decimals int) []byte {
	var out bytes.Buffer
	row := -1 // the header is row -1
	for _, line := range bytes.SplitAfter(csv, []byte("\n")) {
		if len(line) == 0 || line[0] == '#' || row < 0 {
			out.Write(line)
			if len(line) > 0 && line[0] != '#' {
				row = 0
			}
			continue
		}
		fmt.Fprintf(&out, "%.*f", decimals, float64(row)/rateHz)
		out.Write(line[bytes.IndexByte(line, ','):])
		row++
	}
	return out.Bytes()
}

// Time written to 4 or 5 decimals costs the rig route nothing: the sample
// rate is fitted to every stamp (the first steps' median is 0.16 % off at
// 256 Hz and 512 Hz), so the natural frequencies agree within 0.01 % with
// those of the same log with exact stamps.
func TestRigRouteWithRoundedTimeStamps(t *testing.T) {
	const freqAgreeRel = 1e-4
	c := drawRigCase(rand.New(rand.NewPCG(2026, 5)), 0.1, 0.2)
	c.opt.DurationS = 300
	for _, fs := range []float64{200, 256, 512} {
		c.opt.RateHz = fs
		csv, err := rigCSV(c)
		if err != nil {
			t.Fatal(err)
		}
		_, exact := fitRigLog(t, c, csv)
		for _, d := range []int{4, 5} {
			frf, fit := fitRigLog(t, c, restamp(csv, fs, d))
			if e := frf.InputRateHz/fs - 1; math.Abs(e) > 1e-6 {
				t.Errorf("%g Hz, %d decimals: the stage's rate %.9g Hz (%+.1e)", fs, d, frf.InputRateHz, e)
			}
			for k, m := range fit.Modes {
				e := m.NaturalFrequencyHz/exact.Modes[k].NaturalFrequencyHz - 1
				t.Logf("%g Hz, %d decimals, %s: %.6f Hz vs %.6f Hz with exact stamps (%+.1e)", fs, d, m.Label,
					m.NaturalFrequencyHz, exact.Modes[k].NaturalFrequencyHz, e)
				if math.Abs(e) > freqAgreeRel || m.Label != exact.Modes[k].Label {
					t.Errorf("%g Hz, %d decimals, %s: %.6f Hz, with exact stamps %s %.6f Hz (%+.3f %%)", fs, d, m.Label,
						m.NaturalFrequencyHz, exact.Modes[k].Label, exact.Modes[k].NaturalFrequencyHz, 100*e)
				}
			}
		}
	}
}

// rigCases sets how many seeded logs TestRigRouteAccuracy runs; the default
// 20 keeps go test ./... quick, a longer sweep is
// go test ./identify -run RigRouteAccuracy -rig.cases 100 -v.
var rigCases = flag.Int("rig.cases", 20, "number of seeded rig logs in TestRigRouteAccuracy")

// TestRigRouteAccuracy checks the targets above on invented cars at 5 %
// noise, and that none of their modes is flagged (body.Mode.Flagged): the
// flags must not fire where the fit meets its targets.
func TestRigRouteAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(2026, 12))
	cases := *rigCases
	var within, total, flagged int
	var worstF, worstZ, worstN float64
	for i := 0; i < cases; i++ {
		zLo, zHi := 0.05+0.35*float64(i)/float64(cases), 0.05+0.35*float64(i+1)/float64(cases)
		c := drawRigCase(rng, zLo, zHi)
		fit := runRig(t, c)
		if len(fit.Modes) != 2 {
			t.Fatalf("case %d: %d modes", i, len(fit.Modes))
		}
		for k, m := range fit.Modes {
			tr := c.truth[k]
			if m.Flagged {
				flagged++
				t.Logf("case %d %s flagged: %q", i, m.Label, m.FlagReasons)
			}
			if m.Label != tr.Label {
				t.Errorf("case %d mode %d: label %s, truth %s", i, k, m.Label, tr.Label)
			}
			ef := m.NaturalFrequencyHz/tr.NaturalFrequencyHz - 1
			ez := m.DampingRatio - tr.DampingRatio
			worstF, worstZ = math.Max(worstF, math.Abs(ef)), math.Max(worstZ, math.Abs(ez))
			fTol := freqTolRel
			if tr.DampingRatio > heavyDampingZeta && c.opt.DurationS < longLogS {
				fTol = math.Min(freqTolHeavyRel, honestSDs*m.SD.NaturalFrequencyHz/tr.NaturalFrequencyHz)
			}
			if math.Abs(ef) > fTol || math.Abs(ez) > dampingTolAbs {
				t.Errorf("case %d %s (zeta %.3f, %.0f %% apart, %g s): fn %.4f vs %.4f (%+.2f %%), zeta %.4f vs %.4f",
					i, m.Label, tr.DampingRatio, 100*c.sepRatio, c.opt.DurationS, m.NaturalFrequencyHz,
					tr.NaturalFrequencyHz, 100*ef, m.DampingRatio, tr.DampingRatio)
			}
			checks := [][2]float64{{ef * tr.NaturalFrequencyHz, m.SD.NaturalFrequencyHz}, {ez, m.SD.DampingRatio}}
			realShape := math.Abs(cmplx.Phase(tr.Shape[1]))*180/math.Pi < nodeRealShapeDeg ||
				math.Abs(180-math.Abs(cmplx.Phase(tr.Shape[1]))*180/math.Pi) < nodeRealShapeDeg
			far := math.Abs(tr.NodeM) > nodeFarWheelbases*c.v.WheelbaseM()
			if far {
				if e := m.PitchPerBounceRadPerM - tr.PitchPerBounceRadPerM; math.Abs(e) > ppbTolPerM {
					t.Errorf("case %d %s: pitch per bounce %.4f vs %.4f", i, m.Label, m.PitchPerBounceRadPerM, tr.PitchPerBounceRadPerM)
				}
				checks = append(checks, [2]float64{m.PitchPerBounceRadPerM - tr.PitchPerBounceRadPerM, m.SD.PitchPerBounceRadPerM})
			}
			if realShape && !far {
				// Relative to the node's distance from the CG, but not below a
				// quarter wheelbase: a node at the CG (pure pitch) has no
				// relative error to speak of.
				en := (m.NodeM - tr.NodeM) / math.Max(math.Abs(tr.NodeM), nodeFloorWheelbases*c.v.WheelbaseM())
				worstN = math.Max(worstN, math.Abs(en))
				if math.Abs(en) > nodeTolRel {
					t.Errorf("case %d %s: node %.3f vs %.3f (%+.1f %%)", i, m.Label, m.NodeM, tr.NodeM, 100*en)
				}
				checks = append(checks, [2]float64{m.NodeM - tr.NodeM, m.SD.NodeM})
			}
			if testing.Verbose() {
				t.Logf("case %2d %-6s zeta %.3f sep %2.0f%% %3.0fs: fn err %+.3f%% (%.1f sd) zeta err %+.4f (%.1f sd)", i, m.Label,
					tr.DampingRatio, 100*c.sepRatio, c.opt.DurationS, 100*ef, ef*tr.NaturalFrequencyHz/m.SD.NaturalFrequencyHz,
					ez, ez/m.SD.DampingRatio)
			}
			for _, e := range checks {
				total++
				if math.Abs(e[0]) <= 2*e[1] {
					within++
				}
			}
		}
	}
	cov := float64(within) / float64(total)
	t.Logf("worst errors: fn %.3f %%, zeta %.4f, node %.2f %%; %d of %d errors within 2 sd (%.1f %%); %d of %d modes flagged",
		100*worstF, worstZ, 100*worstN, within, total, 100*cov, flagged, 2*cases)
	if flagged > 0 {
		t.Errorf("%d modes flagged on logs that meet the accuracy targets", flagged)
	}
	if cov < minCoverage2Sig {
		t.Errorf("only %.1f %% of errors within 2 sd, want at least %.0f %%", 100*cov, 100*minCoverage2Sig)
	}
}

// TestRigHourLongWithinStatedSD: on hour-long rig logs, where the random
// errors are small and any bias shows, every natural frequency and damping
// ratio lies within hourLongMaxSigmas of its stated standard deviation
// (the acceptance for long logs). Seeded invented cars from light
// to heavy damping, through the CSV reader at a low rate to stay fast.
func TestRigHourLongWithinStatedSD(t *testing.T) {
	const (
		hourLongCases     = 6
		hourLongMaxSigmas = 3
	)
	if testing.Short() {
		t.Skip("hour-long logs")
	}
	rng := rand.New(rand.NewPCG(2026, 3600))
	for i := 0; i < hourLongCases; i++ {
		zLo := 0.05 + 0.34*float64(i)/hourLongCases
		c := drawRigCase(rng, zLo, zLo+0.34/hourLongCases)
		c.sensors = c.sensors[:2]
		c.opt.DurationS, c.opt.RateHz = 3600, 50
		fit := runRig(t, c)
		for k, m := range fit.Modes {
			tr := c.truth[k]
			for _, q := range []struct {
				name          string
				got, want, sd float64
			}{
				{"fn", m.NaturalFrequencyHz, tr.NaturalFrequencyHz, m.SD.NaturalFrequencyHz},
				{"zeta", m.DampingRatio, tr.DampingRatio, m.SD.DampingRatio},
			} {
				z := (q.got - q.want) / q.sd
				t.Logf("case %d %s %s: %.5f vs %.5f, %+.2f sd", i, m.Label, q.name, q.got, q.want, z)
				if !(math.Abs(z) <= hourLongMaxSigmas) {
					t.Errorf("case %d %s (zeta %.3f) %s: %.5f ± %.2g, truth %.5f (%+.1f sd)", i, m.Label, tr.DampingRatio, q.name, q.got, q.sd, q.want, z)
				}
			}
		}
	}
}
