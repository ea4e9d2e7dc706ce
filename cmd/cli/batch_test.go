package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// batchScenario writes a design setup with a rear rate target, logs of the
// design car and of one with a 40 % stiffer rear (simulated from a copy of
// the setup), and a manifest of both.
func batchScenario(t *testing.T) (dir, design string) {
	dir = t.TempDir()
	text, err := os.ReadFile(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(dir, "logs"), 0o755); err != nil {
		t.Fatal(err)
	}
	design = filepath.Join(dir, "design.toml")
	built := filepath.Join(dir, "built.toml")
	writeText(t, design, string(text)+"\n[targets]\nride_rate_tolerance_pct = 12\n")
	writeText(t, built, strings.Replace(string(text), "rear_rate_n_per_m = 41000", "rear_rate_n_per_m = 57400", 1))
	for _, c := range []struct{ setup, log string }{{design, "a-good.csv"}, {built, "b-stiff.csv"}} {
		if code, _, errs := run(t, "simulate", "--setup", c.setup, "--test", "rig", "--duration", "180",
			"--noise", "0.02", "--out", filepath.Join(dir, "logs", c.log)); code != 0 {
			t.Fatalf("simulate: exit %d: %s", code, errs)
		}
	}
	writeText(t, filepath.Join(dir, "campaign.csv"), "log,setup,car,run,date\nlogs/a-good.csv,design.toml,HX2,1,2026-03-02\nlogs/b-stiff.csv,design.toml,HX2,2,2026-03-09\n")
	return dir, design
}

func writeText(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestBatchExitCodes: the exit code is the most severe of the logs' (a
// failed log 1, a failed check 3, else 0), the outputs and the default
// store are under --out, and a shard analyses its part only.
func TestBatchExitCodes(t *testing.T) {
	t.Setenv("JOB_COMPLETION_INDEX", "") // a scheduler's index would choose a shard
	t.Setenv("SLURM_ARRAY_TASK_ID", "")
	dir, design := batchScenario(t)
	logs := filepath.Join(dir, "logs")
	out := filepath.Join(dir, "out1")
	code, stdout, errs := run(t, "batch", filepath.Join(logs, "a-good.csv"), "--setup", design, "--out", out)
	if code != 0 || !strings.Contains(stdout, "1 pass, 0 fail") {
		t.Errorf("the design car: exit %d, %s%s", code, stdout, errs)
	}
	for _, name := range []string{"summary.csv", "summary.jsonl", "campaign.sqlite", "report/index.html"} {
		if _, err := os.Stat(filepath.Join(out, name)); err != nil {
			t.Errorf("no %s under --out: %v", name, err)
		}
	}
	code, _, errs = run(t, "batch", logs, "--setup", design, "--out", filepath.Join(dir, "out2"), "--workers", "2")
	if code != exitTargets || !strings.Contains(errs, "1 of 2 logs: a target check failed") {
		t.Errorf("with the stiff rear: exit %d, %s", code, errs)
	}
	writeText(t, filepath.Join(logs, "c-broken.csv"), "time [s],body_front,body_rear,pan_front,pan_rear\n0,0,0,0,0\n0.005,x,0,0,0\n")
	code, _, errs = run(t, "batch", "--manifest", filepath.Join(dir, "campaign.csv"), "--shard", "2/2", "--out", filepath.Join(dir, "out3"))
	if code != exitTargets || !strings.Contains(errs, "1 of 1 logs") {
		t.Errorf("shard 2/2 of the manifest (the stiff rear): exit %d, %s", code, errs)
	}
	code, _, errs = run(t, "batch", filepath.Join(logs, "*.csv"), "--setup", design, "--out", filepath.Join(dir, "out4"))
	if code != exitData || !strings.Contains(errs, "c-broken.csv:3") || !strings.Contains(errs, "1 of 3 logs could not be analysed") {
		t.Errorf("with a broken log: exit %d, %s", code, errs)
	}
}

// TestBatchUsage: mistakes in the command line exit 2 before any analysis.
func TestBatchUsage(t *testing.T) {
	dir, design := batchScenario(t)
	manifest := filepath.Join(dir, "campaign.csv")
	for _, args := range [][]string{
		{"batch", "--setup", design},
		{"batch", filepath.Join(dir, "logs")},
		{"batch", filepath.Join(dir, "logs"), "--manifest", manifest},
		{"batch", "--manifest", manifest, "--setup", design},
		{"batch", "--manifest", manifest, "--test", "shaker"},
		{"batch", "--manifest", manifest, "--shard", "3/2"},
	} {
		if code, _, errs := run(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d (%s), want %d", args, code, errs, exitUsage)
		}
	}
}
