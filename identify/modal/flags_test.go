package modal

import (
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/identify/body"
)

// TestChiSquareFlagAtThreshold: a refined fit whose reduced chi-square is
// just under maxChiSquare flags nothing (its modes are otherwise well
// determined: invented values near the example hatchback's), just over it
// flags both modes with a reason that names the chi-square.
func TestChiSquareFlagAtThreshold(t *testing.T) {
	for _, c := range []struct {
		chi2    float64
		flagged bool
	}{{0.99 * maxChiSquare, false}, {1.01 * maxChiSquare, true}} {
		res := &Result{ChiSquarePerDOF: c.chi2, NormalisedResidual: 0.02, BandLowHz: 0.5, BandHighHz: 4,
			Modes: []body.Mode{
				{Label: "bounce", NaturalFrequencyHz: 1.24, DampingRatio: 0.29, PitchPerBounceRadPerM: -0.40,
					SD: body.SD{NaturalFrequencyHz: 0.004, DampingRatio: 0.004, PitchPerBounceRadPerM: 0.005}},
				{Label: "pitch", NaturalFrequencyHz: 1.47, DampingRatio: 0.34, PitchPerBounceRadPerM: 1.79,
					SD: body.SD{NaturalFrequencyHz: 0.004, DampingRatio: 0.004, PitchPerBounceRadPerM: 0.03}}}}
		flagModes(res, []float64{0.85, -1.30})
		for _, m := range res.Modes {
			if m.Flagged != c.flagged || (c.flagged && !strings.Contains(strings.Join(m.FlagReasons, " "), "chi-square")) {
				t.Errorf("chi-square %.3g: %s flagged %v %q, want %v", c.chi2, m.Label, m.Flagged, m.FlagReasons, c.flagged)
			}
		}
	}
}
