package cli

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
)

// The end-to-end tests run the commands as a user would: simulate a log from
// a setup with known truth (compare/simulate is exact, see its tests), then
// analyze it and read the JSON back.

// builtCar is the example hatchback as "built": rear ride rate 10 % stiffer
// and both dampers 20 % softer than the design setup says (invented). The
// accuracy of what comes back is compare/job's test; here the command's
// exit codes and outputs are checked.
const builtCar = `[vehicle]
name = "example hatchback as built"
mass_kg = 1340
pitch_inertia_kgm2 = 1850
cg_to_front_axle_m = 1.05
cg_to_rear_axle_m = 1.55
front_rate_n_per_m = 46000
rear_rate_n_per_m = 45100
front_damping_ns_per_m = 2720
rear_damping_ns_per_m = 2400

[[sensor]]
channel = "body_front"
x_m = 0.85

[[sensor]]
channel = "body_rear"
x_m = -1.30

[[input]]
channel = "pan_front"
axle = "front"

[[input]]
channel = "pan_rear"
axle = "rear"
`

func readResult(t *testing.T, path string) compare.Result {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var r compare.Result
	if err := json.Unmarshal(data, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// designWithTargets is the example setup plus a [targets] table.
func designWithTargets(t *testing.T, dir, targets string) string {
	t.Helper()
	base, err := os.ReadFile(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "design.toml")
	if err := os.WriteFile(p, append(base, []byte("\n[targets]\n"+targets)...), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestBuiltCarAgainstDesign(t *testing.T) {
	dir := t.TempDir()
	built := filepath.Join(dir, "built.toml")
	if err := os.WriteFile(built, []byte(builtCar), 0o644); err != nil {
		t.Fatal(err)
	}
	logPath := filepath.Join(dir, "rig.csv")
	if code, _, errs := run(t, "simulate", "--setup", built, "--test", "rig", "--out", logPath,
		"--duration", "300", "--noise", "0.05", "--units", "mixed", "--seed", "11"); code != 0 {
		t.Fatalf("simulate: %s", errs)
	}

	// Loose targets: the verdict passes and the exit code is 0.
	loose := designWithTargets(t, dir, "ride_rate_tolerance_pct = 15\naxle_damping_tolerance_pct = 30\n")
	jsonPath := filepath.Join(dir, "result.json")
	reportDir := filepath.Join(dir, "report")
	code, out, errs := run(t, "analyze", logPath, "--setup", loose, "--json", jsonPath, "--report", reportDir)
	if code != exitOK {
		t.Fatalf("analyze with loose targets: exit %d\n%s\n%s", code, out, errs)
	}
	if res := readResult(t, jsonPath); res.Updated == nil || len(res.Comparison) != 2 {
		t.Errorf("result lacks the update or the comparison")
	}
	for _, want := range []string{"rear ride rate", "Checks", "[PASS]"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q", want)
		}
	}
	for _, f := range []string{"report.html", "frf.png", "mode-shapes.png", "stabilisation.png", "mode-indicator.png"} {
		if _, err := os.Stat(filepath.Join(reportDir, f)); err != nil {
			t.Errorf("report: %v", err)
		}
	}

	// Tight rate targets: the rear rate is 10 % off, so the verdict fails, the
	// exit code is 3 and the outputs are still written.
	tight := designWithTargets(t, dir, "ride_rate_tolerance_pct = 5\n")
	jsonTight := filepath.Join(dir, "tight.json")
	code, out, _ = run(t, "analyze", logPath, "--setup", tight, "--json", jsonTight)
	if code != exitTargets {
		t.Fatalf("analyze with tight targets: exit %d, want %d\n%s", code, exitTargets, out)
	}
	failed := false
	for _, c := range readResult(t, jsonTight).Checks {
		if c.Status == "fail" && strings.Contains(c.Name, "rear") {
			failed = true
		}
	}
	if !failed {
		t.Errorf("no failed rear-rate check in %s", out)
	}

	// The same modes through compare give the same verdict.
	code, _, _ = run(t, "compare", "--modes", jsonPath, "--setup", tight)
	if code != exitTargets {
		t.Errorf("compare: exit %d, want %d", code, exitTargets)
	}
}

func TestAnalyzeDropEndToEnd(t *testing.T) {
	dir := t.TempDir()
	dropSetup := dropSetupFile(t, dir)
	logPath := filepath.Join(dir, "drop.csv")
	if code, _, errs := run(t, "simulate", "--setup", dropSetup, "--test", "drop", "--out", logPath,
		"--noise", "0.01", "--rate", "400", "--offset", "0.3"); code != 0 {
		t.Fatalf("simulate: %s", errs)
	}
	jsonPath := filepath.Join(dir, "drop.json")
	code, out, errs := run(t, "analyze", logPath, "--setup", dropSetup, "--json", jsonPath, "--report", filepath.Join(dir, "rep"))
	if code != 0 {
		t.Fatalf("exit %d\n%s\n%s", code, out, errs)
	}
	res := readResult(t, jsonPath)
	if res.Test != "drop" || len(res.Modes) != 2 {
		t.Fatalf("result %+v", res)
	}
	// A drop with 1 % noise: both modes within 3 reported sd of the model,
	// which is the truth here.
	for i, m := range res.Modes {
		p := res.Model.Modes[i]
		if m.Label != p.Label || math.Abs(m.NaturalFrequencyHz-p.NaturalFrequencyHz) > 3*m.Uncertainty.NaturalFrequencyHz {
			t.Errorf("mode %d: %s %.4f ± %.4f Hz, model %s %.4f Hz", i, m.Label, m.NaturalFrequencyHz,
				m.Uncertainty.NaturalFrequencyHz, p.Label, p.NaturalFrequencyHz)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "rep", "time-history.png")); err != nil {
		t.Error(err)
	}
	// An upside-down band is a usage error, not a crash in the fit.
	if code, _, errs := run(t, "analyze", logPath, "--setup", dropSetup, "--band-low", "5", "--band-high", "2"); code != exitUsage ||
		!strings.Contains(errs, "0 < low < high") {
		t.Errorf("upside-down band: exit %d, %s", code, errs)
	}
}

func TestSpectraCommand(t *testing.T) {
	dir := t.TempDir()
	logPath := filepath.Join(dir, "rig.csv")
	if code, _, errs := run(t, "simulate", "--setup", exampleSetup, "--test", "rig", "--out", logPath,
		"--duration", "120", "--noise", "0.05"); code != 0 {
		t.Fatalf("simulate: %s", errs)
	}
	csvPath := filepath.Join(dir, "frf.csv")
	code, out, errs := run(t, "spectra", logPath, "--setup", exampleSetup, "--csv", csvPath)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	header := strings.SplitN(string(data), "\n", 2)[0]
	for _, want := range []string{"body_front/pan_front", "body_rear/pan_rear", "coherence"} {
		if !strings.Contains(header, want) {
			t.Errorf("header lacks %q: %s", want, header)
		}
	}
	if !strings.Contains(out, "choice:") {
		t.Errorf("no choices printed: %s", out)
	}
	// Bad data: a log without the setup's channels fails with exit 1 and no output.
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("time [s],other [g]\n0,1\n0.01,2\n"), 0o644)
	out2 := filepath.Join(dir, "never.csv")
	if code, _, errs := run(t, "spectra", bad, "--setup", exampleSetup, "--csv", out2); code != exitData ||
		!strings.Contains(errs, "bad.csv") {
		t.Errorf("bad log: exit %d, %s", code, errs)
	}
	if _, err := os.Stat(out2); err == nil {
		t.Error("an output was left behind after a failure")
	}
}

// dropSetupFile writes the example setup without its [[input]] tables (a
// drop-test setup) into dir and returns its path.
func dropSetupFile(t *testing.T, dir string) string {
	t.Helper()
	base, err := os.ReadFile(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	text := string(base)
	p := filepath.Join(dir, "drop.toml")
	if err := os.WriteFile(p, []byte(text[:strings.Index(text, "[[input]]")]), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
