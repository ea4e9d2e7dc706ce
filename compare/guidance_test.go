package compare

import (
	"math"
	"strings"
	"testing"
)

func TestUncoupledRideFrequencies(t *testing.T) {
	// Physical check: a body with J = m a b has uncoupled axles, so its two
	// modes are exactly the uncoupled front and rear ride frequencies
	// [derived: K and M then decouple in the axle coordinates].
	v := Vehicle{MassKg: 1200, CGToFrontM: 1.1, CGToRearM: 1.4, FrontRateNPerM: 35000, RearRateNPerM: 45000}
	v.PitchInertiaKgm2 = v.MassKg * v.CGToFrontM * v.CGToRearM
	ff, fr := UncoupledRideFrequenciesHz(v)
	ms, err := v.UndampedModes()
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-12
	lo, hi := math.Min(ff, fr), math.Max(ff, fr)
	if rel(ms[0].NaturalFrequencyHz, lo) > tol || rel(ms[1].NaturalFrequencyHz, hi) > tol {
		t.Errorf("modes %.6f, %.6f Hz; uncoupled %.6f, %.6f Hz", ms[0].NaturalFrequencyHz, ms[1].NaturalFrequencyHz, ff, fr)
	}
}

func TestModelGuidance(t *testing.T) {
	cs, err := ModelGuidance(dampedCase)
	if err != nil {
		t.Fatal(err)
	}
	if len(cs) != 6 {
		t.Errorf("%d checks, want 6 (two frequencies, two ratios, two damping)", len(cs))
	}
	for _, c := range cs {
		if c.Status != StatusPass && c.Status != StatusWarn {
			t.Errorf("guidance status %q", c.Status)
		}
		// sources cited for people: the book, not the code's [memory] note
		if !strings.Contains(c.Detail, "Gillespie, Fundamentals of Vehicle Dynamics (1992)") || strings.Contains(c.Detail, "[memory") {
			t.Errorf("%s cites no source for people: %s", c.Name, c.Detail)
		}
	}
	// A front axle stiffer than the rear (front ride frequency above the
	// rear) warns, and so does a front far softer than the quoted 80 %.
	for _, frontRate := range []float64{90000, 12000} {
		v := dampedCase
		v.FrontRateNPerM = frontRate
		cs, _ = ModelGuidance(v)
		if statusOf(cs, "guidance.model.front_rear_frequency_ratio") != StatusWarn {
			t.Errorf("front rate %g N/m should warn: %+v", frontRate, cs)
		}
	}
}
