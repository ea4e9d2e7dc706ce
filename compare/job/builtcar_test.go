package job_test

import (
	"context"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/ingest"
)

// builtCar is the example hatchback as "built": rear ride rate 10 % stiffer
// and both dampers 20 % softer than the design setup says (invented).
var builtCar = compare.Vehicle{MassKg: 1340, PitchInertiaKgm2: 1850, CGToFrontM: 1.05, CGToRearM: 1.55,
	FrontRateNPerM: 46000, RearRateNPerM: 45100, FrontDampingNsPerM: 2720, RearDampingNsPerM: 2400}

// Acceptance for the built car: rates within 2 %, damping within 10 % of
// the simulated values (the truth: compare/simulate is exact), and
// uncertainties that cover the errors (coverSigmas standard deviations).
const (
	rateTolRel    = 0.02
	dampingTolRel = 0.10
	coverSigmas   = 3
)

// builtCarLog simulates a 10-minute rig log of the built car with 5 % noise
// and mixed units, read with the example (design) setup's sensors and pans.
func builtCarLog(t *testing.T, dir string) string {
	t.Helper()
	o := simulate.Defaults("rig")
	o.DurationS, o.NoiseFraction, o.Units, o.Seed = 600, 0.05, simulate.UnitsMixed, 11
	return simulated(t, filepath.Join(dir, "built-rig.csv"), builtCar, "rig", o)
}

// TestBuiltCarAgainstDesign: the design setup with loose targets passes and
// gives back the built car's rates and damping; a 5 % rate tolerance fails
// on the rear rate, which is 10 % off.
func TestBuiltCarAgainstDesign(t *testing.T) {
	dir := t.TempDir()
	logPath := builtCarLog(t, dir)
	setup, err := ingest.LoadSetup(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	setup.Targets.RideRateTolerancePct, setup.Targets.AxleDampingTolerancePct = 15, 30
	out, err := job.Analyze(context.Background(), job.Options{LogPath: logPath, Setup: setup})
	if err != nil {
		t.Fatal(err)
	}
	if out.Verdict != compare.StatusPass {
		t.Errorf("loose targets failed: %+v", out.Result.Checks)
	}
	u := out.Result.Updated
	if u == nil || u.Uncertainty == nil || !u.DampingEstimated {
		t.Fatalf("no updated rates with uncertainty: %+v", u)
	}
	sd := u.Uncertainty
	for _, g := range []struct {
		name           string
		val, sd, truth float64
		tol            float64
	}{
		{"front rate", u.FrontRateNPerM, sd.FrontRateNPerM, builtCar.FrontRateNPerM, rateTolRel},
		{"rear rate", u.RearRateNPerM, sd.RearRateNPerM, builtCar.RearRateNPerM, rateTolRel},
		{"front damping", u.FrontDampingNsPerM, *sd.FrontDampingNsPerM, builtCar.FrontDampingNsPerM, dampingTolRel},
		{"rear damping", u.RearDampingNsPerM, *sd.RearDampingNsPerM, builtCar.RearDampingNsPerM, dampingTolRel},
	} {
		err := g.val - g.truth
		if math.Abs(err) > g.tol*g.truth {
			t.Errorf("%s %.0f, simulated %.0f (%+.1f %%)", g.name, g.val, g.truth, 100*err/g.truth)
		}
		if math.Abs(err) > coverSigmas*g.sd {
			t.Errorf("%s error %.0f not covered by %d sd of %.0f", g.name, err, coverSigmas, g.sd)
		}
	}
	for _, c := range out.Result.Comparison {
		if c.PredictedHz <= 0 || c.MeasuredHz <= 0 {
			t.Errorf("comparison %+v", c)
		}
	}

	setup.Targets.RideRateTolerancePct, setup.Targets.AxleDampingTolerancePct = 5, 0
	out, err = job.Analyze(context.Background(), job.Options{LogPath: logPath, Setup: setup})
	if err != nil {
		t.Fatal(err)
	}
	failed := false
	for _, c := range out.Result.Checks {
		failed = failed || (c.Status == compare.StatusFail && strings.Contains(c.Name, "rear"))
	}
	if out.Verdict != compare.StatusFail || !failed {
		t.Errorf("a 5 %% rate tolerance did not fail the rear rate: %+v", out.Result.Checks)
	}
}
