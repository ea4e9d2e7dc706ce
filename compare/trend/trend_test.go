package trend_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/compare/trend"
)

// truth is a car's true state in a synthetic campaign: its mode
// frequencies (Hz), damping ratios and ride rates (N/m).
type truth struct{ fb, fp, zb, zp, kf, kr float64 }

// before is the state before the spring change, after it the state with
// stiffer rear springs: the pitch frequency and the rear rate step up.
var (
	before = truth{fb: 1.18, fp: 1.42, zb: 0.28, zp: 0.31, kf: 41000, kr: 44000}
	after  = truth{fb: 1.20, fp: 1.50, zb: 0.27, zp: 0.30, kf: 41000, kr: 49500}
)

// Measurement standard deviations of the synthetic runs (seeded normal
// scatter with these sds, the same values reported as the runs' sds).
const (
	sdHz   = 0.004
	sdZeta = 0.006
	sdRate = 400.0
)

// campaign is n synthetic runs of one car, the state stepping from before to
// after at run step (1-based; 0: never), each result as analyze writes it
// (modes with uncertainties, model, updated rates), seeded.
func campaign(n, step int, seed uint64) []store.Run {
	rng := rand.New(rand.NewPCG(seed, 0))
	var runs []store.Run
	for i := 1; i <= n; i++ {
		tr := before
		notes := ""
		if step > 0 && i >= step {
			tr = after
		}
		if i == step {
			notes = "after spring change"
		}
		mode := func(label string, f, z float64) compare.ModeJSON {
			return compare.ModeJSON{Label: label, NaturalFrequencyHz: f + sdHz*rng.NormFloat64(), DampingRatio: z + sdZeta*rng.NormFloat64(),
				Uncertainty: &compare.Uncertainty{NaturalFrequencyHz: sdHz, DampingRatio: sdZeta}}
		}
		res := &compare.Result{
			Tool: compare.Tool{Name: "ridemodes", Version: "test"}, Test: "rig",
			Modes: []compare.ModeJSON{mode("bounce", tr.fb, tr.zb), mode("pitch", tr.fp, tr.zp)},
			Model: &compare.ModelJSON{Rates: compare.RatesJSON{FrontRateNPerM: before.kf, RearRateNPerM: before.kr},
				Modes: []compare.ModeJSON{{Label: "bounce", NaturalFrequencyHz: before.fb, DampingRatio: before.zb},
					{Label: "pitch", NaturalFrequencyHz: before.fp, DampingRatio: before.zp}}},
			Updated: &compare.Updated{FrontRateNPerM: tr.kf + sdRate*rng.NormFloat64(), RearRateNPerM: tr.kr + sdRate*rng.NormFloat64(),
				Uncertainty: &compare.UpdatedUncertainty{FrontRateNPerM: sdRate, RearRateNPerM: sdRate}},
			Verdict: &compare.Verdict{Status: compare.StatusPass},
		}
		r := store.Run{RunKey: fmt.Sprintf("%064x", i), Car: "hatch-01", Run: fmt.Sprint(i), Test: "rig", Verdict: compare.StatusPass,
			AnalysedAt: time.Date(2031, 5, i, 9, 0, 0, 0, time.UTC), Result: res, Meta: map[string]string{}}
		if notes != "" {
			r.Meta["notes"] = notes
		}
		runs = append(runs, r)
	}
	return runs
}

// TestSpringChangeIsNamed: in a campaign whose rear springs were changed
// before run 9 (a known step of 20 sd in pitch frequency and 14 sd in rear
// rate), that run is named for both, as the brief's sentence has it, and
// nothing is found in the quantities that did not move (bounce damping,
// front rate).
func TestSpringChangeIsNamed(t *testing.T) {
	c := trend.Build("hatch-01", campaign(12, 9, 1))
	var named []string
	for _, f := range c.Findings {
		named = append(named, f.Sentence)
		if f.Quantity.Key() == "bounce_damping_ratio" || f.Quantity.Key() == "front_rate_n_per_m" {
			t.Errorf("a quantity that did not move is named: %s", f.Sentence)
		}
	}
	all := strings.Join(named, "\n")
	for _, want := range []string{
		"run 9 (after spring change): pitch frequency 1.",
		"Hz (± 0.008 Hz, 2 sd) beyond the upper control limit 1.",
		"run 8 -> run 9 (after spring change): pitch frequency moved 0.0",
		"run 9 (after spring change): rear ride rate ",
	} {
		if !strings.Contains(all, want) {
			t.Errorf("findings lack %q:\n%s", want, all)
		}
	}
	if c.Verdict != compare.StatusPass {
		t.Errorf("verdict %s", c.Verdict)
	}
}

// TestSteadyCampaignQuiet: 12 runs of one unchanged car, seeded scatter at
// the runs' own sd: the limits hold the runs (the chance of a false alarm
// is 0.27 % per value), and the limits' sigma is near the true sd.
func TestSteadyCampaignQuiet(t *testing.T) {
	c := trend.Build("hatch-01", campaign(12, 0, 2))
	for _, f := range c.Findings {
		t.Errorf("steady campaign: %s", f.Sentence)
	}
	for _, s := range c.Series {
		if s.Chart == nil {
			t.Fatalf("%s has no chart", s.Quantity.Name)
		}
		if s.Quantity.Key() == "pitch_natural_frequency_hz" && math.Abs(s.Chart.Sigma/sdHz-1) > 0.5 {
			t.Errorf("pitch sigma %g, true %g", s.Chart.Sigma, sdHz)
		}
	}
	if len(c.Notes) != 1 || !strings.Contains(c.Notes[0], "rough") {
		t.Errorf("notes %q", c.Notes)
	}
}

// TestTooFewRuns: two runs get no chart, and a note says so.
func TestTooFewRuns(t *testing.T) {
	c := trend.Build("", campaign(2, 0, 3))
	for _, s := range c.Series {
		if s.Chart != nil {
			t.Errorf("%s has a chart from 2 runs", s.Quantity.Name)
		}
	}
	if len(c.Notes) != len(trend.Quantities) || !strings.Contains(c.Notes[0], "too few") {
		t.Errorf("notes %q", c.Notes)
	}
}

// TestWorstVerdict: fail beats inconclusive beats pass beats none; a log
// that could not be analysed makes a passing campaign inconclusive.
func TestWorstVerdict(t *testing.T) {
	for _, c := range []struct {
		verdicts []string
		want     string
	}{
		{[]string{"pass", "fail", "inconclusive", "error"}, "fail"},
		{[]string{"pass", "inconclusive", "none"}, "inconclusive"},
		{[]string{"pass", "error"}, "inconclusive"},
		{[]string{"pass", "none"}, "pass"},
		{[]string{"none", "none"}, "none"},
		{nil, "none"},
	} {
		var runs []store.Run
		for i, v := range c.verdicts {
			runs = append(runs, store.Run{Run: fmt.Sprint(i + 1), RunKey: fmt.Sprint(i), Verdict: v})
		}
		got := trend.Build("", runs)
		if got.Verdict != c.want || got.Summary == "" {
			t.Errorf("%v: %s (%q), want %s", c.verdicts, got.Verdict, got.Summary, c.want)
		}
	}
}

// TestCSVAndJSON: the history table's CSV and JSON carry the same runs and
// columns: numbers in full precision, missing values empty (CSV) or null
// (JSON), metadata as meta_KEY columns or a meta object.
func TestCSVAndJSON(t *testing.T) {
	runs := campaign(4, 3, 4)
	runs = append(runs, store.Run{RunKey: strings.Repeat("e", 64), Car: "hatch-01", Run: "5", Verdict: store.VerdictError,
		Error: "logs/5.csv:3:2: not a number", AnalysedAt: time.Date(2031, 5, 9, 9, 0, 0, 0, time.UTC)})
	c := trend.Build("hatch-01", runs)
	var buf bytes.Buffer
	if err := c.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 6 {
		t.Fatalf("%d CSV rows, want a header and 5", len(rows))
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for _, name := range []string{"run_key", "car", "run", "test", "analysed_at", "verdict", "error", "log_path",
		"pitch_natural_frequency_hz", "pitch_natural_frequency_sd_hz", "pitch_natural_frequency_design_hz",
		"bounce_damping_ratio", "bounce_damping_ratio_sd", "rear_rate_n_per_m", "rear_rate_sd_n_per_m",
		"rear_rate_design_n_per_m", "pitch_flagged", "bounce_node_m", "drift", "meta_notes"} {
		if _, ok := col[name]; !ok {
			t.Errorf("CSV lacks column %s: %v", name, rows[0])
		}
	}
	want := runs[1].Result.Modes[1].NaturalFrequencyHz
	if got := rows[2][col["pitch_natural_frequency_hz"]]; got != fmt.Sprint(want) {
		t.Errorf("run 2 pitch frequency %s, want %v", got, want)
	}
	if got := rows[3][col["meta_notes"]]; got != "after spring change" {
		t.Errorf("run 3 notes %q", got)
	}
	failed := rows[5]
	if failed[col["verdict"]] != "error" || failed[col["error"]] == "" || failed[col["pitch_natural_frequency_hz"]] != "" || failed[col["pitch_flagged"]] != "" {
		t.Errorf("failed run row %q", failed)
	}

	buf.Reset()
	if err := c.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Car, Verdict, Summary string
		Runs                  []map[string]any
		Findings              []map[string]any
	}
	if err := json.Unmarshal(buf.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Car != "hatch-01" || doc.Verdict != "inconclusive" || len(doc.Runs) != 5 {
		t.Fatalf("JSON %s", buf.Bytes())
	}
	if got := doc.Runs[1]["pitch_natural_frequency_hz"]; got != want {
		t.Errorf("JSON run 2 pitch frequency %v, want %v", got, want)
	}
	if v, ok := doc.Runs[4]["pitch_natural_frequency_hz"]; !ok || v != nil {
		t.Errorf("JSON failed run's pitch frequency %v, want null", v)
	}
	if doc.Runs[2]["meta"].(map[string]any)["notes"] != "after spring change" {
		t.Errorf("JSON meta %v", doc.Runs[2]["meta"])
	}
	if len(doc.Runs[0]) != len(rows[0])-1+1 { // the CSV's columns less meta_notes, plus meta
		t.Errorf("JSON run has %d keys, CSV %d columns", len(doc.Runs[0]), len(rows[0]))
	}
}

// TestTerminalTable: the table has a line per run, marks the values beyond
// the limits and ends with the verdict.
func TestTerminalTable(t *testing.T) {
	c := trend.Build("hatch-01", campaign(12, 9, 1))
	var buf bytes.Buffer
	if err := c.WriteTable(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"pitch frequency [Hz]", "rear ride rate [N/m]", "*", "Drift", "run 9 (after spring change)", "Pass: all 12 runs"} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
}
