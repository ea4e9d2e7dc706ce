package ingest

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// targetsSetup returns a valid setup of our own invention with the rate keys
// vehicleRates in its [vehicle] table (lines 6 on) and tail after the
// sensors (a tail that starts with a blank line puts its first key on line 18).
func targetsSetup(vehicleRates, tail string) string {
	return `[vehicle]
mass_kg = 1400
pitch_inertia_kgm2 = 2000
cg_to_front_axle_m = 1.1
cg_to_rear_axle_m = 1.5
` + vehicleRates + `

[[sensor]]
channel = "nose"
x_m = 1.0

[[sensor]]
channel = "tail"
x_m = -1.4
` + tail
}

const directRates = "front_rate_n_per_m = 38000\nrear_rate_n_per_m = 41000"

func TestSetupTargetsAndBuildUp(t *testing.T) {
	// Ride rate = (spring x ratio^2) in series with the tyre [published:
	// Gillespie, Fundamentals of Vehicle Dynamics, 1992]: 80000 x 0.7^2 =
	// 39200 N/m wheel rate; with a 400000 N/m tyre, 39200 x 400000 / 439200.
	text := targetsSetup(`front_spring_rate_n_per_m = 80000
front_motion_ratio_spring_per_wheel = 0.7
front_tyre_rate_n_per_m = 400000
rear_rate_n_per_m = 41000`, `
[targets]
bounce_frequency_tolerance_pct = 5
pitch_frequency_tolerance_pct = 8
damping_ratio_tolerance = 0.05
ride_rate_tolerance_pct = 10
axle_damping_tolerance_pct = 20
mode_shape_mac_min = 0.9

[update]
free_pitch_inertia = true
`)
	s, err := ParseSetup("car.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-9
	want := 39200.0 * 400000 / 439200
	if math.Abs(s.Vehicle.FrontRateNPerM-want) > tol*want {
		t.Errorf("front ride rate %g, want %g", s.Vehicle.FrontRateNPerM, want)
	}
	if b := s.Vehicle.FrontBuildUp; b == nil || math.Abs(b.WheelRateNPerM()-39200) > tol*39200 {
		t.Errorf("front build-up %+v, want a wheel rate of 39200 N/m", b)
	}
	if s.Vehicle.RearBuildUp != nil || s.Vehicle.RearRateNPerM != 41000 {
		t.Errorf("rear: %+v, %g; want the ride rate as given", s.Vehicle.RearBuildUp, s.Vehicle.RearRateNPerM)
	}
	tg := s.Targets
	if tg.BounceFrequencyTolerancePct != 5 || tg.PitchFrequencyTolerancePct != 8 || tg.DampingRatioTolerance != 0.05 ||
		tg.RideRateTolerancePct != 10 || tg.AxleDampingTolerancePct != 20 || tg.ModeShapeMACMin != 0.9 {
		t.Errorf("targets %+v", tg)
	}
	if !s.Update.FreePitchInertia {
		t.Error("free_pitch_inertia not read")
	}

	// Without a tyre rate the ride rate is the wheel rate; without [targets] nothing is checked.
	s, err = ParseSetup("car.toml", []byte(targetsSetup(
		"rear_spring_rate_n_per_m = 90000\nrear_motion_ratio_spring_per_wheel = 0.65\nfront_rate_n_per_m = 38000", "")))
	if err != nil {
		t.Fatal(err)
	}
	if w := 90000 * 0.65 * 0.65; math.Abs(s.Vehicle.RearRateNPerM-w) > tol*w {
		t.Errorf("rear ride rate %g, want %g", s.Vehicle.RearRateNPerM, w)
	}
	if !math.IsNaN(s.Targets.BounceFrequencyTolerancePct) || !math.IsNaN(s.Targets.ModeShapeMACMin) {
		t.Errorf("absent targets should be NaN: %+v", s.Targets)
	}
}

func TestSetupTargetsErrors(t *testing.T) {
	cases := []struct {
		name, rates, tail string
		key               string
		line              int
		msg               string
	}{
		{"ride and spring rate", directRates + "\nfront_spring_rate_n_per_m = 80000\nfront_motion_ratio_spring_per_wheel = 0.7",
			"", "vehicle.front_spring_rate_n_per_m", 8, "not both"},
		{"spring without ratio", "front_spring_rate_n_per_m = 80000\nrear_rate_n_per_m = 41000",
			"", "vehicle.front_motion_ratio_spring_per_wheel", 6, "needs the motion ratio"},
		{"ratio without spring", directRates + "\nrear_motion_ratio_spring_per_wheel = 0.7",
			"", "vehicle.rear_motion_ratio_spring_per_wheel", 8, "only used with rear_spring_rate_n_per_m"},
		{"tyre without spring", directRates + "\nfront_tyre_rate_n_per_m = 300000",
			"", "vehicle.front_tyre_rate_n_per_m", 8, "only used with front_spring_rate_n_per_m"},
		{"neither rate", "front_rate_n_per_m = 38000", "", "vehicle.rear_rate_n_per_m", 1, "rear_spring_rate_n_per_m"},
		{"negative ratio", "front_spring_rate_n_per_m = 80000\nfront_motion_ratio_spring_per_wheel = -0.7\nrear_rate_n_per_m = 41000",
			"", "vehicle.front_motion_ratio_spring_per_wheel", 7, "positive"},
		{"zero tyre", "front_spring_rate_n_per_m = 80000\nfront_motion_ratio_spring_per_wheel = 0.7\nfront_tyre_rate_n_per_m = 0\nrear_rate_n_per_m = 41000",
			"", "vehicle.front_tyre_rate_n_per_m", 8, "positive"},
		{"negative tolerance", directRates, "\n[targets]\nbounce_frequency_tolerance_pct = -5\n",
			"targets.bounce_frequency_tolerance_pct", 18, "positive"},
		{"zero damping tolerance", directRates, "\n[targets]\ndamping_ratio_tolerance = 0\n",
			"targets.damping_ratio_tolerance", 18, "positive"},
		{"MAC above one", directRates, "\n[targets]\nmode_shape_mac_min = 1.5\n",
			"targets.mode_shape_mac_min", 18, "must not exceed 1"},
		{"unknown target", directRates, "\n[targets]\nbounce_tolerance = 5\n",
			"targets.bounce_tolerance", 18, "unknown key"},
		{"wrong type", directRates, "\n[update]\nfree_pitch_inertia = \"yes\"\n",
			"", 18, "type"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseSetup("car.toml", []byte(targetsSetup(c.rates, c.tail)))
			var se *SetupError
			if !errors.As(err, &se) || !errors.Is(err, ErrSetup) {
				t.Fatalf("got %v, want a *SetupError", err)
			}
			if (c.key != "" && se.Key != c.key) || se.Line != c.line || !strings.Contains(se.Msg, c.msg) {
				t.Errorf("got key %q line %d msg %q; want key %q line %d msg containing %q",
					se.Key, se.Line, se.Msg, c.key, c.line, c.msg)
			}
		})
	}
}
