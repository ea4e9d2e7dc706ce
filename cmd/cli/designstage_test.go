package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A design-stage setup holds [vehicle] alone: model and compare serve it,
// while the commands that read or write a log refuse it with the setup file and the
// missing [[sensor]] tables named, and leave no file behind.
func TestDesignStageSetup(t *testing.T) {
	dir := t.TempDir()
	design := filepath.Join(dir, "design.toml")
	text := "[vehicle]\nmass_kg = 1400\npitch_inertia_kgm2 = 2000\ncg_to_front_axle_m = 1.1\n" +
		"cg_to_rear_axle_m = 1.5\nfront_rate_n_per_m = 40000\nrear_rate_n_per_m = 45000\n"
	if err := os.WriteFile(design, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, out, errs := run(t, "model", "--setup", design); code != 0 || !strings.Contains(out, "bounce") {
		t.Fatalf("model: exit %d, stderr %q", code, errs)
	}
	modes := filepath.Join(dir, "modes.json")
	if err := os.WriteFile(modes, []byte(`{"modes":[{"label":"bounce","natural_frequency_hz":1.22},{"label":"pitch","natural_frequency_hz":1.50}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, out, errs := run(t, "compare", "--modes", modes, "--setup", design); code != exitOK || !strings.Contains(out, "rear ride rate") {
		t.Fatalf("compare: exit %d\n%s\n%s", code, out, errs)
	}
	log := filepath.Join(dir, "drop.csv")
	if code, _, errs := run(t, "simulate", "--setup", exampleSetup, "--test", "drop", "--out", log); code != 0 {
		t.Fatalf("simulate with the example setup: exit %d: %s", code, errs)
	}
	for _, args := range [][]string{
		{"simulate", "--setup", design, "--test", "drop", "--out", filepath.Join(dir, "sim.csv")},
		{"spectra", log, "--setup", design, "--csv", filepath.Join(dir, "spectra.csv")},
		{"analyze", log, "--setup", design, "--json", filepath.Join(dir, "result.json")},
	} {
		code, _, errs := run(t, args...)
		if code != exitData || !strings.Contains(errs, "design.toml: sensor:") || !strings.Contains(errs, "[[sensor]]") {
			t.Errorf("%v: exit %d, stderr %q; want exit %d naming design.toml and [[sensor]]", args, code, errs, exitData)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 3 {
		t.Errorf("%d files in the folder, want design.toml, modes.json and drop.csv only", len(entries))
	}
}
