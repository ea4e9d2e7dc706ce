package compare

import (
	"strings"
	"testing"
)

// TestModeCorrelationChecks: a result's mode_correlation (written by
// analyze, or by hand) is checked before the update uses it; each mistake
// is an error that names it.
func TestModeCorrelationChecks(t *testing.T) {
	figs := []string{"bounce.natural_frequency_hz", "pitch.pitch_per_bounce_rad_per_m"}
	ok := [][]float64{{1, 0.5}, {0.5, 1}}
	for _, c := range []struct {
		name string
		j    *ModeCorrelation
		want string // "" for no error
	}{
		{"valid", &ModeCorrelation{Figures: figs, Matrix: ok}, ""},
		{"rows", &ModeCorrelation{Figures: figs, Matrix: ok[:1]}, "2 figures and 1 matrix rows"},
		{"short row", &ModeCorrelation{Figures: figs, Matrix: [][]float64{{1}, {0.5, 1}}}, "row 1 has 1 entries"},
		{"unknown key", &ModeCorrelation{Figures: []string{"bounce.node_m", figs[1]}, Matrix: ok}, `"bounce.node_m"`},
		{"unknown label", &ModeCorrelation{Figures: []string{"roll.damping_ratio", figs[1]}, Matrix: ok}, "roll"},
		{"twice", &ModeCorrelation{Figures: []string{figs[0], figs[0]}, Matrix: ok}, "once"},
		{"diagonal", &ModeCorrelation{Figures: figs, Matrix: [][]float64{{0.9, 0.5}, {0.5, 1}}}, "itself is 1"},
		{"range", &ModeCorrelation{Figures: figs, Matrix: [][]float64{{1, 1.5}, {1.5, 1}}}, "within -1 and 1"},
		{"symmetry", &ModeCorrelation{Figures: figs, Matrix: [][]float64{{1, 0.5}, {0.4, 1}}}, "symmetric"},
	} {
		got, err := c.j.Correlation()
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: %v", c.name, err)
		case c.want == "" && got.Coefficient(figs[0], figs[1]) != 0.5:
			t.Errorf("%s: coefficient %g, want 0.5", c.name, got.Coefficient(figs[0], figs[1]))
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%s: error %v, want one naming %q", c.name, err, c.want)
		}
	}
	var none *ModeCorrelation
	if got, err := none.Correlation(); got != nil || err != nil {
		t.Errorf("absent: %v, %v; want nil, nil", got, err)
	}
}
