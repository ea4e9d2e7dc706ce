package modal

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/identify/spectral"
	"github.com/ridemodes/ridemodes/ingest"
)

// rigCase is one simulated rig test: an invented vehicle, its sensors and
// the test conditions.
type rigCase struct {
	name      string
	v         compare.Vehicle
	sensorsM  []float64
	durationS float64
	seed      uint64
}

// Chain settings shared by the tests and the docs table.
const (
	chainRateHz        = 50   // sample rate of the simulated logs [Hz]
	chainDriveLowHz    = 0.3  // drive band [Hz]
	chainDriveHighHz   = 8    //
	chainNoiseFraction = 0.05 // 5 % sensor noise on every channel, inputs too
	// chainResolutionRatio is the window bandwidth Be = 1.5/T over the
	// half-power bandwidth 2 zeta fn of the lightest-damped mode: the design
	// notes (domain.md) put the peak bias at -(1/3)(Be/Br)^2, 0.3 % here; at 0.25 the fit's damping came out 0.02 high on the round-trip car (measured).
	chainResolutionRatio = 0.1
	// chainMinSegments keeps at least this many non-overlapping segment
	// lengths in the record.
	chainMinSegments = 8
)

// runChain simulates the case's log (mixed g and m/s^2 channels), writes it
// as CSV and reads it back through package ingest, estimates the
// two-input H1 FRFs with error bands with package spectral (Hann, 50 %
// overlap, segment length chosen from the lightest damping of the truth)
// and returns the FRFSet with the truth.
func runChain(c rigCase) (*FRFSet, []compare.Mode, error) {
	truth, err := c.v.DampedModes()
	if err != nil {
		return nil, nil, err
	}
	var sensors []ingest.Sensor
	var outNames []string
	for k, s := range c.sensorsM {
		name := fmt.Sprintf("body_%d", k+1)
		sensors = append(sensors, ingest.Sensor{Channel: name, XM: s})
		outNames = append(outNames, name)
	}
	inputs := []ingest.Input{{Channel: "pan_f", Axle: "front"}, {Channel: "pan_r", Axle: "rear"}}
	o := simulate.Defaults("rig")
	o.DurationS, o.RateHz, o.Seed, o.NoiseFraction, o.Units = c.durationS, chainRateHz, c.seed, chainNoiseFraction, simulate.UnitsMixed
	o.BandLowHz, o.BandHighHz = chainDriveLowHz, chainDriveHighHz
	lg, err := simulate.Rig(c.v, sensors, inputs, o)
	if err != nil {
		return nil, nil, err
	}
	var buf bytes.Buffer
	if err := lg.Write(&buf); err != nil {
		return nil, nil, err
	}
	channels := append([]string{"pan_f", "pan_r"}, outNames...)
	rd, err := ingest.NewReader(&buf, c.name+".csv", int64(buf.Len()), ingest.Options{Channels: channels})
	if err != nil {
		return nil, nil, err
	}
	read, err := rd.ReadAll()
	if err != nil {
		return nil, nil, err
	}
	zeta, fn := math.Inf(1), 0.0
	for _, m := range truth {
		if m.DampingRatio*m.NaturalFrequencyHz < zeta*fn || fn == 0 {
			zeta, fn = m.DampingRatio, m.NaturalFrequencyHz
		}
	}
	segS := 1.5 / (chainResolutionRatio * 2 * zeta * fn)
	segS = math.Min(segS, c.durationS/chainMinSegments)
	n := int(segS * chainRateHz)
	acc, err := spectral.NewAccumulator(spectral.Config{FsHz: chainRateHz, SegmentLen: n, Overlap: n / 2,
		Window: spectral.Hann}, channels)
	if err != nil {
		return nil, nil, err
	}
	acc.Write(read.Data)
	sp, err := acc.Spectra()
	if err != nil {
		return nil, nil, err
	}
	outs := make([]int, len(outNames))
	for k := range outs {
		outs[k] = 2 + k
	}
	fs, err := spectral.EstimateFRF(sp, []int{0, 1}, outs, spectral.FRFOptions{})
	if err != nil {
		return nil, nil, err
	}
	set, err := FromSpectral(fs, sp, c.sensorsM)
	return set, truth, err
}

// fitBand is the analysis band used for a case: from half the lower to
// 2.5 times the upper natural frequency, kept a margin inside the drive band.
func fitBand(truth []compare.Mode) (lo, hi float64) {
	return math.Max(0.5*truth[0].NaturalFrequencyHz, 1.5*chainDriveLowHz),
		math.Min(2.5*truth[1].NaturalFrequencyHz, 0.8*chainDriveHighHz)
}

// inventCase draws an invented vehicle from the seeded stream with the
// parameter ranges of the accuracy targets (mass 1000-2000 kg, J 1200-3000
// kg m^2, a and b 1.0-1.7 m, rates 25-60 kN/m), with damping set so that the
// lighter-damped mode has zetaLow (dampers proportional to the rates, the
// rear scaled by a random factor so the modes are complex), and rejects
// draws whose modes are not 15-40 % apart or whose damping ratios leave
// 0.05-0.40. Sensors sit 0.15-0.45 m inboard of the axles; with three
// sensors the third is near the CG.
func inventCase(rng *rand.Rand, name string, zetaLow float64, sensors int, durationS float64, seed uint64) rigCase {
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	for {
		v := compare.Vehicle{MassKg: u(1000, 2000), PitchInertiaKgm2: u(1200, 3000), CGToFrontM: u(1.0, 1.7), CGToRearM: u(1.0, 1.7),
			FrontRateNPerM: u(25e3, 60e3), RearRateNPerM: u(25e3, 60e3)}
		und, err := v.UndampedModes()
		if err != nil {
			continue
		}
		sep := und[1].NaturalFrequencyHz/und[0].NaturalFrequencyHz - 1
		if sep < 0.15 || sep > 0.40 {
			continue
		}
		c := 2 * zetaLow / (2 * math.Pi * und[0].NaturalFrequencyHz)
		v.FrontDampingNsPerM = c * v.FrontRateNPerM
		v.RearDampingNsPerM = c * v.RearRateNPerM * u(0.7, 1.3)
		dm, err := v.DampedModes()
		if err != nil {
			continue
		}
		ok := dm[1].NaturalFrequencyHz/dm[0].NaturalFrequencyHz-1 >= 0.15
		for _, m := range dm {
			ok = ok && m.DampingRatio >= 0.05 && m.DampingRatio <= 0.40
		}
		if !ok {
			continue
		}
		s := []float64{v.CGToFrontM - u(0.15, 0.45), -v.CGToRearM + u(0.15, 0.45)}
		if sensors == 3 {
			s = append(s, u(-0.3, 0.3))
		}
		return rigCase{name: name, v: v, sensorsM: s, durationS: durationS, seed: seed}
	}
}

// accuracyCases returns the n seeded cases of the accuracy test: the
// lightest damping ratio runs from 0.05 to 0.35, every third case has three
// sensors, durations alternate 5 and 10 minutes.
func accuracyCases(n int, seed uint64) []rigCase {
	rng := rand.New(rand.NewPCG(seed, 0x6d6f64616c))
	cs := make([]rigCase, n)
	for i := range cs {
		zeta := 0.05 + 0.30*float64(i)/float64(n-1)
		sensors := 2
		if i%3 == 2 {
			sensors = 3
		}
		dur := 300.0
		if i%2 == 1 {
			dur = 600
		}
		cs[i] = inventCase(rng, fmt.Sprintf("case%02d", i+1), zeta, sensors, dur, seed*1000+uint64(i))
	}
	return cs
}

// TestChainRoundTripCar runs simulate -> ingest -> spectral -> Fit once on
// the damped round-trip car of the design notes and checks its published
// [derived] poles: 1.1385 Hz, zeta 0.3055 and 1.3678 Hz, zeta 0.3300.
func TestChainRoundTripCar(t *testing.T) {
	c := rigCase{name: "roundtrip", v: roundTripCar(), sensorsM: []float64{0.95, -1.25}, durationS: 600, seed: 7}
	set, truth, err := runChain(c)
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := fitBand(truth)
	res, err := Fit(set, Options{BandLowHz: lo, BandHighHz: hi})
	if err != nil {
		t.Fatal(err)
	}
	want := []struct{ fnHz, zeta float64 }{{1.1385, 0.3055}, {1.3678, 0.3300}} // domain.md [derived]
	const (
		designNoteFreqTol = 0.005 // the accuracy target's 0.5 %
		designNoteZetaTol = 0.015 // the accuracy target's 0.015 absolute
	)
	for i, m := range res.Modes {
		t.Logf("%s: fn %.4f ± %.4f Hz, zeta %.4f ± %.4f, node %.3f ± %.3f m (model %.3f)", m.Label,
			m.NaturalFrequencyHz, m.SD.NaturalFrequencyHz, m.DampingRatio, m.SD.DampingRatio, m.NodeM, m.SD.NodeM, truth[i].NodeM)
		if e := relErr(m.NaturalFrequencyHz, want[i].fnHz); e > designNoteFreqTol {
			t.Errorf("mode %d: natural frequency %.4f Hz, want %.4f (error %.2g)", i, m.NaturalFrequencyHz, want[i].fnHz, e)
		}
		if e := math.Abs(m.DampingRatio - want[i].zeta); e > designNoteZetaTol {
			t.Errorf("mode %d: damping ratio %.4f, want %.4f", i, m.DampingRatio, want[i].zeta)
		}
		if m.Label != truth[i].Label {
			t.Errorf("mode %d labelled %s, model says %s", i, m.Label, truth[i].Label)
		}
	}
	t.Logf("chi2/dof %.3f, residual %.3g, order %d, %d bins, %d iterations", res.ChiSquarePerDOF, res.NormalisedResidual, res.Order, res.BinsUsed, res.Iterations)
}
