package ingest

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// goodSetup is a valid setup; its line numbers are used by the cases below.
const goodSetup = `[vehicle]
mass_kg = 1400
pitch_inertia_kgm2 = 2000
cg_to_front_axle_m = 1.1
cg_to_rear_axle_m = 1.5
front_rate_n_per_m = 40000
rear_rate_n_per_m = 45000

[[sensor]]
channel = "bf"
x_m = 0.9

[[sensor]]
channel = "br"
x_m = -1.2

[[input]]
channel = "pf"
axle = "front"

[[input]]
channel = "pr"
axle = "rear"
`

func TestParseGoodSetup(t *testing.T) {
	s, err := ParseSetup("car.toml", []byte(goodSetup))
	if err != nil {
		t.Fatal(err)
	}
	if s.Vehicle.MassKg != 1400 || s.Vehicle.PitchInertiaKgm2 != 2000 || len(s.Sensors) != 2 ||
		s.Sensors[1].XM != -1.2 || len(s.Inputs) != 2 || s.Inputs[1].Axle != "rear" {
		t.Fatalf("parsed %+v", s)
	}
	// Radius of gyration instead of inertia: J = m r^2.
	alt := strings.Replace(goodSetup, "pitch_inertia_kgm2 = 2000", "radius_of_gyration_m = 1.2", 1)
	s, err = ParseSetup("car.toml", []byte(alt))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(s.Vehicle.PitchInertiaKgm2-1400*1.44) > 1e-9 {
		t.Fatalf("J = %g, want m r^2 = %g", s.Vehicle.PitchInertiaKgm2, 1400*1.44)
	}
	// "hanning" is another spelling of the Hann window (job notes it).
	if _, err := ParseSetup("car.toml", []byte(goodSetup+"\n[analysis]\nwindow = \"hanning\"\n")); err != nil {
		t.Error(err)
	}
	// A drop-test setup has no [[input]].
	drop := goodSetup[:strings.Index(goodSetup, "[[input]]")]
	if _, err := ParseSetup("drop.toml", []byte(drop)); err != nil {
		t.Fatal(err)
	}
}

func TestParseBadSetups(t *testing.T) {
	type edit struct{ old, new string }
	cases := []struct {
		name  string
		edits []edit
		line  int
		key   string
		words string // part of the message
	}{
		{"misspelt key", []edit{{"mass_kg = 1400", "mass_kgs = 1400"}}, 2, "vehicle.mass_kgs", "unknown key"},
		{"unknown key in an array table", []edit{{"x_m = -1.2", "xm = -1.2"}}, 15, "sensor[2].xm", "unknown key"},
		{"unknown table", []edit{{"[[input]]\nchannel = \"pf\"", "[[inputs]]\nchannel = \"pf\""}}, 17, "inputs[1]", "unknown key"},
		{"negative mass", []edit{{"mass_kg = 1400", "mass_kg = -3"}}, 2, "vehicle.mass_kg", "positive"},
		{"zero inertia", []edit{{"pitch_inertia_kgm2 = 2000", "pitch_inertia_kgm2 = 0"}}, 3, "vehicle.pitch_inertia_kgm2", "positive"},
		{"a not positive", []edit{{"cg_to_front_axle_m = 1.1", "cg_to_front_axle_m = 0"}}, 4, "vehicle.cg_to_front_axle_m", "positive"},
		{"b missing", []edit{{"cg_to_rear_axle_m = 1.5\n", ""}}, 1, "vehicle.cg_to_rear_axle_m", "missing"},
		{"NaN rate", []edit{{"rear_rate_n_per_m = 45000", "rear_rate_n_per_m = nan"}}, 7, "vehicle.rear_rate_n_per_m", "finite"},
		{"negative damping", []edit{{"rear_rate_n_per_m = 45000", "rear_rate_n_per_m = 45000\nfront_damping_ns_per_m = -5"}}, 8, "vehicle.front_damping_ns_per_m", "zero or positive"},
		{"inertia and radius both", []edit{{"pitch_inertia_kgm2 = 2000", "pitch_inertia_kgm2 = 2000\nradius_of_gyration_m = 1.2"}}, 4, "vehicle.radius_of_gyration_m", "not both"},
		{"neither inertia nor radius", []edit{{"pitch_inertia_kgm2 = 2000\n", ""}}, 1, "vehicle.pitch_inertia_kgm2", "radius_of_gyration_m"},
		{"sensor without channel", []edit{{"channel = \"br\"\n", ""}}, 13, "sensor[2].channel", "missing"},
		{"sensor without position", []edit{{"x_m = 0.9\n", ""}}, 9, "sensor[1].x_m", "missing"},
		{"duplicate channel", []edit{{"channel = \"br\"", "channel = \"bf\""}}, 14, "sensor[2].channel", "already used"},
		{"input reusing a sensor channel", []edit{{"channel = \"pr\"", "channel = \"br\""}}, 22, "input[2].channel", "already used"},
		{"bad axle", []edit{{"axle = \"rear\"", "axle = \"middle\""}}, 23, "input[2].axle", "front"},
		{"one input only", []edit{{"axle = \"rear\"", "axle = \"front\""}}, 17, "input", "front and a rear"},
		{"inputs without sensors", []edit{{"[[sensor]]\nchannel = \"bf\"\nx_m = 0.9\n\n[[sensor]]\nchannel = \"br\"\nx_m = -1.2\n", ""}}, 10, "input", "without [[sensor]]"},
		{"sensors at one position", []edit{{"x_m = -1.2", "x_m = 0.9"}}, 15, "sensor[2].x_m", "same x_m"},
		{"no vehicle table", []edit{{"[vehicle]", "[car]"}}, 1, "car", "unknown key"},
		{"wrong type", []edit{{"mass_kg = 1400", `mass_kg = "heavy"`}}, 2, "vehicle.mass_kg", "type"},
		{"wrong type in an array table", []edit{{"x_m = 0.9", "x_m = true"}}, 11, "sensor[1].x_m", "wrong type"},
		{"syntax error", []edit{{"x_m = 0.9", "x_m 0.9"}}, 11, "", "TOML syntax"},
		{"unknown window", []edit{{"[[input]]\nchannel = \"pf\"", "[analysis]\nwindow = \"blackmanish\"\n\n[[input]]\nchannel = \"pf\""}}, 18, "analysis.window", "unknown window"},
		{"band upside down", []edit{{"[[input]]\nchannel = \"pf\"", "[analysis]\nband_low_hz = 5\nband_high_hz = 2\n\n[[input]]\nchannel = \"pf\""}}, 19, "analysis.band_high_hz", "must exceed"},
		{"segment not a power of two", []edit{{"[[input]]\nchannel = \"pf\"", "[analysis]\nsegment_samples = 1000\n\n[[input]]\nchannel = \"pf\""}}, 18, "analysis.segment_samples", "power of two"},
		{"odd model order", []edit{{"[[input]]\nchannel = \"pf\"", "[analysis]\nmax_model_order = 7\n\n[[input]]\nchannel = \"pf\""}}, 18, "analysis.max_model_order", "even"},
		{"binary garbage", []edit{{"mass_kg = 1400", "mass_kg = 14\x0000"}}, 0, "", "binary"},
		// plausibility: what the number probably meant (bounds in plausible.go)
		{"rate in kN/m", []edit{{"front_rate_n_per_m = 40000", "front_rate_n_per_m = 40"}}, 6, "vehicle.front_rate_n_per_m", "did you mean 40000 (40 kN/m, or 40 N/mm)?"},
		{"mass in t", []edit{{"mass_kg = 1400", "mass_kg = 1.4"}}, 2, "vehicle.mass_kg", "did you mean 1400 (1.4 t)?"},
		{"inertia in t m^2", []edit{{"pitch_inertia_kgm2 = 2000", "pitch_inertia_kgm2 = 2"}}, 3, "vehicle.pitch_inertia_kgm2", "did you mean 2000 (2 t m^2)?"},
		{"radius in mm", []edit{{"pitch_inertia_kgm2 = 2000", "radius_of_gyration_m = 1200"}}, 3, "vehicle.radius_of_gyration_m", "did you mean 1.2 (1200 mm)?"},
		{"b in cm", []edit{{"cg_to_rear_axle_m = 1.5", "cg_to_rear_axle_m = 150"}}, 5, "vehicle.cg_to_rear_axle_m", "did you mean 1.5 (150 cm)?"},
		{"motion ratio in percent", []edit{{"front_rate_n_per_m = 40000", "front_spring_rate_n_per_m = 80000\nfront_motion_ratio_spring_per_wheel = 70"}}, 7, "vehicle.front_motion_ratio_spring_per_wheel", "did you mean 0.7 (70 %)?"},
		{"damping in kN s/m", []edit{{"rear_rate_n_per_m = 45000", "rear_rate_n_per_m = 45000\nfront_damping_ns_per_m = 3\nrear_damping_ns_per_m = 3000"}}, 8, "vehicle.front_damping_ns_per_m", "did you mean 3000 (3 kN s/m"},
		{"overdamped axle", []edit{{"rear_rate_n_per_m = 45000", "rear_rate_n_per_m = 45000\nfront_damping_ns_per_m = 3000\nrear_damping_ns_per_m = 300000"}}, 9, "vehicle.rear_damping_ns_per_m", "far above any car's damping"},
		{"one damper", []edit{{"rear_rate_n_per_m = 45000", "rear_rate_n_per_m = 45000\nrear_damping_ns_per_m = 3000"}}, 8, "vehicle.front_damping_ns_per_m", "rear_damping_ns_per_m is given but front_damping_ns_per_m is not"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := goodSetup
			for _, e := range c.edits {
				if !strings.Contains(text, e.old) {
					t.Fatalf("edit %q does not apply", e.old)
				}
				text = strings.Replace(text, e.old, e.new, 1)
			}
			_, err := ParseSetup("car.toml", []byte(text))
			if err == nil {
				t.Fatal("no error")
			}
			var se *SetupError
			if !errors.As(err, &se) || !errors.Is(err, ErrSetup) {
				t.Fatalf("error %T %v is not a *SetupError", err, err)
			}
			msg := err.Error()
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans lines: %q", msg)
			}
			if se.Line != c.line || se.Key != c.key || !strings.Contains(msg, c.words) {
				t.Errorf("got line %d key %q: %s\nwant line %d key %q, words %q", se.Line, se.Key, msg, c.line, c.key, c.words)
			}
			if !strings.HasPrefix(msg, "car.toml") {
				t.Errorf("message does not name the file: %s", msg)
			}
		})
	}
}

// Errors the decoder finds carry the column too (1-based, as an editor
// counts): the value for a wrong type, the key for an unknown one.
func TestSetupErrorColumns(t *testing.T) {
	for _, c := range []struct {
		old, new  string
		line, col int
	}{
		{"mass_kg = 1400", `mass_kg = "heavy"`, 2, 11},
		{"x_m = -1.2", "xm = -1.2", 15, 1},
		{"x_m = 0.9", "x_m 0.9", 11, 5},
	} {
		_, err := ParseSetup("car.toml", []byte(strings.Replace(goodSetup, c.old, c.new, 1)))
		var se *SetupError
		if !errors.As(err, &se) || se.Line != c.line || se.Column != c.col ||
			!strings.HasPrefix(err.Error(), fmt.Sprintf("car.toml:%d:%d: ", c.line, c.col)) {
			t.Errorf("%q: %v, want line %d column %d", c.new, err, c.line, c.col)
		}
	}
}

// A design-stage setup gives [vehicle] alone: it loads, and CheckForLog
// refuses it (and a one-sensor setup) with a message naming the file and
// what to add.
func TestVehicleOnlySetup(t *testing.T) {
	vehicleOnly := goodSetup[:strings.Index(goodSetup, "[[sensor]]")]
	oneSensor := goodSetup[:strings.Index(goodSetup, "[[sensor]]\nchannel = \"br\"")]
	for _, c := range []struct {
		name, text string
		sensors    int
	}{{"vehicle only", vehicleOnly, 0}, {"one sensor", oneSensor, 1}} {
		t.Run(c.name, func(t *testing.T) {
			s, err := ParseSetup("design.toml", []byte(c.text))
			if err != nil {
				t.Fatal(err)
			}
			if s.Vehicle.MassKg != 1400 || len(s.Sensors) != c.sensors || len(s.Inputs) != 0 {
				t.Fatalf("parsed %+v", s)
			}
			err = s.CheckForLog()
			var se *SetupError
			if !errors.As(err, &se) || !errors.Is(err, ErrSetup) || se.Key != "sensor" {
				t.Fatalf("CheckForLog: %v (%T), want a *SetupError for key sensor", err, err)
			}
			msg := err.Error()
			for _, want := range []string{"design.toml: sensor: ", "two or more [[sensor]] tables", "channel", "x_m", fmt.Sprintf("found %d", c.sensors)} {
				if !strings.Contains(msg, want) {
					t.Errorf("message lacks %q: %s", want, msg)
				}
			}
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans lines: %q", msg)
			}
		})
	}
	s, err := ParseSetup("car.toml", []byte(goodSetup))
	if err != nil {
		t.Fatal(err)
	}
	if err := s.CheckForLog(); err != nil {
		t.Errorf("CheckForLog on a full setup: %v", err)
	}
}

func FuzzParseSetup(f *testing.F) {
	f.Add([]byte(goodSetup))
	f.Add([]byte("[vehicle]\nmass_kg = 1\n[[sensor]]\n"))
	f.Add([]byte("[[sensor]]\n[[sensor]]\nchannel = 'a'\nx_m = inf\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ParseSetup("fuzz.toml", data)
		if err == nil && (s.Vehicle.MassKg <= 0 || (len(s.Inputs) > 0 && len(s.Sensors) == 0) ||
			(len(s.Sensors) < 2) != (s.CheckForLog() != nil)) {
			t.Fatalf("accepted an invalid setup: %+v", s)
		}
		if err != nil && !errors.Is(err, ErrSetup) {
			t.Fatalf("untyped error %v", err)
		}
	})
}
