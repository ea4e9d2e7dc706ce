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
)

// dropLog simulates a drop of car (both axles at once) logged at 500 Hz with
// 1 % noise by the example setup's sensors.
func dropLog(t *testing.T, dir string, car compare.Vehicle, seed uint64) string {
	t.Helper()
	o := simulate.Defaults("drop")
	o.NoiseFraction, o.Seed, o.RateHz = 0.01, seed, 500
	return simulated(t, filepath.Join(dir, "drop-"+string(rune('a'+seed))+".csv"), car, "drop", o)
}

// TestPooledDrops: three drops of one car pool to a pitch node whose sd is
// about 1/sqrt(3) of one drop's (the inverse-variance rule; the drops'
// own sds differ a little with the noise) and the runs agree; a drop of
// another car (rear ride rate 25 % stiffer) among them is named. How close
// pooled values lie to the truth is the calibration sweep's question
// (testdata/calibration): pooling cuts the random error, not a bias.
func TestPooledDrops(t *testing.T) {
	dir := t.TempDir()
	car := exampleCar(t)
	var logs []string
	for seed := range uint64(3) {
		logs = append(logs, dropLog(t, dir, car, seed+1))
	}
	ctx := context.Background()
	o := job.Options{SetupPath: exampleSetup, Test: "drop"}
	var oneSD float64
	for _, l := range logs {
		o.LogPath = l
		one, err := job.Analyze(ctx, o)
		if err != nil {
			t.Fatal(err)
		}
		oneSD += *one.Result.Modes[1].Uncertainty.NodeM / 3
	}
	out, err := job.AnalyzeRuns(ctx, o, logs)
	if err != nil {
		t.Fatal(err)
	}
	res := out.Result
	if len(res.Runs) != 3 || res.Pooling == nil || res.Log != nil {
		t.Fatalf("pooled result: %d runs, pooling %v", len(res.Runs), res.Pooling)
	}
	for _, c := range res.Pooling.Checks {
		if !c.Consistent {
			t.Errorf("runs of one car called inconsistent: %+v", c)
		}
	}
	pitch := res.Modes[1]
	ratio := *pitch.Uncertainty.NodeM / oneSD
	t.Logf("pitch node %.4f ± %.4f m pooled; one drop's sd %.4f on average: ratio %.3f (1/sqrt(3) = 0.577)",
		*pitch.NodeM, *pitch.Uncertainty.NodeM, oneSD, ratio)
	if math.Abs(ratio-1/math.Sqrt(3)) > 0.1 {
		t.Errorf("pooled node sd is %.3f of one drop's, want about 0.577", ratio)
	}
	other := car
	other.RearRateNPerM *= 1.25
	odd := dropLog(t, dir, other, 9)
	out, err = job.AnalyzeRuns(ctx, o, append(logs[:2:2], odd, logs[2]))
	if err != nil {
		t.Fatal(err)
	}
	named := false
	for _, c := range out.Result.Pooling.Checks {
		named = named || (!c.Consistent && *c.OutlierLog == odd)
	}
	if !out.Result.Modes[0].Flagged && !out.Result.Modes[1].Flagged {
		t.Error("no pooled mode is flagged although the runs disagree")
	}
	if !named || !strings.Contains(strings.Join(out.Result.Warnings, "\n"), odd) {
		t.Errorf("the other car's drop is not named: %+v", out.Result.Pooling.Checks)
	}
}
