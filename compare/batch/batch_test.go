package batch_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/batch"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/ingest"
)

// exampleSetup is the invented example car with a two-post rig; it has no
// [targets].
const exampleSetup = "../../testdata/example/hatchback.toml"

// rigLogS is the length of the tests' rig logs: 180 s at 200 Hz, long
// enough for the resolution the example car's damping needs (a minute
// leaves a resolution bias of several per cent, which the stated sd carries,
// so a design car's checks come out inconclusive), and analysed in a few
// tens of milliseconds.
const rigLogS = 180

// stiffRear scales the rear ride rate of the "as built" car of the tests:
// 40 % over the design, far outside a 12 % tolerance.
const stiffRear = 1.4

// targetsSetup writes the example car with [targets] into dir.
func targetsSetup(t *testing.T, dir string) string {
	t.Helper()
	text, err := os.ReadFile(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	text = append(text, []byte(`
[targets]
bounce_frequency_tolerance_pct = 6
pitch_frequency_tolerance_pct = 6
ride_rate_tolerance_pct = 12
`)...)
	path := filepath.Join(dir, "car.toml")
	if err := os.WriteFile(path, text, 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// writeLog simulates a log of the example car with its rear ride rate
// scaled by rearScale (1: the design, which is then the truth) and writes
// it at path.
func writeLog(t *testing.T, path, test string, rearScale float64, seed uint64) {
	t.Helper()
	setup, err := ingest.LoadSetup(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	setup.Vehicle.RearRateNPerM *= rearScale
	o := simulate.Defaults(test)
	o.NoiseFraction, o.Seed = 0.02, seed
	if test == "rig" {
		o.DurationS = rigLogS
	}
	log, err := simulate.Run(setup, test, o)
	if err != nil {
		t.Fatal(err)
	}
	if err := log.WriteFile(path); err != nil {
		t.Fatal(err)
	}
}

// campaignFolder writes three good rig logs (two of the design car, one
// with a stiff rear) and three broken ones into a new folder.
func campaignFolder(t *testing.T) (logDir, setup string) {
	dir := t.TempDir()
	setup = targetsSetup(t, dir)
	logDir = filepath.Join(dir, "logs")
	if err := os.Mkdir(logDir, 0o755); err != nil {
		t.Fatal(err)
	}
	writeLog(t, filepath.Join(logDir, "a-design.csv"), "rig", 1, 1)
	writeLog(t, filepath.Join(logDir, "b-design.csv"), "rig", 1, 2)
	writeLog(t, filepath.Join(logDir, "c-stiff.csv"), "rig", stiffRear, 3)
	// A bad cell on line 20, a drop log read as a rig log, an empty file.
	writeLog(t, filepath.Join(logDir, "bad-cell.csv"), "rig", 1, 4)
	text, err := os.ReadFile(filepath.Join(logDir, "bad-cell.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(text), "\n")
	lines[19] = strings.Replace(lines[19], ",", ",x", 1)
	writeFile(t, filepath.Join(logDir, "bad-cell.csv"), strings.Join(lines, "\n"))
	writeLog(t, filepath.Join(logDir, "drop-as-rig.csv"), "drop", 1, 5)
	writeFile(t, filepath.Join(logDir, "empty.csv"), "")
	writeFile(t, filepath.Join(logDir, "notes.txt"), "not a log: not a *.csv file, so the folder's campaign leaves it out")
	return logDir, setup
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestFolderOfGoodAndBrokenLogs: a folder of good and broken logs gives one
// row per log in sorted order, each broken log with its reason and no
// result file, the good ones with their verdicts (the design car passes,
// the stiff rear fails its rear rate target), the worst verdict "error"
// (exit code 1), and the same summaries byte for byte with 1 and 2 workers.
func TestFolderOfGoodAndBrokenLogs(t *testing.T) {
	logDir, setup := campaignFolder(t)
	c, err := batch.Expand([]string{logDir}, setup, "")
	if err != nil {
		t.Fatal(err)
	}
	var summaries [2][2][]byte
	var b *batch.Batch
	for i, workers := range []int{1, 2} {
		out := filepath.Join(t.TempDir(), "out")
		calls := 0
		b, err = batch.Run(context.Background(), c, batch.Options{Out: out, Workers: workers,
			Job: job.Options{ToolVersion: "test"}, Done: func(int) { calls++ }})
		if err != nil {
			t.Fatal(err)
		}
		if calls != len(c.Items) {
			t.Errorf("%d workers: Done called %d times for %d logs", workers, calls, len(c.Items))
		}
		for j, name := range []string{batch.SummaryCSV, batch.SummaryJSON} {
			if summaries[i][j], err = os.ReadFile(filepath.Join(out, name)); err != nil {
				t.Fatal(err)
			}
		}
		checkRowsMatchResults(t, out, summaries[i][1])
	}
	for j, name := range []string{batch.SummaryCSV, batch.SummaryJSON} {
		if !bytes.Equal(summaries[0][j], summaries[1][j]) {
			t.Errorf("%s differs between 1 and 2 workers:\n%s\n---\n%s", name, summaries[0][j], summaries[1][j])
		}
	}

	want := []struct{ run, verdict, err string }{
		{"a-design", compare.StatusPass, ""},
		{"b-design", compare.StatusPass, ""},
		{"bad-cell", store.VerdictError, "bad-cell.csv:20"},
		{"c-stiff", compare.StatusFail, ""},
		{"drop-as-rig", store.VerdictError, "--test drop"},
		{"empty", store.VerdictError, "empty.csv"},
	}
	rows := readCSV(t, summaries[0][0])
	if len(rows) != len(want)+1 {
		t.Fatalf("summary.csv has %d lines, want a header and %d rows:\n%s", len(rows), len(want), summaries[0][0])
	}
	col := func(name string) int { return slices.Index(rows[0], name) }
	for i, w := range want {
		r := rows[i+1]
		if r[col("run")] != w.run || r[col("verdict")] != w.verdict || r[col("car")] != "example hatchback" ||
			!strings.Contains(r[col("error")], w.err) || (w.err == "") != (r[col("result_json")] != "") {
			t.Errorf("row %d: run %q verdict %q error %q result %q; want %s, %s, an error naming %q",
				i+1, r[col("run")], r[col("verdict")], r[col("error")], r[col("result_json")], w.run, w.verdict, w.err)
		}
	}
	if got := b.Worst(); got != store.VerdictError {
		t.Errorf("worst verdict %q, want %q", got, store.VerdictError)
	}
	if n := b.Count(store.VerdictError); n != 3 {
		t.Errorf("%d failed logs, want 3", n)
	}
	if tr := b.Trend(); tr.Car != "example hatchback" || len(tr.Runs) != len(want) || tr.Runs[3].Run != "c-stiff" {
		t.Errorf("trend view: car %q, %d runs", tr.Car, len(tr.Runs))
	}
}

// checkRowsMatchResults: every analysed row of summary.jsonl holds the
// values of its result file (a round trip through the summary), and the
// design car's modes lie within 4 stated sd of the model, the truth here.
func checkRowsMatchResults(t *testing.T, out string, jsonl []byte) {
	t.Helper()
	for line := range strings.Lines(string(jsonl)) {
		var row map[string]any
		if err := json.Unmarshal([]byte(line), &row); err != nil {
			t.Fatalf("summary.jsonl: %v in %s", err, line)
		}
		if row["result_json"] == "" {
			if row["bounce_natural_frequency_hz"] != nil || row["error"] == "" {
				t.Errorf("failed row %v: values without a result, or no message", row)
			}
			continue
		}
		data, err := os.ReadFile(filepath.Join(out, row["result_json"].(string)))
		if err != nil {
			t.Fatal(err)
		}
		var res compare.Result
		if err := json.Unmarshal(data, &res); err != nil {
			t.Fatal(err)
		}
		for i, m := range res.Modes {
			got, gotSD := row[m.Label+"_natural_frequency_hz"], row[m.Label+"_natural_frequency_sd_hz"]
			if got != m.NaturalFrequencyHz || gotSD != m.Uncertainty.NaturalFrequencyHz || row[m.Label+"_flagged"] != m.Flagged {
				t.Errorf("%s %s: summary %v ± %v, result %v ± %v", row["run"], m.Label, got, gotSD, m.NaturalFrequencyHz, m.Uncertainty.NaturalFrequencyHz)
			}
			if p := res.Model.Modes[i]; strings.Contains(row["run"].(string), "design") &&
				math.Abs(m.NaturalFrequencyHz-p.NaturalFrequencyHz) > 4*m.Uncertainty.NaturalFrequencyHz {
				t.Errorf("%s %s: %.4f ± %.4f Hz, model (truth) %.4f Hz", row["run"], m.Label, m.NaturalFrequencyHz, m.Uncertainty.NaturalFrequencyHz, p.NaturalFrequencyHz)
			}
		}
		if row["rear_rate_n_per_m"] != res.Updated.RearRateNPerM || row["verdict"] != res.Verdict.Status {
			t.Errorf("%s: rear rate %v, verdict %v; result %v, %v", row["run"], row["rear_rate_n_per_m"], row["verdict"], res.Updated.RearRateNPerM, res.Verdict.Status)
		}
	}
}

func readCSV(t *testing.T, data []byte) [][]string {
	t.Helper()
	rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// TestCancelledCampaignWritesNoSummary: a cancelled context stops the
// campaign with its error, and no summary is written.
func TestCancelledCampaignWritesNoSummary(t *testing.T) {
	logDir, setup := campaignFolder(t)
	c, err := batch.Expand([]string{filepath.Join(logDir, "*-design.csv")}, setup, "")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	out := filepath.Join(t.TempDir(), "out")
	if _, err := batch.Run(ctx, c, batch.Options{Out: out}); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled campaign: %v", err)
	}
	for _, name := range []string{batch.SummaryCSV, batch.SummaryJSON} {
		if _, err := os.Stat(filepath.Join(out, name)); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("%s written by a cancelled campaign (%v)", name, err)
		}
	}
}

// TestOutputMayNotReplaceInputs: a log folder given as the output folder,
// whose summary.csv the campaign would read as a log, is refused.
func TestOutputMayNotReplaceInputs(t *testing.T) {
	dir := t.TempDir()
	setup := targetsSetup(t, dir)
	writeLog(t, filepath.Join(dir, "summary.csv"), "rig", 1, 1)
	c, err := batch.Expand([]string{dir}, setup, "")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := batch.Run(context.Background(), c, batch.Options{Out: dir}); err == nil || !strings.Contains(err.Error(), "would replace the input") {
		t.Errorf("output over an input: %v", err)
	}
}

// TestWorstFollowsExitCodes: the worst verdict orders failed logs over
// failed checks over inconclusive ones (exit codes 1 > 3 > 4 > 0).
func TestWorstFollowsExitCodes(t *testing.T) {
	row := func(status string) batch.Row { return batch.Row{Record: store.Run{Verdict: status}} }
	for _, c := range []struct {
		verdicts []string
		want     string
	}{
		{[]string{"pass", "none", "inconclusive", "fail", "error"}, store.VerdictError},
		{[]string{"inconclusive", "fail", "pass"}, compare.StatusFail},
		{[]string{"none", "inconclusive", "pass"}, compare.StatusInconclusive},
		{[]string{"none", "pass"}, ""},
		{nil, ""},
	} {
		b := &batch.Batch{}
		for _, v := range c.verdicts {
			b.Rows = append(b.Rows, row(v))
		}
		if got := b.Worst(); got != c.want {
			t.Errorf("%v: worst %q, want %q", c.verdicts, got, c.want)
		}
	}
}

// TestExpandInputs: files, folders (their *.csv files, any case, not
// sub-folders) and patterns give each log once, sorted; a missing input or
// a pattern without a match is an error that names it.
func TestExpandInputs(t *testing.T) {
	dir := t.TempDir()
	setup := targetsSetup(t, dir)
	for _, name := range []string{"b.csv", "A.CSV", "c.txt", "sub/d.csv", "other/e.csv", "other/f.log"} {
		if err := os.MkdirAll(filepath.Dir(filepath.Join(dir, name)), 0o755); err != nil {
			t.Fatal(err)
		}
		writeFile(t, filepath.Join(dir, name), "")
	}
	c, err := batch.Expand([]string{filepath.Join(dir, "other", "*.log"), dir, filepath.Join(dir, "b.csv"), filepath.Join(dir, "o*")}, setup, "drop")
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, it := range c.Items {
		rel, _ := filepath.Rel(dir, it.Log)
		got = append(got, filepath.ToSlash(rel)+":"+it.Run+":"+it.Test)
	}
	want := []string{"A.CSV:A:drop", "b.csv:b:drop", "other/e.csv:e:drop", "other/f.log:f:drop"}
	if !slices.Equal(got, want) {
		t.Errorf("expanded %v, want %v", got, want)
	}
	for _, in := range []string{filepath.Join(dir, "missing.csv"), filepath.Join(dir, "*.dat"), filepath.Join(dir, "[")} {
		if _, err := batch.Expand([]string{in}, setup, ""); err == nil || !strings.Contains(err.Error(), in) {
			t.Errorf("%s: %v, want an error naming it", in, err)
		}
	}
	if _, err := batch.Expand([]string{filepath.Join(dir, "b.csv")}, filepath.Join(dir, "c.txt"), ""); err == nil {
		t.Errorf("a setup that is not one: no error")
	}
}

// TestResultNames: result names are the same for the same item, differ for
// logs of one name in two folders and for one log under two tests.
func TestResultNames(t *testing.T) {
	a := batch.Item{Log: "day1/rig.csv", Setup: "car.toml"}
	b := batch.Item{Log: "day2/rig.csv", Setup: "car.toml"}
	d := batch.Item{Log: "day1/rig.csv", Setup: "car.toml", Test: "drop"}
	names := []string{a.ResultName(), b.ResultName(), d.ResultName()}
	if a.ResultName() != names[0] || !strings.HasPrefix(names[0], "rig-") || !strings.HasSuffix(names[0], ".json") {
		t.Errorf("name %q", names[0])
	}
	if names[0] == names[1] || names[0] == names[2] {
		t.Errorf("names collide: %v", names)
	}
	if len(strings.TrimSuffix(strings.TrimPrefix(names[0], "rig-"), ".json")) != 16 {
		t.Errorf("name %q: want 16 hex digits", names[0])
	}
	if _, err := strconv.ParseUint(names[0][4:20], 16, 64); err != nil {
		t.Errorf("name %q: %v", names[0], err)
	}
}

// TestManifestCampaignRecordsEachRunOnce: a manifest of mixed tests (its
// test column), good, missing and empty logs, run twice into one SQLite
// store, leaves one run per row with its verdict and metadata: recording
// again replaces, and a log that cannot be read is keyed by its path, so
// two of them do not replace each other.
func TestManifestCampaignRecordsEachRunOnce(t *testing.T) {
	dir := t.TempDir()
	targetsSetup(t, dir)
	writeLog(t, filepath.Join(dir, "rig.csv"), "rig", 1, 1)
	writeLog(t, filepath.Join(dir, "drop.csv"), "drop", stiffRear, 2)
	writeFile(t, filepath.Join(dir, "empty.csv"), "")
	manifest := filepath.Join(dir, "campaign.csv")
	writeFile(t, manifest, "log,setup,car,run,test,date\n"+
		"rig.csv,car.toml,HX2,1,,2026-03-02\n"+
		"drop.csv,car.toml,HX2,2,drop,2026-03-03\n"+
		"missing.csv,car.toml,HX2,3,,2026-03-04\n"+
		"gone.csv,car.toml,HX2,4,,2026-03-04\n"+
		"empty.csv,car.toml,HX2,5,,2026-03-05\n")
	c, err := batch.ReadManifest(manifest, "")
	if err != nil {
		t.Fatal(err)
	}
	st, err := store.Open(context.Background(), filepath.Join(dir, "campaign.sqlite"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	for range 2 {
		if _, err := batch.Run(context.Background(), c, batch.Options{Out: filepath.Join(dir, "out"), Workers: 2, Store: st,
			Job: job.Options{ToolVersion: "test"}}); err != nil {
			t.Fatal(err)
		}
	}
	runs, err := st.Runs(context.Background(), store.Filter{Car: "HX2"})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]struct{ test, verdict, err string }{
		"1": {"rig", compare.StatusPass, ""},
		"2": {"drop", compare.StatusFail, ""},
		"3": {"rig", store.VerdictError, "missing.csv"},
		"4": {"rig", store.VerdictError, "gone.csv"},
		"5": {"rig", store.VerdictError, "empty.csv"},
	}
	if len(runs) != len(want) {
		t.Fatalf("%d runs in the store after recording %d logs twice", len(runs), len(want))
	}
	for _, r := range runs {
		w := want[r.Run]
		if r.Test != w.test || r.Verdict != w.verdict || !strings.Contains(r.Error, w.err) || r.Meta["date"] == "" ||
			(r.Result == nil) != (w.err != "") {
			t.Errorf("run %s: test %q verdict %q error %q meta %v; want %s, %s, an error naming %q", r.Run, r.Test, r.Verdict, r.Error, r.Meta, w.test, w.verdict, w.err)
		}
	}
}

// TestStoreFailureStopsCampaign: a store that refuses a run stops the
// campaign with the store's error, and no summary is written.
func TestStoreFailureStopsCampaign(t *testing.T) {
	logDir, setup := campaignFolder(t)
	c, err := batch.Expand([]string{logDir}, setup, "")
	if err != nil {
		t.Fatal(err)
	}
	st, err := store.Open(context.Background(), filepath.Join(t.TempDir(), "campaign.sqlite"))
	if err != nil {
		t.Fatal(err)
	}
	st.Close() // every Record now fails
	out := filepath.Join(t.TempDir(), "out")
	if _, err := batch.Run(context.Background(), c, batch.Options{Out: out, Workers: 2, Store: st}); err == nil || errors.Is(err, context.Canceled) {
		t.Fatalf("closed store: %v, want the store's error", err)
	}
	if _, err := os.Stat(filepath.Join(out, batch.SummaryCSV)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("summary written after the store failed (%v)", err)
	}
}

// TestShardsShareOneStore: the two shards of a campaign, run at once with
// a store handle each (as two processes would be) into one SQLite file,
// leave every log recorded once, and each shard's summary holds its own
// logs only.
func TestShardsShareOneStore(t *testing.T) {
	logDir, setup := campaignFolder(t)
	c, err := batch.Expand([]string{logDir}, setup, "")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	target := filepath.Join(dir, "campaign.sqlite")
	// Created first: store.Open of one new SQLite file by two processes at
	// once can fail with SQLITE_BUSY while both switch it to WAL.
	st, err := store.Open(context.Background(), target)
	if err != nil {
		t.Fatal(err)
	}
	st.Close()
	errs := make(chan error, 2)
	for i := 1; i <= 2; i++ {
		go func() {
			st, err := store.Open(context.Background(), target)
			if err != nil {
				errs <- err
				return
			}
			defer st.Close()
			part := c.Select(batch.Shard{Index: i, Count: 2})
			b, err := batch.Run(context.Background(), part, batch.Options{Out: filepath.Join(dir, strconv.Itoa(i)), Store: st,
				Job: job.Options{ToolVersion: "test"}})
			if err == nil && len(b.Rows) != 3 {
				err = fmt.Errorf("shard %d/2: %d rows, want 3", i, len(b.Rows))
			}
			errs <- err
		}()
	}
	for range 2 {
		if err := <-errs; err != nil {
			t.Fatal(err)
		}
	}
	if st, err = store.Open(context.Background(), target); err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	runs, err := st.Runs(context.Background(), store.Filter{})
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, r := range runs {
		names = append(names, r.Run)
	}
	slices.Sort(names)
	if want := []string{"a-design", "b-design", "bad-cell", "c-stiff", "drop-as-rig", "empty"}; !slices.Equal(names, want) {
		t.Errorf("runs in the store %v, want %v", names, want)
	}
}

// TestHandMadeCampaign: a campaign built in code, not by Expand or
// ReadManifest, has its setups loaded by Run; one that does not load stops
// the campaign before any log is analysed.
func TestHandMadeCampaign(t *testing.T) {
	logDir, setup := campaignFolder(t)
	c := &batch.Campaign{Items: []batch.Item{{Log: filepath.Join(logDir, "a-design.csv"), Setup: setup, Car: "HX2", Run: "1"}}}
	b, err := batch.Run(context.Background(), c, batch.Options{Out: filepath.Join(t.TempDir(), "out")})
	if err != nil || len(b.Rows) != 1 || b.Rows[0].Record.Verdict != compare.StatusPass {
		t.Fatalf("hand-made campaign: %v, %+v", err, b)
	}
	c.Items[0].Setup = filepath.Join(logDir, "notes.txt")
	if _, err := batch.Run(context.Background(), c, batch.Options{Out: filepath.Join(t.TempDir(), "out")}); err == nil {
		t.Errorf("a setup that does not load: no error")
	}
}
