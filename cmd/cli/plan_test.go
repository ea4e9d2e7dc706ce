package cli

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestPlanCommand plans a drop series of the example car (quick: drops
// are short) and checks the contract's JSON keys, the page and its verdict
// element, and the cautions in the help.
func TestPlanCommand(t *testing.T) {
	dir := t.TempDir()
	jsonPath, reportDir := filepath.Join(dir, "plan.json"), filepath.Join(dir, "plan")
	code, out, errs := run(t, "plan", "--setup", exampleSetup, "--test", "drop", "--frequency-sd-pct", "1",
		"--noise-sd", "0.02", "--json", jsonPath, "--report", reportDir)
	if code != 0 {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	for _, want := range []string{"Plan: drop test", "drops of", "Predicted uncertainty", "Cramer-Rao"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	data, err := os.ReadFile(jsonPath)
	if err != nil {
		t.Fatal(err)
	}
	var p map[string]any
	if err := json.Unmarshal(data, &p); err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{"test", "duration_s", "sample_rate_hz", "drops", "modes"} {
		if _, ok := p[key]; !ok {
			t.Errorf("plan JSON lacks %q", key)
		}
	}
	modes, _ := p["modes"].([]any)
	if len(modes) != 2 {
		t.Fatalf("modes: %v", p["modes"])
	}
	sd, _ := modes[0].(map[string]any)["predicted_sd"].(map[string]any)
	for _, key := range []string{"natural_frequency_hz", "damping_ratio", "pitch_per_bounce_rad_per_m", "node_m"} {
		if _, ok := sd[key]; !ok {
			t.Errorf("predicted_sd lacks %q (the keys of a result's uncertainty)", key)
		}
	}
	page, err := os.ReadFile(filepath.Join(reportDir, "plan.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`id="verdict"`, `data-verdict="none"`, "Safety: rig and drop tests can hurt people", "plan-curve.png"} {
		if !strings.Contains(string(page), want) {
			t.Errorf("page lacks %q", want)
		}
	}
	if _, out, _ := run(t, "plan", "--help"); !strings.Contains(out, "Safety:") {
		t.Error("plan --help lacks the cautions")
	}
}

func TestPlanUsageAndUnmet(t *testing.T) {
	for _, args := range [][]string{
		{"--test", "bogus", "--frequency-sd-pct", "1"},
		{"--test", "drop", "--frequency-sd-pct", "1", "--verify", "1"},
		{"--test", "drop", "--frequency-sd-pct", "1", "--sensor-span", "1"},
		{"--test", "drop"}, // nothing wanted: the example has no [targets]
		{"--test", "drop", "--damping-sd", "-0.01"},
	} {
		if code, _, errs := run(t, append([]string{"plan", "--setup", exampleSetup}, args...)...); code != exitUsage {
			t.Errorf("%v: exit %d, want %d (%s)", args, code, exitUsage, errs)
		}
	}
	// Within the default 10 drops of at most 5 cm, 0.02 % is out of reach.
	code, out, errs := run(t, "plan", "--setup", exampleSetup, "--test", "drop", "--frequency-sd-pct", "0.02", "--noise-sd", "0.02")
	if code != exitTargets || !strings.Contains(errs, "does not meet every wanted sd") || !strings.Contains(out, "cannot meet") {
		t.Errorf("unreachable: exit %d, %s\n%s", code, errs, out)
	}
}
