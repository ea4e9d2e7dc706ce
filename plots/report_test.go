package plots

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"errors"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
)

// resultFile is a result such as analyze would write for the invented test
// car of synth_test.go: numbers of our own, written by hand (rounded model
// values, invented measured ones), not computed.
const resultFile = "testdata/result_rig.json"

// synthResult reads resultFile; each call returns a fresh copy.
func synthResult(tb testing.TB) *compare.Result {
	tb.Helper()
	b, err := os.ReadFile(resultFile)
	if err != nil {
		tb.Fatal(err)
	}
	var r compare.Result
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&r); err != nil {
		tb.Fatalf("%s: %v", resultFile, err)
	}
	return &r
}

// fullInput is a rig-test report input with every figure.
func fullInput(tb testing.TB) ReportInput {
	frf, ind, stab, shapes, decay := synthFRF(false), synthIndicator(), synthStab(), synthShapes(), synthDecay()
	return ReportInput{
		Title: "Rig run 17", Vehicle: "test car A", Result: synthResult(tb),
		FRF: &frf, Indicator: &ind, Stabilisation: &stab, Shapes: &shapes, Decay: &decay,
		Choices: []string{"Band 0.3-4 Hz.", "Resolution 0.025 Hz from the damping."},
	}
}

// pageText parses page as XML and returns all of its character data.
func pageText(t *testing.T, page []byte) string {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(page))
	var text strings.Builder
	for {
		tok, err := dec.Token()
		if errors.Is(err, io.EOF) {
			return text.String()
		}
		if err != nil {
			t.Fatalf("report is not well-formed XHTML: %v", err)
		}
		if cd, ok := tok.(xml.CharData); ok {
			text.Write(cd)
		}
	}
}

func TestWriteReport(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "report")
	if *figureDir != "" {
		dir = filepath.Join(*figureDir, "report")
	}
	in := fullInput(t)
	files, err := WriteReport(dir, in)
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"frf.png", "mode-indicator.png", "stabilisation.png", "mode-shapes.png", "time-history.png", ReportFile}
	if len(files) != len(want) {
		t.Fatalf("wrote %v, want %v", files, want)
	}
	for i, f := range files {
		if filepath.Base(f) != want[i] || filepath.Dir(f) != dir {
			t.Errorf("file %d is %s, want %s in %s", i, f, want[i], dir)
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != len(want) {
		t.Errorf("report directory holds %d entries, want %d (no temporary files)", len(entries), len(want))
	}
	for _, f := range files[:len(files)-1] {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := png.Decode(bytes.NewReader(b)); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
	page, err := os.ReadFile(files[len(files)-1])
	if err != nil {
		t.Fatal(err)
	}
	text := pageText(t, page)
	if n := strings.Count(text, compare.Cautions); n != 1 {
		t.Errorf("report holds the safety notice %d times, want 1 (its own section; a caution line under the verdict)", n)
	}
	if !strings.Contains(text, "engineering estimates") || !strings.Contains(text, "can hurt people") {
		t.Error("report does not say that results are engineering estimates, or lacks the caution line")
	}
	r := in.Result
	musts := []string{r.Log.Path, r.Log.SHA256, in.Vehicle, in.Title, "rig test",
		// modes: measured ± sd, model, difference, MAC
		"1.130 ± 0.012", "1.140", "-0.9", "0.290 ± 0.015", "0.991",
		// rates: design, back-calculated ± sd, difference, tolerance
		"37.40 ± 0.90", "38.00", "42.10 ± 0.30", "40.00", "+5.2 %", "±3 %",
		// checks by name, with their numbers and status
		"Bounce frequency", "1.130 ± 0.024 Hz", "1.083 to 1.197 Hz", "Rear ride rate", "42.10 ± 0.60 kN/m", "38.80 to 41.20 kN/m",
		"Bounce pitch frequency ratio", "PASS", "FAIL", "NOTE",
		// the verdict names what failed, against the design and the tolerance
		"The car does not match its design: 1 of 2 target checks fail",
		"Rear ride rate 42.10 ± 0.60 kN/m (2 sd): +5.2 % against design 40.00 kN/m, tolerance ±3 %: fail",
		"not recorded (no date in the log's notes)"}
	for _, m := range r.Modes {
		musts = append(musts, m.Label, m.Method)
	}
	musts = append(musts, r.Checks[1].Detail)
	musts = append(musts, r.Warnings...)
	musts = append(musts, r.Log.Notes...)
	musts = append(musts, in.Choices...)
	musts = append(musts, r.Analysis.Choices...)
	musts = append(musts, r.Analysis.QuickEstimate[0].Source, "Band 0.30-4.00 Hz")
	for _, m := range musts {
		if !strings.Contains(text, m) {
			t.Errorf("report text lacks %q", m)
		}
	}
	// Check ids are for the JSON; the page names the checks in words.
	for _, c := range r.Checks {
		if strings.Contains(text, c.Name) {
			t.Errorf("report text shows the check id %q", c.Name)
		}
	}
	if n := strings.Count(text, r.Modes[0].Method); n != 1 {
		t.Errorf("the method is named %d times, want once", n)
	}
	if got := strings.Count(string(page), `<svg class="figure"`); got != 5 {
		t.Errorf("report has %d inline SVG figures, want 5", got)
	}
	for _, bad := range []string{"<img", `src="http`, `href=`, "@import", "url(", "<script"} {
		if strings.Contains(string(page), bad) {
			t.Errorf("report holds %q: it must be one self-contained file without scripts", bad)
		}
	}
	verdict := regexp.MustCompile(`<section id="verdict"[^>]*data-verdict="([a-z]+)"`).FindStringSubmatch(string(page))
	if verdict == nil || verdict[1] != "fail" {
		t.Errorf("verdict element %v, want data-verdict=\"fail\"", verdict)
	}
	if i, j := strings.Index(string(page), `id="verdict"`), strings.Index(string(page), `id="modes"`); i < 0 || j < i {
		t.Error("the verdict does not come before the modes")
	}
}

func TestWriteReportEscapes(t *testing.T) {
	const hostile = `<script>alert("x")</script>`
	in := ReportInput{Vehicle: hostile, Result: synthResult(t)}
	in.Result.Log.Notes = append(in.Result.Log.Notes, hostile)
	in.Result.Checks[1].Detail = hostile
	files, err := WriteReport(t.TempDir(), in)
	if err != nil {
		t.Fatal(err)
	}
	page, err := os.ReadFile(files[len(files)-1])
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(page), "<script") {
		t.Error("a hostile string reached the page unescaped")
	}
	if n := strings.Count(pageText(t, page), hostile); n < 4 {
		t.Errorf("hostile string shown %d times as text, want at least 4 (title, subtitle, fact, note)", n)
	}
}

func TestWriteReportDropTest(t *testing.T) {
	shapes, decay := synthShapes(), synthDecay()
	r := synthResult(t)
	r.Test = "drop"
	files, err := WriteReport(t.TempDir(), ReportInput{Result: r, Shapes: &shapes, Decay: &decay})
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 3 {
		t.Errorf("wrote %v, want two figures and the report", files)
	}
}

func TestWriteReportLeavesNothing(t *testing.T) {
	t.Run("bad data", func(t *testing.T) {
		dir := filepath.Join(t.TempDir(), "report")
		in := fullInput(t)
		in.FRF.Curves[1].PhaseDeg[7] = math.NaN()
		_, err := WriteReport(dir, in)
		var se *SeriesError
		if !errors.As(err, &se) || se.Index != 7 || !strings.Contains(se.Series, "body_rear / pan_r") {
			t.Fatalf("error %v, want a SeriesError naming the curve and index 7", err)
		}
		if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("report directory exists after a data error: %v", err)
		}
	})
	t.Run("write fails", func(t *testing.T) {
		dir := t.TempDir()
		// A directory where the report should go makes the final rename
		// fail after the figures are written.
		if err := os.Mkdir(filepath.Join(dir, ReportFile), 0o755); err != nil {
			t.Fatal(err)
		}
		files, err := WriteReport(dir, fullInput(t))
		if err == nil {
			t.Fatal("no error when the report cannot be written")
		}
		if files != nil {
			t.Errorf("returned %v after a failure", files)
		}
		entries, err := os.ReadDir(dir)
		if err != nil {
			t.Fatal(err)
		}
		if len(entries) != 1 {
			var names []string
			for _, e := range entries {
				names = append(names, e.Name())
			}
			t.Errorf("left behind %v", names)
		}
	})
	t.Run("no result", func(t *testing.T) {
		if _, err := WriteReport(t.TempDir(), ReportInput{}); err == nil {
			t.Error("no error without a result")
		}
	})
}

func BenchmarkWriteReport(b *testing.B) {
	in := fullInput(b)
	dir := b.TempDir()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := WriteReport(dir, in); err != nil {
			b.Fatal(err)
		}
	}
}

// TestReportFlaggedAndInconclusive: a flagged mode is marked in the modes
// table with its reasons, and an inconclusive check says why in its row and
// in the verdict box, which opens with the inconclusive verdict.
func TestReportFlaggedAndInconclusive(t *testing.T) {
	r := synthResult(t)
	const reason = "its damping ratio rests on less than one cycle of the decay."
	r.Modes[1].Flagged, r.Modes[1].FlagReasons = true, []string{reason}
	sigma := 0.018
	r.Checks = []compare.Check{{Name: "target.pitch_frequency", Status: compare.StatusInconclusive,
		Detail:   "measured 1.390 Hz (sigma 0.018), model 1.370 Hz; the pitch mode is flagged, so the check cannot be trusted: inconclusive",
		Quantity: &compare.Quantity{Value: 1.39, Unit: "Hz", Sigma: &sigma, Low: ptr(1.3015), High: ptr(1.4385)}}}
	r.Verdict = &compare.Verdict{Status: compare.StatusInconclusive, Summary: "Nothing failed, but pitch frequency is inconclusive."}
	files, err := WriteReport(t.TempDir(), ReportInput{Result: r})
	if err != nil {
		t.Fatal(err)
	}
	page, err := os.ReadFile(files[len(files)-1])
	if err != nil {
		t.Fatal(err)
	}
	text := pageText(t, page)
	for _, want := range []string{"pitch (flagged)", reason, "INCONCLUSIVE", "a mode it uses is flagged (see Modes)",
		"Not decided: nothing failed, but 1 of 1 target checks are inconclusive.",
		"Pitch frequency 1.390 ± 0.036 Hz (2 sd): +1.5 % against model 1.370 Hz, tolerance ±5 %: inconclusive (a mode it uses is flagged (see Modes))"} {
		if !strings.Contains(text, want) {
			t.Errorf("report text lacks %q", want)
		}
	}
	if !strings.Contains(string(page), `data-verdict="inconclusive"`) {
		t.Error("verdict element is not inconclusive")
	}
}
