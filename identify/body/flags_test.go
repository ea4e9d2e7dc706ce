package body

import (
	"math"
	"strings"
	"testing"
)

// flagSensorsM are the example hatchback's sensor positions
// (testdata/example/hatchback.toml; invented): reach 1.30 m.
var flagSensorsM = []float64{0.85, -1.30}

// goodPair returns a well-determined bounce and pitch (invented values near
// the example hatchback's model: 1.24 and 1.47 Hz) in the band 0.5-4 Hz.
func goodPair() []Mode {
	return []Mode{
		{Label: "bounce", NaturalFrequencyHz: 1.24, DampingRatio: 0.29, PitchPerBounceRadPerM: -0.40,
			SD: SD{NaturalFrequencyHz: 0.004, DampingRatio: 0.004, PitchPerBounceRadPerM: 0.005}},
		{Label: "pitch", NaturalFrequencyHz: 1.47, DampingRatio: 0.34, PitchPerBounceRadPerM: 1.79,
			SD: SD{NaturalFrequencyHz: 0.004, DampingRatio: 0.004, PitchPerBounceRadPerM: 0.03}},
	}
}

// TestFlagUnsupportedAtThresholds checks each common rule just inside and
// just beyond its threshold: a mode is flagged exactly when the rule says,
// with a reason that names the evidence.
func TestFlagUnsupportedAtThresholds(t *testing.T) {
	const lo, hi = 0.5, 4.0
	for _, c := range []struct {
		name    string
		change  func(ms []Mode)
		flagged [2]bool
		word    string // in the reason
	}{
		{"well determined", func([]Mode) {}, [2]bool{false, false}, ""},
		{"frequency sd just under 5 %", func(ms []Mode) { ms[1].SD.NaturalFrequencyHz = 0.0499 * 1.47 },
			[2]bool{false, false}, ""},
		{"frequency sd just over 5 %", func(ms []Mode) { ms[1].SD.NaturalFrequencyHz = 0.0501 * 1.47 },
			[2]bool{false, true}, "natural frequency"},
		{"frequency sd NaN", func(ms []Mode) { ms[0].SD.NaturalFrequencyHz = math.NaN() },
			[2]bool{true, false}, "natural frequency"},
		{"damping sd 0.049", func(ms []Mode) { ms[0].SD.DampingRatio = 0.049 }, [2]bool{false, false}, ""},
		{"damping sd 0.051", func(ms []Mode) { ms[0].SD.DampingRatio = 0.051 }, [2]bool{true, false}, "damping ratio"},
		{"just inside the lower edge", func(ms []Mode) { ms[0].NaturalFrequencyHz = lo * 1.051 },
			[2]bool{false, false}, ""},
		{"at the lower edge", func(ms []Mode) { ms[0].NaturalFrequencyHz = lo * 1.049 },
			[2]bool{true, false}, "edge of the band"},
		{"at the upper edge", func(ms []Mode) { ms[1].NaturalFrequencyHz = hi * 0.951 },
			[2]bool{false, true}, "edge of the band"},
		// Labels: bounce ppb -0.40 +- 0.005 (angle atan(0.52)), pitch ppb
		// -0.80 with sd s: the margin (atan(1.04) - atan(0.52))/hypot(...)
		// is 1.510 at s = 0.345 and 1.489 at s = 0.35 (worked by hand).
		{"labels 1.51 sd apart", func(ms []Mode) { ms[1].PitchPerBounceRadPerM, ms[1].SD.PitchPerBounceRadPerM = -0.8, 0.345 },
			[2]bool{false, false}, ""},
		{"labels 1.49 sd apart", func(ms []Mode) { ms[1].PitchPerBounceRadPerM, ms[1].SD.PitchPerBounceRadPerM = -0.8, 0.35 },
			[2]bool{true, true}, "swapped"},
	} {
		ms := goodPair()
		c.change(ms)
		FlagUnsupported(ms, flagSensorsM, lo, hi)
		for i, m := range ms {
			if m.Flagged != c.flagged[i] || m.Flagged != (len(m.FlagReasons) > 0) {
				t.Errorf("%s: %s flagged %v with reasons %q, want %v", c.name, m.Label, m.Flagged, m.FlagReasons, c.flagged[i])
			}
			if m.Flagged && !strings.Contains(strings.Join(m.FlagReasons, " "), c.word) {
				t.Errorf("%s: %s reasons %q do not name %q", c.name, m.Label, m.FlagReasons, c.word)
			}
		}
	}
}

// TestLabelMargin checks LabelMargin against values worked by hand with the
// formula of FlagUnsupported (reach 1.30 m): bounce -0.40 +- 0.05 and pitch
// 1.80 +- 0.20 rad/m give 10.569; a nearly pure pitch, 50 +- 40 rad/m (node
// 0.02 m from the CG), against a bounce of 0.10 +- 0.05 rad/m gives 21.91,
// where the sizes of ppb differ by only 1.25 sd: the angle keeps a nearly
// pure pitch's unbounded ppb from hiding labels the nodes settle. Equal
// sizes give 0.
func TestLabelMargin(t *testing.T) {
	const tol = 1e-3
	mode := func(ppb, sd float64) Mode { return Mode{PitchPerBounceRadPerM: ppb, SD: SD{PitchPerBounceRadPerM: sd}} }
	for _, c := range []struct {
		b, p Mode
		want float64
	}{
		{mode(-0.40, 0.05), mode(1.80, 0.20), 10.569},
		{mode(0.10, 0.05), mode(50, 40), 21.909},
		{mode(-0.9, 0.05), mode(0.9, 0.2), 0},
	} {
		if got := LabelMargin(c.b, c.p, 1.30); math.Abs(got-c.want) > tol {
			t.Errorf("bounce %v, pitch %v: margin %.4f, want %.4f", c.b.PitchPerBounceRadPerM, c.p.PitchPerBounceRadPerM, got, c.want)
		}
	}
}
