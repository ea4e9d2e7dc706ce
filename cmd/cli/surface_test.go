package cli

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The tests of this file run the command line as a user types it, one per
// item of the pass over every message, flag and number a user sees. Their
// logs come from compare/simulate (exact, see its tests) and the example
// hatchback (invented).

// simulated writes a log of the example car for test ("rig" or "drop")
// with 2 % noise and returns its path.
func simulated(t *testing.T, dir, test string, extra ...string) string {
	t.Helper()
	path := filepath.Join(dir, test+".csv")
	args := append([]string{"simulate", "--setup", exampleSetup, "--test", test, "--out", path, "--noise", "0.02"}, extra...)
	if code, _, errs := run(t, args...); code != exitOK {
		t.Fatalf("simulate: exit %d: %s", code, errs)
	}
	return path
}

// setupWith writes the example setup with each old line replaced by its new
// text (a new text of "" drops the line) and returns its path.
func setupWith(t *testing.T, dir, name string, replace ...string) string {
	t.Helper()
	data, err := os.ReadFile(exampleSetup)
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	for i := 0; i < len(replace); i += 2 {
		re := regexp.MustCompile(`(?m)^` + regexp.QuoteMeta(replace[i]) + `.*\n`)
		if !re.MatchString(text) {
			t.Fatalf("the example setup has no line %q", replace[i])
		}
		with := replace[i+1]
		if with != "" {
			with += "\n"
		}
		text = re.ReplaceAllLiteralString(text, with)
	}
	path := filepath.Join(dir, name)
	writeText(t, path, text)
	return path
}

// Item 1: every usage error exits 2, whichever layer finds it; an --end
// past the log clamps with a warning.
func TestUsageErrorsExitTwo(t *testing.T) {
	dir := t.TempDir()
	rig := simulated(t, dir, "rig", "--duration", "120")
	out := filepath.Join(dir, "out.csv")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"analyze", rig, "--setup", exampleSetup, "--start", "100", "--end", "10"}, "--end 10 s is not after --start 100 s"},
		{[]string{"analyze", rig, "--setup", exampleSetup, "--segment-samples", "1000"}, "power of two of at least 16 (got 1000; e.g. 1024)"},
		{[]string{"analyze", rig, "--setup", exampleSetup, "--segment", "1000"}, "--segment-samples takes"},
		{[]string{"analyze", rig, "--setup", exampleSetup, "--max-model-order", "5"}, "--max-model-order takes an even number"},
		{[]string{"analyze", rig, "--setup", exampleSetup, "--band-low", "5", "--band-high", "2"}, "0 < low < high"},
		{[]string{"analyze", rig, "--setup", exampleSetup, "--rate", "-200"}, "--rate takes"},
		{[]string{"analyze", rig, "--setup", exampleSetup, "--window", "triangle"}, `--window: unknown window "triangle"`},
		{[]string{"spectra", rig, "--setup", exampleSetup, "--csv", out, "--start", "-3"}, "--start takes"},
		{[]string{"simulate", "--setup", exampleSetup, "--test", "rig", "--out", out, "--units", "G"}, `--units takes "m/s^2", "g" or "mixed" (got "G"`},
		{[]string{"simulate", "--setup", exampleSetup, "--test", "rig", "--out", out, "--noise", "5"}, "--noise is a fraction from 0 to 1"},
		{[]string{"simulate", "--setup", exampleSetup, "--test", "drop", "--out", out, "--duration", "5", "--rear-delay", "9"}, "--rear-delay"},
		{[]string{"simulate", "--setup", exampleSetup, "--test", "rig", "--out", out, "--test-date", "2026-13-01"}, "--test-date takes a calendar date"},
	} {
		code, _, errs := run(t, c.args...)
		if code != exitUsage || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want exit 2 and %q", c.args[:1], code, errs, c.want)
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a refused command left its output behind")
	}
	code, stdout, errs := run(t, "analyze", rig, "--setup", exampleSetup, "--end", "400")
	if code != exitOK || !strings.Contains(stdout, "end_clamped: the window's end, 400 s (--end), lies after the log's last sample") {
		t.Errorf("--end past the log: exit %d, %s\n%s", code, errs, stdout)
	}
}

// Item 2: flags named like the setup keys they override, the old spellings
// as deprecated aliases that still work, the drive band's own names in
// simulate, --rate for a log without a time column, and advice that fits
// the band.
func TestFlagsNamedLikeSetupKeys(t *testing.T) {
	dir := t.TempDir()
	rig := simulated(t, dir, "rig", "--duration", "120")
	for _, spelling := range [][]string{{"--segment-samples", "--max-model-order"}, {"--segment", "--max-order"}} {
		jsonPath := filepath.Join(dir, "r.json")
		code, _, errs := run(t, "analyze", rig, "--setup", exampleSetup, spelling[0], "512", spelling[1], "8", "--json", jsonPath)
		if code != exitOK {
			t.Fatalf("%v: exit %d: %s", spelling, code, errs)
		}
		choices := strings.Join(readResult(t, jsonPath).Analysis.Choices, "\n")
		if !strings.Contains(choices, "segment length 512 samples") {
			t.Errorf("%v: the segment length did not reach the analysis:\n%s", spelling, choices)
		}
		deprecated := strings.Contains(errs, "--segment is deprecated: use --segment-samples") &&
			strings.Contains(errs, "--max-order is deprecated: use --max-model-order")
		if deprecated != (spelling[0] == "--segment") {
			t.Errorf("%v: deprecation notes %q", spelling, errs)
		}
	}
	// simulate's drive band has its own names; the old ones still work
	for _, flags := range [][]string{{"--drive-band-low", "--drive-band-high"}, {"--band-low", "--band-high"}} {
		path := filepath.Join(dir, "driven.csv")
		code, _, errs := run(t, "simulate", "--setup", exampleSetup, "--test", "rig", "--out", path, "--duration", "60",
			flags[0], "0.6", flags[1], "6")
		data, _ := os.ReadFile(path)
		if code != exitOK || !bytes.Contains(data, []byte("random drive 0.6-6 Hz")) {
			t.Errorf("%v: exit %d, %s", flags, code, errs)
		}
	}
	_, help, _ := run(t, "simulate", "--help")
	if strings.Contains(help, "--band-low") || !strings.Contains(help, "--drive-band-low") {
		t.Errorf("simulate --help should show the drive band's own names only:\n%s", help)
	}
	// a log without a time column: --rate, or the error names it
	noTime := filepath.Join(dir, "notime.csv")
	var b strings.Builder
	data, _ := os.ReadFile(rig)
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		b.WriteString(line[strings.IndexByte(line, ',')+1:] + "\n")
	}
	writeText(t, noTime, b.String())
	if code, _, errs := run(t, "analyze", noTime, "--setup", exampleSetup); code != exitData || !strings.Contains(errs, "--rate") {
		t.Errorf("no time column, no rate: exit %d, %s", code, errs)
	}
	if code, stdout, errs := run(t, "analyze", noTime, "--setup", exampleSetup, "--rate", "200"); code != exitOK ||
		!strings.Contains(stdout, "at 200 Hz") {
		t.Errorf("--rate 200: exit %d, %s", code, errs)
	}
	// a band far above the body modes: the advice is to narrow it
	code, _, errs := run(t, "analyze", rig, "--setup", exampleSetup, "--band-high", "20")
	if code != exitData || !strings.Contains(errs, "a narrower band around the body modes") || strings.Contains(errs, "wider band") {
		t.Errorf("--band-high 20: exit %d, %s", code, errs)
	}
}

// Item 3: a setup value far outside any car's is an error that says what
// it probably meant; one damper without the other is an error; a front far
// softer than the rear warns.
func TestSetupsCatchTypos(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name    string
		replace []string
		want    string
	}{
		{"kN/m as N/m", []string{"front_rate_n_per_m", "front_rate_n_per_m = 41"},
			"vehicle.front_rate_n_per_m: 41 N/m is far below any car's ride rate (per axle, both wheels); did you mean 41000 (41 kN/m"},
		{"t as kg", []string{"mass_kg", "mass_kg = 1.34"}, "1.34 kg is far below any car's sprung mass; did you mean 1340 (1.34 t)?"},
		{"mm as m", []string{"cg_to_front_axle_m", "cg_to_front_axle_m = 1050"}, "did you mean 1.05 (1050 mm)?"},
		{"kN s/m as N s/m", []string{"rear_damping_ns_per_m", "rear_damping_ns_per_m = 3"}, "did you mean 3000 (3 kN s/m"},
		{"one damper", []string{"rear_damping_ns_per_m", ""},
			"front_damping_ns_per_m is given but rear_damping_ns_per_m is not (or is 0)"},
	} {
		setup := setupWith(t, dir, "typo.toml", c.replace...)
		code, _, errs := run(t, "model", "--setup", setup)
		if code != exitData || !strings.Contains(errs, c.want) || strings.Contains(errs, "overdamped") {
			t.Errorf("%s: exit %d, %q; want %q", c.name, code, errs, c.want)
		}
	}
	// 12 kN/m at the front is a plausible rate, but a front ride frequency
	// about half the rear's is no flat ride: the guidance warns
	soft := setupWith(t, dir, "soft.toml", "front_rate_n_per_m", "front_rate_n_per_m = 12000")
	code, out, errs := run(t, "model", "--setup", soft)
	if code != exitOK || !strings.Contains(out, "[WARN] guidance.model.front_rear_frequency_ratio") {
		t.Errorf("soft front: exit %d, %s\n%s", code, errs, out)
	}
}

// Item 4: simulate refuses a car without damping and a noise above 1,
// warns when the log is too short for analyze, and its help shows one
// default per flag.
func TestSimulateRefusesWhatCannotBeACar(t *testing.T) {
	dir := t.TempDir()
	undamped := setupWith(t, dir, "undamped.toml", "front_damping_ns_per_m", "", "rear_damping_ns_per_m", "")
	out := filepath.Join(dir, "out.csv")
	for _, test := range []string{"rig", "drop"} {
		code, _, errs := run(t, "simulate", "--setup", undamped, "--test", test, "--out", out)
		if code != exitData || !strings.Contains(errs, "undamped.toml: a car needs damping at both axles to be simulated") {
			t.Errorf("%s without damping: exit %d, %s", test, code, errs)
		}
	}
	if code, _, errs := run(t, "simulate", "--setup", exampleSetup, "--test", "rig", "--out", out, "--noise", "5"); code != exitUsage ||
		!strings.Contains(errs, "e.g. 0.05 for 5 %") {
		t.Errorf("--noise 5: exit %d, %s", code, errs)
	}
	for _, c := range []struct {
		test, duration, want string
	}{
		{"rig", "20", "the 20 s rig log is shorter than the 60 s analyze needs"},
		{"drop", "2", "the 2 s drop log is shorter than"},
	} {
		code, _, errs := run(t, "simulate", "--setup", exampleSetup, "--test", c.test, "--out", out, "--duration", c.duration)
		if code != exitOK || !strings.Contains(errs, "warning: "+c.want) {
			t.Errorf("%s of %s s: exit %d, %s", c.test, c.duration, code, errs)
		}
	}
	if code, _, errs := run(t, "simulate", "--setup", exampleSetup, "--test", "drop", "--out", out); code != exitOK || errs != "" {
		t.Errorf("a default drop warns: %s", errs)
	}
	_, help, _ := run(t, "simulate", "--help")
	for _, line := range strings.Split(help, "\n") {
		if strings.Count(line, "default") > 1 {
			t.Errorf("two defaults in %q", line)
		}
	}
}

// Item 5: no message the tests of this item trigger, and no help text,
// names a Go identifier or an internal, and sources are cited for people.
func TestMessagesInUsersWords(t *testing.T) {
	dir := t.TempDir()
	rig := simulated(t, dir, "rig", "--duration", "120")
	jittery := filepath.Join(dir, "jittery.csv")
	writeText(t, jittery, "time [s],body_front [g],body_rear [g]\n0,0,0\n0.01,0.1,0.2\n0.02,0.2,0.1\n0.0315,0.1,0\n0.04,0,0\n")
	array := filepath.Join(dir, "array.json")
	writeText(t, array, `[{"label": "bounce", "natural_frequency_hz": 1.2}]`)
	var all strings.Builder
	for _, args := range [][]string{
		{"model", "--setup", exampleSetup},
		{"analyze", rig, "--setup", exampleSetup},
		{"analyze", rig, "--setup", exampleSetup, "--band-high", "20"},
		{"analyze", jittery, "--setup", exampleSetup, "--test", "drop"},
		{"compare", "--modes", array, "--setup", exampleSetup},
		{"simulate", "--setup", exampleSetup, "--test", "rig", "--out", filepath.Join(dir, "x.csv"), "--units", "G"},
		{"analyze", "--help"}, {"spectra", "--help"}, {"simulate", "--help"}, {"model", "--help"}, {"compare", "--help"},
		{"demo", "--help"}, {"batch", "--help"}, {"history", "--help"}, {"--help"},
	} {
		_, out, errs := run(t, args...)
		all.WriteString(out + errs)
	}
	text := all.String()
	for _, bad := range []string{"Options.", "Resample option", "package ", "output 1", "compare.Result", "Go value",
		".tmp-", "the contract", "[memory", "modal:", "decay:", "identify:", "spectral:", "compare:", " float ", " string ",
		" uint ", " int "} {
		if strings.Contains(text, bad) {
			i := strings.Index(text, bad)
			t.Errorf("the user sees %q: ...%s...", bad, text[max(0, i-80):min(len(text), i+80)])
		}
	}
	for _, want := range []string{"Gillespie, Fundamentals of Vehicle Dynamics (1992)", "--resample", "holds a JSON array"} {
		if !strings.Contains(text, want) {
			t.Errorf("the user does not see %q", want)
		}
	}
}

// Item 6: a unit in parentheses is read like one in brackets (or the error
// says where it goes), m s^-2 is a unit, "hanning" is the Hann window with a
// note, and spectra and analyze give the same data-quality warnings.
func TestLogDialect(t *testing.T) {
	dir := t.TempDir()
	drop := simulated(t, dir, "drop")
	data, _ := os.ReadFile(drop)
	text := strings.Replace(string(data), "time [s],body_front [m/s^2],body_rear [m/s^2]", "time (s),body_front (m s^-2),body_rear [m s^-2]", 1)
	parens := filepath.Join(dir, "parens.csv")
	writeText(t, parens, text)
	if code, out, errs := run(t, "analyze", parens, "--setup", exampleSetup, "--test", "drop"); code != exitOK || strings.Contains(out, "unit_missing") {
		t.Errorf("units in parentheses: exit %d, %s\n%s", code, errs, out)
	}
	writeText(t, parens, strings.Replace(text, "body_front (m s^-2)", "body_front (furlongs)", 1))
	if code, _, errs := run(t, "analyze", parens, "--setup", exampleSetup, "--test", "drop"); code != exitData ||
		!strings.Contains(errs, `write the unit in brackets after the name, e.g. "body_front [m/s^2]"`) {
		t.Errorf("unknown unit in parentheses: exit %d, %s", code, errs)
	}
	rig := simulated(t, dir, "rig", "--duration", "120", "--offset", "8")
	code, out, errs := run(t, "analyze", rig, "--setup", exampleSetup, "--window", "hanning")
	if code != exitOK || !strings.Contains(out, `window "hanning" is read as "hann"`) {
		t.Errorf("--window hanning: exit %d, %s\n%s", code, errs, out)
	}
	// the same log gives the same data-quality warnings in both commands
	jsonPath := filepath.Join(dir, "r.json")
	if code, _, errs := run(t, "analyze", rig, "--setup", exampleSetup, "--json", jsonPath); code != exitOK {
		t.Fatal(errs)
	}
	var fromAnalyze []string
	for _, w := range readResult(t, jsonPath).Log.Quality {
		fromAnalyze = append(fromAnalyze, w.String())
	}
	_, out, _ = run(t, "spectra", rig, "--setup", exampleSetup, "--csv", filepath.Join(dir, "frf.csv"))
	var fromSpectra []string
	quality := regexp.MustCompile(`^warning: ([a-z_]+( \[[^\]]*\])?: .*)`)
	for _, line := range strings.Split(out, "\n") {
		if m := quality.FindStringSubmatch(line); m != nil {
			fromSpectra = append(fromSpectra, m[1])
		}
	}
	if len(fromAnalyze) == 0 || strings.Join(fromAnalyze, "\n") != strings.Join(fromSpectra, "\n") {
		t.Errorf("analyze warns\n%q\nspectra warns\n%q", fromAnalyze, fromSpectra)
	}
}

// Item 7: compare warns of swapped labels, prints "-" for a damping ratio
// that was not measured and no standard deviation that was not given, and
// words a bare JSON array.
func TestCompareHandWrittenModes(t *testing.T) {
	dir := t.TempDir()
	setup := designWithTargets(t, dir, "bounce_frequency_tolerance_pct = 5\npitch_frequency_tolerance_pct = 5\n")
	// The example car's bounce node lies 2.48 m behind the CG, its pitch
	// node 0.55 m ahead (model). Labels swapped: with both nodes the shapes
	// pair the other way round; with the bounce node alone, between the
	// axles, the node rule says so.
	for _, c := range []struct{ modes, want string }{
		{`{"label": "bounce", "natural_frequency_hz": 1.47, "node_m": 0.55},
		  {"label": "pitch", "natural_frequency_hz": 1.24, "node_m": -2.48}`, "the mode shapes pair the other way round"},
		{`{"label": "bounce", "natural_frequency_hz": 1.47, "node_m": 0.55},
		  {"label": "pitch", "natural_frequency_hz": 1.24}`, "the mode labelled bounce has its node +0.55 m from the CG, between the axles"},
	} {
		swapped := filepath.Join(dir, "swapped.json")
		writeText(t, swapped, `{"modes": [`+c.modes+`]}`)
		code, out, errs := run(t, "compare", "--modes", swapped, "--setup", setup)
		if code == exitUsage || code == exitData || !strings.Contains(out, c.want) {
			t.Errorf("swapped labels: exit %d, %s\n%s", code, errs, out)
		}
	}
	plain := filepath.Join(dir, "plain.json")
	writeText(t, plain, `{"modes": [
  {"label": "bounce", "natural_frequency_hz": 1.24, "node_m": -2.48},
  {"label": "pitch", "natural_frequency_hz": 1.47, "node_m": 0.55}]}`)
	_, out, _ := run(t, "compare", "--modes", plain, "--setup", setup)
	if strings.Contains(out, "swapped") || strings.Contains(out, "other way round") || strings.Contains(out, "sigma 0") || strings.Contains(out, "(sd 0") ||
		!regexp.MustCompile(`(?m)^bounce\s+1\.2400\s+-\s`).MatchString(out) {
		t.Errorf("hand-written modes without damping or sd:\n%s", out)
	}
	array := filepath.Join(dir, "array.json")
	writeText(t, array, `[{"label": "bounce", "natural_frequency_hz": 1.24}]`)
	if code, _, errs := run(t, "compare", "--modes", array, "--setup", setup); code != exitData ||
		!strings.Contains(errs, `array.json: the file holds a JSON array; compare reads an object: an analyze result, or your modes inside {"modes": [...]}`) {
		t.Errorf("bare array: exit %d, %s", code, errs)
	}
}

// Item 8: results are written 0644 under the umask (umask_test.go), "-"
// writes to standard output, a missing folder is created, and model --json
// holds the ride rates built up from springs.
func TestOutputFiles(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := run(t, "model", "--setup", "../../testdata/example/coupe-springs.toml", "--json", "-")
	var res struct {
		Model struct {
			RideRates []map[string]any `json:"ride_rates"`
		}
	}
	if code != exitOK || json.Unmarshal([]byte(out), &res) != nil || !strings.Contains(errs, "Design model of") {
		t.Fatalf("model --json -: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	// 118 kN/m x 0.72^2 = 61171 N/m at the wheel (the example's front axle)
	if r := res.Model.RideRates; len(r) != 2 || r[0]["source"] != "built_up" || r[0]["wheel_rate_n_per_m"].(float64) < 61170 ||
		r[0]["wheel_rate_n_per_m"].(float64) > 61172 {
		t.Errorf("ride_rates %v", r)
	}
	rig := simulated(t, dir, "rig", "--duration", "120")
	code, out, errs = run(t, "spectra", rig, "--setup", exampleSetup, "--csv", "-")
	if code != exitOK || !strings.HasPrefix(out, "freq [Hz],") || !strings.Contains(errs, "wrote standard output") {
		t.Errorf("spectra --csv -: exit %d, stdout starts %q, stderr %q", code, out[:min(len(out), 40)], errs)
	}
	nested := filepath.Join(dir, "new", "folder", "result.json")
	if code, _, errs := run(t, "analyze", rig, "--setup", exampleSetup, "--json", nested); code != exitOK {
		t.Fatalf("--json into a new folder: exit %d, %s", code, errs)
	}
	if res := readResult(t, nested); len(res.Modes) != 2 {
		t.Errorf("result %+v", res)
	}
}
