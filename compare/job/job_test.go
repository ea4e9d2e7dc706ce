package job_test

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

// exampleSetup is the invented example car with a two-post rig.
const exampleSetup = "../../testdata/example/hatchback.toml"

// exampleCar is the example setup's design car: the truth of the tests'
// simulated logs.
func exampleCar(t *testing.T) compare.Vehicle {
	t.Helper()
	setup, err := ingest.LoadSetup(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	return compare.DesignOf(setup.Vehicle)
}

// simulated simulates a log of car as the example setup's sensors (and, for
// a rig test, pans) record it, with the options o, and writes it to path.
func simulated(t *testing.T, path string, car compare.Vehicle, test string, o simulate.Options) string {
	t.Helper()
	setup, err := ingest.LoadSetup(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	var log *simulate.Log
	if test == "rig" {
		log, err = simulate.Rig(car, setup.Sensors, setup.Inputs, o)
	} else {
		log, err = simulate.Drop(car, setup.Sensors, o)
	}
	if err != nil {
		t.Fatal(err)
	}
	if err := log.WriteFile(path); err != nil {
		t.Fatal(err)
	}
	return path
}

// writeLog simulates a log of the example car (the model is the truth here)
// at 2 % noise and writes it into dir.
func writeLog(t *testing.T, dir, test string, durationS float64) string {
	t.Helper()
	o := simulate.Defaults(test)
	o.NoiseFraction, o.Seed = 0.02, 7
	if test == "rig" {
		o.DurationS = durationS
	}
	return simulated(t, filepath.Join(dir, test+".csv"), exampleCar(t), test, o)
}

// TestOptionMistakesAreOptionErrors: every option that cannot fit the test
// or the setup is refused with an *OptionError before the log is read.
func TestOptionMistakesAreOptionErrors(t *testing.T) {
	dir := t.TempDir()
	rig := writeLog(t, dir, "rig", 120)
	for _, c := range []struct {
		name string
		o    job.Options
		want string
	}{
		{"odd order", job.Options{MaxModelOrder: 5}, "--max-model-order"},
		{"segment not a power of two", job.Options{SegmentSamples: 1000}, "--segment-samples takes a power of two of at least 16 (got 1000; e.g. 1024)"},
		{"end before start", job.Options{StartS: 100, EndS: 10}, "--end 10 s is not after --start 100 s"},
		{"negative start", job.Options{StartS: -1}, "--start"},
		{"negative rate", job.Options{SampleRateHz: -200}, "--rate"},
		{"negative event", job.Options{Test: "drop", Event: -1}, "--event"},
		{"event on a rig test", job.Options{Event: 1}, "--test drop"},
		{"unknown window", job.Options{Window: "triangle"}, "hann"},
		{"upside-down band", job.Options{BandLowHz: 5, BandHighHz: 2}, "0 < low < high"},
		{"unknown test", job.Options{Test: "shaker"}, `"rig" or "drop"`},
	} {
		c.o.LogPath, c.o.SetupPath = rig, exampleSetup
		_, err := job.Analyze(context.Background(), c.o)
		var oe *compare.OptionError
		if !errors.As(err, &oe) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want an option error naming %s", c.name, err, c.want)
		}
	}
}

// TestCancelledRunStops: a cancelled context stops the run with its error.
func TestCancelledRunStops(t *testing.T) {
	dir := t.TempDir()
	rig := writeLog(t, dir, "rig", 120)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := job.Analyze(ctx, job.Options{LogPath: rig, SetupPath: exampleSetup}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run: %v", err)
	}
}

// TestOneSetupBothTests: the car's rig setup serves its drop log with
// Test "drop" (the inputs are ignored); without it the drop log is refused
// with advice that names --test drop. On the drop log of a 2 % noise
// simulation, both modes lie within 3 stated sd of the model (the truth),
// and the result relates the modes' six figures (mode_correlation).
func TestOneSetupBothTests(t *testing.T) {
	dir := t.TempDir()
	drop := writeLog(t, dir, "drop", 0)
	if _, err := job.Analyze(context.Background(), job.Options{LogPath: drop, SetupPath: exampleSetup}); err == nil ||
		!strings.Contains(err.Error(), "--test drop") {
		t.Fatalf("drop log with the rig setup: %v", err)
	}
	out, err := job.Analyze(context.Background(), job.Options{LogPath: drop, SetupPath: exampleSetup, Test: "drop"})
	if err != nil {
		t.Fatal(err)
	}
	res := out.Result
	if res.Test != "drop" || len(res.Modes) != 2 || out.Identified.Drop == nil {
		t.Fatalf("result: test %q, %d modes", res.Test, len(res.Modes))
	}
	for i, m := range res.Modes {
		p := res.Model.Modes[i]
		if m.Label != p.Label || math.Abs(m.NaturalFrequencyHz-p.NaturalFrequencyHz) > 3*m.Uncertainty.NaturalFrequencyHz {
			t.Errorf("%s: %.4f ± %.4f Hz, model %.4f Hz", m.Label, m.NaturalFrequencyHz, m.Uncertainty.NaturalFrequencyHz, p.NaturalFrequencyHz)
		}
	}
	if c, err := res.ModeCorrelation.Correlation(); err != nil || c == nil || len(c.Figures) != 6 {
		t.Errorf("mode_correlation %+v (%v), want the six figures of the two modes", res.ModeCorrelation, err)
	}
	// A rig test asked of a setup without inputs is an option error.
	noInputs := filepath.Join(dir, "noinputs.toml")
	text, err := os.ReadFile(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(noInputs, []byte(string(text)[:strings.Index(string(text), "[[input]]")]), 0o644); err != nil {
		t.Fatal(err)
	}
	var oe *compare.OptionError
	if _, err := job.Analyze(context.Background(), job.Options{LogPath: drop, SetupPath: noInputs, Test: "rig"}); !errors.As(err, &oe) {
		t.Errorf("rig test without inputs: %v", err)
	}
}
