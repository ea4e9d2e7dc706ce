package compare_test

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// FuzzCompareModes feeds arbitrary modes files through what the compare
// command does with them: strict reading, then the comparison and the
// back-calculation against the example setup. Any input may be refused with
// an error; none may panic.
func FuzzCompareModes(f *testing.F) {
	f.Add([]byte(`{"modes":[{"label":"bounce","natural_frequency_hz":1.2},{"label":"pitch","natural_frequency_hz":1.5,"node_m":0.6}]}`))
	f.Add([]byte(`{"modes":[{"label":"bounce","natural_frequency_hz":1.2,"damping_ratio":0.3,"uncertainty":{"natural_frequency_hz":0.01,"damping_ratio":0.01},` +
		`"sensor_shape":[{"x_m":0.85,"re":1,"im":0.1},{"x_m":-1.3,"re":0.4,"im":0}]},{"label":"pitch","natural_frequency_hz":1.45,"damping_ratio":0.35,"pitch_per_bounce_rad_per_m":1.8}]}`))
	f.Add([]byte(`{"modes":[{"label":"pitch","natural_frequency_hz":1e308},{"label":"pitch","natural_frequency_hz":0}]}`))
	setup, err := ingest.LoadSetup("../testdata/example/hatchback.toml")
	if err != nil {
		f.Fatal(err)
	}
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, data []byte) {
		path := filepath.Join(dir, "modes.json")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		m, err := compare.ReadModesFile(path)
		if err != nil {
			return
		}
		res := &compare.Result{Modes: m.Modes}
		_ = res.AssessAgainst(setup)
	})
}
