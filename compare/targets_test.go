package compare

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/ingest"
)

// assessSetup is an invented hatchback with a sprung front axle and targets.
const assessSetup = `[vehicle]
mass_kg = 1500
pitch_inertia_kgm2 = 2160
cg_to_front_axle_m = 1.2
cg_to_rear_axle_m = 1.5
front_spring_rate_n_per_m = 81632.65306122449
front_motion_ratio_spring_per_wheel = 0.7
rear_rate_n_per_m = 42000
front_damping_ns_per_m = 3464
rear_damping_ns_per_m = 3175

[[sensor]]
channel = "front_body"
x_m = 1.1

[[sensor]]
channel = "rear_body"
x_m = -1.4

[targets]
bounce_frequency_tolerance_pct = 5
pitch_frequency_tolerance_pct = 5
damping_ratio_tolerance = 0.05
ride_rate_tolerance_pct = 5
axle_damping_tolerance_pct = 15
mode_shape_mac_min = 0.9
`

func statusOf(cs []Check, name string) string {
	for _, c := range cs {
		if c.Name == name {
			return c.Status
		}
	}
	return ""
}

func TestAssessVerdict(t *testing.T) {
	setup, err := ingest.ParseSetup("hatch.toml", []byte(assessSetup))
	if err != nil {
		t.Fatal(err)
	}
	design := DesignOf(setup.Vehicle) // front ride rate 81632.65 x 0.49 = 40000 N/m
	sig := ModeSigma{NaturalFrequencyHz: 0.005, DampingRatio: 0.005, PitchPerBounceRadPerM: 0.02}
	for _, c := range []struct {
		name        string
		frontScale  float64
		wantFail    bool
		wantVerdict string
	}{{"as designed", 1, false, StatusPass}, {"front 20 % stiff", 1.2, true, StatusFail}} {
		t.Run(c.name, func(t *testing.T) {
			built := design
			built.FrontRateNPerM *= c.frontScale
			ms, err := built.Modes()
			if err != nil {
				t.Fatal(err)
			}
			meas := measuredFrom(ms, true, true)
			for i := range meas {
				meas[i].Sigma = sig
			}
			a, err := Assess(meas, nil, setup)
			if err != nil {
				t.Fatal(err)
			}
			if a.AnyFailed != c.wantFail {
				t.Errorf("AnyFailed %v, want %v; checks %+v", a.AnyFailed, c.wantFail, a.Checks)
			}
			if a.Verdict.Status != c.wantVerdict {
				t.Errorf("verdict %+v, want %s; checks %+v", a.Verdict, c.wantVerdict, a.Checks)
			}
			if got := statusOf(a.Checks, "target.front_ride_rate"); (got == StatusFail) != c.wantFail {
				t.Errorf("front ride rate check %q", got)
			}
			checkRates(t, a.Update.Vehicle.RatesOf(), built.RatesOf(), lsqTol)
			// The spring that would give the updated front ride rate.
			if ks := a.Updated.FrontSpringRateNPerM; ks == nil || rel(*ks, 81632.65306122449*c.frontScale) > lsqTol {
				t.Errorf("equivalent front spring %v", ks)
			}
			for _, ch := range a.Checks {
				if strings.HasPrefix(ch.Name, "guidance.") && ch.Status == StatusFail {
					t.Errorf("guidance must never fail: %+v", ch)
				}
			}
			var r Result
			a.Fill(&r)
			if _, err := r.Marshal(); err != nil {
				t.Errorf("result does not marshal: %v", err)
			}
		})
	}
}

func TestAssessNoFit(t *testing.T) {
	setup, err := ingest.ParseSetup("hatch.toml", []byte(assessSetup))
	if err != nil {
		t.Fatal(err)
	}
	// Frequencies 1.20 and 1.21 Hz (ratio 1.008), undamped: this body allows
	// no ratio under about 1.2 with any positive rates (TestBackCalcNoFit).
	for _, c := range []struct {
		name    string
		sigmaHz float64
		flagged bool
		want    string
	}{
		// 2 sigma of the ratio is about 0.005: wholly below the least.
		{"with standard deviations", 0.002, false, StatusFail},
		// Without them nothing says how far the ratio may be off.
		{"without standard deviations", 0, false, StatusInconclusive},
		{"flagged", 0.002, true, StatusInconclusive},
	} {
		t.Run(c.name, func(t *testing.T) {
			meas := []MeasuredMode{
				{Label: "bounce", NaturalFrequencyHz: 1.20, DampingRatio: math.NaN(), PitchPerBounceRadPerM: -0.3},
				{Label: "pitch", NaturalFrequencyHz: 1.21, DampingRatio: math.NaN(), PitchPerBounceRadPerM: 2},
			}
			for i := range meas {
				meas[i].Sigma.NaturalFrequencyHz = c.sigmaHz
			}
			if c.flagged { // both: the frequency checks use one each, the rates both
				for i := range meas {
					meas[i].Flagged, meas[i].FlagReasons = true, []string{"Its peak is under the noise floor."}
				}
			}
			a, err := Assess(meas, nil, setup)
			if err != nil {
				t.Fatal(err)
			}
			if !errors.Is(a.UpdateErr, ErrNoFit) || a.Updated != nil {
				t.Fatalf("UpdateErr %v", a.UpdateErr)
			}
			if got := statusOf(a.Checks, "target.front_ride_rate"); got != c.want {
				t.Errorf("front ride rate %s, want %s: %+v", got, c.want, a.Checks)
			}
			if a.AnyFailed != (c.want == StatusFail) {
				t.Errorf("AnyFailed %v", a.AnyFailed)
			}
		})
	}
}
