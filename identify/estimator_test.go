package identify

import (
	"bytes"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// fitRigWith is readRigLog with the FRF estimator given.
func fitRigWith(t *testing.T, c rigCase, csv []byte, est Estimator) (*FRFResult, *modal.Result) {
	t.Helper()
	r, err := ingest.NewReader(bytes.NewReader(csv), "sim.csv", int64(len(csv)), ingest.Options{})
	if err != nil {
		t.Fatal(err)
	}
	stage, err := NewFRFStage(r.Info().Channels, c.sensors, c.inputs, FRFOptions{Estimator: est})
	if err != nil {
		t.Fatal(err)
	}
	sum, err := r.Stream(stage.Consume)
	if err != nil {
		t.Fatal(err)
	}
	frf, err := stage.Result(sum.SampleRateHz)
	if err != nil {
		t.Fatal(err)
	}
	_, fit, err := FitRig(frf, c.sensors, modal.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return frf, fit
}

// On a 5-minute log (about 200 bins of the whole record per half-power
// bandwidth) the automatic choice takes the local polynomial FRFs and says
// so; EstimatorWelch keeps Welch's. Both estimates lie within three of
// their stated sd of the truth (synthetic log, truth from the damped model).
func TestRigEstimatorChoice(t *testing.T) {
	c := drawRigCase(rand.New(rand.NewPCG(2026, 77)), 0.15, 0.3)
	c.opt.DurationS = 300
	csv, err := rigCSV(c)
	if err != nil {
		t.Fatal(err)
	}
	for _, est := range []Estimator{EstimatorAuto, EstimatorWelch} {
		frf, fit := fitRigWith(t, c, csv, est)
		local := frf.Local != nil
		if local != (est == EstimatorAuto) {
			t.Errorf("estimator %d: local polynomial FRFs used: %v; reasons %q", est, local, frf.Reasons)
		}
		said := strings.Contains(strings.Join(frf.Reasons, "\n"), "local polynomial FRFs for the fit")
		if said != local {
			t.Errorf("estimator %d: the reasons say local polynomial %v, used %v", est, said, local)
		}
		for k, m := range fit.Modes {
			tr := c.truth[k]
			zf := (m.NaturalFrequencyHz - tr.NaturalFrequencyHz) / m.SD.NaturalFrequencyHz
			zz := (m.DampingRatio - tr.DampingRatio) / m.SD.DampingRatio
			t.Logf("estimator %d %s: fn %+.3f %% (%+.1f sd), zeta %+.4f (%+.1f sd)", est, m.Label,
				100*(m.NaturalFrequencyHz/tr.NaturalFrequencyHz-1), zf, m.DampingRatio-tr.DampingRatio, zz)
			if math.Abs(zf) > 3 || math.Abs(zz) > 3 {
				t.Errorf("estimator %d %s: fn %.5f (truth %.5f, %+.1f sd), zeta %.4f (truth %.4f, %+.1f sd)", est, m.Label,
					m.NaturalFrequencyHz, tr.NaturalFrequencyHz, zf, m.DampingRatio, tr.DampingRatio, zz)
			}
		}
	}
}

// A noise-free hour-long log: the local polynomial FRFs are exact to
// rounding, which can leave the fit's order sweep singular; the route then
// falls back to Welch's FRFs (FitRig) and still finds the modes. Either way
// the natural frequencies come out within 0.05 % and the damping ratios
// within 0.001 (synthetic log, truth from the damped model).
func TestRigNoiseFreeLongLog(t *testing.T) {
	if testing.Short() {
		t.Skip("hour-long log")
	}
	c := drawRigCase(rand.New(rand.NewPCG(2026, 78)), 0.2, 0.3)
	c.sensors = c.sensors[:2]
	c.opt.DurationS, c.opt.RateHz, c.opt.NoiseFraction = 3600, 25, 0
	csv, err := rigCSV(c)
	if err != nil {
		t.Fatal(err)
	}
	frf, fit := fitRigWith(t, c, csv, EstimatorAuto)
	t.Logf("local polynomial FRFs kept: %v; reasons %q", frf.Local != nil, frf.Reasons)
	for k, m := range fit.Modes {
		tr := c.truth[k]
		ef, ez := m.NaturalFrequencyHz/tr.NaturalFrequencyHz-1, m.DampingRatio-tr.DampingRatio
		t.Logf("%s: fn %+.4f %%, zeta %+.5f", m.Label, 100*ef, ez)
		if math.Abs(ef) > 5e-4 || math.Abs(ez) > 1e-3 {
			t.Errorf("%s: fn %.5f vs %.5f, zeta %.4f vs %.4f", m.Label, m.NaturalFrequencyHz, tr.NaturalFrequencyHz, m.DampingRatio, tr.DampingRatio)
		}
	}
}
