package identify

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// fourPostCar is an invented saloon on a four-post rig (testdata/example/fourpost.toml).
var fourPostCar = compare.Vehicle{MassKg: 1610, PitchInertiaKgm2: 2650, CGToFrontM: 1.28, CGToRearM: 1.57,
	FrontRateNPerM: 52000, RearRateNPerM: 50000, FrontDampingNsPerM: 4100, RearDampingNsPerM: 3900}

var (
	fourPostSensors = []ingest.Sensor{{Channel: "body_fl", XM: 1.05}, {Channel: "body_fr", XM: 1.05},
		{Channel: "body_rl", XM: -1.35}, {Channel: "body_rr", XM: -1.35}}
	fourPostInputs = []ingest.Input{{Channel: "pan_fl", Axle: "front"}, {Channel: "pan_fr", Axle: "front"},
		{Channel: "pan_rl", Axle: "rear"}, {Channel: "pan_rr", Axle: "rear"}}
)

// fourPostFRF simulates the four-post car, lets edit change the log, and
// returns the stage's result, fed in blocks as ingest.Reader.Stream feeds it.
func fourPostFRF(t *testing.T, o simulate.Options, edit func(*simulate.Log)) *FRFResult {
	t.Helper()
	log, err := simulate.Rig(fourPostCar, fourPostSensors, fourPostInputs, o)
	if err != nil {
		t.Fatal(err)
	}
	edit(log)
	var names []string
	for _, c := range log.Columns {
		names = append(names, c.Name)
	}
	stage, err := NewFRFStage(names, fourPostSensors, fourPostInputs, FRFOptions{})
	if err != nil {
		t.Fatal(err)
	}
	const block = 4096
	n := len(log.Columns[0].Data)
	for start := 0; start < n; start += block {
		end := min(start+block, n)
		b := ingest.Block{Start: start, TimeS: float64(start) / log.RateHz, SampleRateHz: log.RateHz}
		for _, c := range log.Columns {
			b.Data = append(b.Data, c.Data[start:end])
		}
		if err := stage.Consume(b); err != nil {
			t.Fatal(err)
		}
	}
	frf, err := stage.Result()
	if err != nil {
		t.Fatal(err)
	}
	return frf
}

func TestFourPostRigCombinesPansPerAxle(t *testing.T) {
	o := simulate.Defaults("rig")
	o.DurationS, o.NoiseFraction = 400, 0.05
	frf := fourPostFRF(t, o, func(*simulate.Log) {})
	for _, w := range frf.Warnings {
		if strings.Contains(w, "not driven together") {
			t.Errorf("pans driven together were flagged: %s", w)
		}
	}
	if got := frf.FRF.Inputs; len(got) != 2 || !strings.HasPrefix(got[0], "mean(") {
		t.Fatalf("inputs %v, want the two axle means", got)
	}
	// Four sensors (left and right at two positions) give heave and pitch by
	// least squares; the modes must match the model (the truth) within the
	// rig route's targets (see TestRigRouteAccuracy).
	_, fit, err := FitRig(frf, fourPostSensors, modal.Options{})
	if err != nil {
		t.Fatal(err)
	}
	truth, _ := fourPostCar.DampedModes()
	for i, m := range fit.Modes {
		if m.Label != truth[i].Label || math.Abs(m.NaturalFrequencyHz/truth[i].NaturalFrequencyHz-1) > freqTolRel ||
			math.Abs(m.DampingRatio-truth[i].DampingRatio) > dampingTolAbs {
			t.Errorf("mode %d: %s %.4f Hz zeta %.4f; truth %s %.4f Hz zeta %.4f", i, m.Label, m.NaturalFrequencyHz,
				m.DampingRatio, truth[i].Label, truth[i].NaturalFrequencyHz, truth[i].DampingRatio)
		}
	}
}

func TestFourPostRigWarnsWhenPansDiffer(t *testing.T) {
	// A rig whose right front pan runs its own drive (here: independent noise of
	// the same level) is not a two-input bounce-pitch test: warn.
	o := simulate.Defaults("rig")
	o.DurationS = 200
	rng := rand.New(rand.NewPCG(3, 1))
	frf := fourPostFRF(t, o, func(log *simulate.Log) {
		for i := range log.Columns[1].Data { // pan_fr
			log.Columns[1].Data[i] = o.DriveRMSMPerS2 * rng.NormFloat64()
		}
	})
	found := false
	for _, w := range frf.Warnings {
		found = found || (strings.Contains(w, "pan_fl and pan_fr were not driven together"))
	}
	if !found {
		t.Errorf("no warning about the front pans in %q", frf.Warnings)
	}
}
