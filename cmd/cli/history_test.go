package cli

import (
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestHistoryCSVOfACar: drop logs of two cars recorded with analyze --store
// (one of them twice), then history --car writes that car's runs as CSV in
// the order they were analysed, value for value as analyze wrote them in its
// JSON results, each log once.
func TestHistoryCSVOfACar(t *testing.T) {
	dir := t.TempDir()
	storePath := filepath.Join(dir, "campaign.sqlite")
	coupe := "../../testdata/example/coupe-springs.toml"
	type logRun struct{ setup, name string }
	var hatch []string
	for i, lr := range []logRun{{exampleSetup, "drop-1"}, {exampleSetup, "drop-2"}, {coupe, "coupe-1"}, {exampleSetup, "drop-3"}, {exampleSetup, "drop-1"}} {
		logPath := filepath.Join(dir, lr.name+".csv")
		if _, err := os.Stat(logPath); err != nil {
			if code, _, errs := run(t, "simulate", "--setup", lr.setup, "--test", "drop", "--out", logPath,
				"--noise", "0.01", "--rate", "200", "--seed", fmt.Sprint(i+1)); code != 0 {
				t.Fatalf("simulate: %s", errs)
			}
		}
		jsonPath := filepath.Join(dir, fmt.Sprintf("%s-%d.json", lr.name, i))
		if code, out, errs := run(t, "analyze", logPath, "--setup", lr.setup, "--test", "drop", "--json", jsonPath, "--store", storePath); code != 0 && code != exitTargets && code != exitInconclusive {
			t.Fatalf("analyze %s: exit %d\n%s\n%s", lr.name, code, out, errs)
		}
		switch {
		case lr.setup != exampleSetup:
		case i < 4:
			hatch = append(hatch, jsonPath)
		default: // drop-1 again: it replaces the first, as analysed last
			hatch = append(hatch[1:], jsonPath)
		}
	}
	csvPath := filepath.Join(dir, "hatch.csv")
	reportDir := filepath.Join(dir, "trend")
	code, out, errs := run(t, "history", "--store", storePath, "--car", "example hatchback", "--csv", csvPath,
		"--json", filepath.Join(dir, "hatch.json"), "--report", reportDir)
	if code != 0 {
		t.Fatalf("history: exit %d\n%s", code, errs)
	}
	for _, p := range []string{filepath.Join(dir, "hatch.json"), filepath.Join(reportDir, "index.html")} {
		if _, err := os.Stat(p); err != nil {
			t.Error(err)
		}
	}
	if !strings.Contains(out, "pitch frequency [Hz]") || strings.Contains(out, "coupe") {
		t.Errorf("history table:\n%s", out)
	}
	checkHistoryCSV(t, csvPath, hatch)

	// Mistakes: a store that does not exist is not created; an unknown car
	// is named with the cars there are.
	missing := filepath.Join(dir, "nothing.sqlite")
	if code, _, errs := run(t, "history", "--store", missing); code != 1 || !strings.Contains(errs, "does not exist") {
		t.Errorf("missing store: exit %d, %s", code, errs)
	}
	if _, err := os.Stat(missing); err == nil {
		t.Error("history created the missing store")
	}
	if code, _, errs := run(t, "history", "--store", storePath, "--car", "hatch"); code != 1 || !strings.Contains(errs, "example coupe, example hatchback") {
		t.Errorf("unknown car: exit %d, %s", code, errs)
	}
}

// checkHistoryCSV compares the history CSV of the hatchback with the results
// it was recorded from (hatch, in the store's run order).
func checkHistoryCSV(t *testing.T, csvPath string, hatch []string) {
	t.Helper()
	f, err := os.Open(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+len(hatch) {
		t.Fatalf("%d CSV rows, want a header and %d runs (the log recorded twice once)", len(rows), len(hatch))
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for k, row := range rows[1:] {
		res := readResult(t, hatch[k])
		if row[col["car"]] != "example hatchback" || row[col["run"]] != fmt.Sprintf("drop-%d", (k+1)%3+1) || row[col["test"]] != "drop" {
			t.Errorf("row %d: car %q run %q test %q", k+1, row[col["car"]], row[col["run"]], row[col["test"]])
		}
		for _, c := range []struct {
			name string
			want float64
		}{
			{"pitch_natural_frequency_hz", res.Modes[1].NaturalFrequencyHz},
			{"bounce_damping_ratio_sd", res.Modes[0].Uncertainty.DampingRatio},
			{"rear_rate_n_per_m", res.Updated.RearRateNPerM},
			{"rear_rate_design_n_per_m", 41000}, // hatchback.toml's rear_rate_n_per_m
		} {
			if got, err := strconv.ParseFloat(row[col[c.name]], 64); err != nil || got != c.want {
				t.Errorf("row %d %s = %q, want %v", k+1, c.name, row[col[c.name]], c.want)
			}
		}
	}
}
