package ingest

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"regexp"
	"slices"
	"strings"

	"github.com/pelletier/go-toml/v2"
)

// Setup is a validated setup file: the vehicle's design model, the body
// sensors, the rig inputs and the analysis options, all in SI units. A
// design-stage setup may hold [vehicle] alone (no Sensors, no Inputs); code
// that reads a log calls CheckForLog first.
type Setup struct {
	Path     string
	Vehicle  VehicleSpec
	Sensors  []Sensor
	Inputs   []Input
	Analysis Analysis
	Targets  Targets
	Update   UpdateSpec
}

// VehicleSpec is the [vehicle] table. Optional values are NaN when absent.
type VehicleSpec struct {
	Name               string
	MassKg             float64
	PitchInertiaKgm2   float64 // given, or m r^2 from radius_of_gyration_m
	CGToFrontM         float64 // a
	CGToRearM          float64 // b
	FrontRateNPerM     float64
	RearRateNPerM      float64
	FrontDampingNsPerM float64 // 0 when absent
	RearDampingNsPerM  float64 // 0 when absent
	// FrontBuildUp and RearBuildUp are the spring, motion ratio and tyre
	// behind an axle's ride rate when the setup gives them instead of the
	// ride rate (nil otherwise); FrontRateNPerM and RearRateNPerM then hold
	// the ride rate they combine into.
	FrontBuildUp *RideRateBuildUp
	RearBuildUp  *RideRateBuildUp
}

// RideRateBuildUp is one axle's suspension spring, its motion ratio and the
// tyres, per axle (both wheels together) like every rate of the setup.
//
// The motion ratio is spring travel per wheel travel (dimensionless, usually
// below 1 when the spring sits inboard of the wheel), so that by virtual work
// the wheel rate is the spring rate times the ratio squared. The ride rate is
// the wheel rate and the tyre rate in series.
//
// References: T. D. Gillespie, Fundamentals of Vehicle Dynamics, SAE, 1992,
// chapter 5 (ride rate, wheel rate and installation ratio).
type RideRateBuildUp struct {
	SpringRateNPerM           float64 // both springs of the axle, along the spring
	MotionRatioSpringPerWheel float64 // spring travel / wheel travel
	TyreRateNPerM             float64 // both tyres; +Inf when not given (a rigid tyre)
}

// WheelRateNPerM returns the spring rate times the motion ratio squared.
func (b RideRateBuildUp) WheelRateNPerM() float64 {
	return b.SpringRateNPerM * b.MotionRatioSpringPerWheel * b.MotionRatioSpringPerWheel
}

// RideRateNPerM returns the wheel rate and the tyre rate in series,
// kw kt/(kw + kt); the wheel rate itself for a rigid tyre.
func (b RideRateBuildUp) RideRateNPerM() float64 {
	kw := b.WheelRateNPerM()
	if math.IsInf(b.TyreRateNPerM, 1) {
		return kw
	}
	return kw * b.TyreRateNPerM / (kw + b.TyreRateNPerM)
}

// Targets is the [targets] table: tolerances for the pass/fail verdict of a
// measurement against the design model. Absent values are NaN (no check).
type Targets struct {
	// BounceFrequencyTolerancePct and PitchFrequencyTolerancePct bound the
	// measured natural frequency's difference from the model's, in percent
	// of the model's.
	BounceFrequencyTolerancePct float64
	PitchFrequencyTolerancePct  float64
	// DampingRatioTolerance bounds the absolute difference of each mode's
	// measured damping ratio from the model's (e.g. 0.05).
	DampingRatioTolerance float64
	// RideRateTolerancePct bounds each back-calculated axle ride rate's
	// difference from the design rate, in percent of the design rate.
	RideRateTolerancePct float64
	// AxleDampingTolerancePct does the same for the back-calculated axle damping.
	AxleDampingTolerancePct float64
	// ModeShapeMACMin is the least MAC of each measured mode shape with the
	// model's (0 to 1).
	ModeShapeMACMin float64
}

// UpdateSpec is the [update] table: how the model is updated to the
// measured modes.
type UpdateSpec struct {
	// FreePitchInertia lets the least-squares update fit the pitch inertia
	// as well as the rates (it needs measured mode shapes).
	FreePitchInertia bool
}

// Sensor is one [[sensor]]: a vertical body accelerometer.
type Sensor struct {
	Channel string
	XM      float64 // s of the sensor: positive forward of the CG
}

// Input is one [[input]]: a rig pan (actuator) acceleration.
type Input struct {
	Channel string
	Axle    string // "front" or "rear"
}

// Analysis is the [analysis] table. Zero values mean "choose from the data"
// or, for the band and the window, the defaults DefaultBandLowHz,
// DefaultBandHighHz and DefaultWindow.
type Analysis struct {
	SampleRateHz float64 // for logs without a time column
	BandLowHz    float64
	BandHighHz   float64
	Window       string
	// SegmentSamples is the Welch segment length after decimation, a power
	// of two (0: chosen from the damping).
	SegmentSamples int
	// MaxModelOrder is the highest model order of the fit's sweep, even and
	// at least 4 (0: the method's default).
	MaxModelOrder int
}

// SetupError is a problem in a setup file. Line is 1-based (0 when the
// problem belongs to no single line), Column too (0 when only the line is
// known: for values that decode but fail validation); Key is the dotted key,
// with the 1-based entry number of an array table, e.g. "sensor[2].channel".
type SetupError struct {
	Path   string
	Line   int
	Column int // 1-based, 0 when not known
	Key    string
	Msg    string
}

func (e *SetupError) Error() string {
	var b strings.Builder
	b.WriteString(e.Path)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	if e.Key != "" {
		fmt.Fprintf(&b, ": %s", e.Key)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// ErrSetup is matched by errors.Is for every *SetupError.
var ErrSetup = errors.New("invalid setup file")

// Is makes errors.Is(err, ErrSetup) true for setup errors.
func (e *SetupError) Is(target error) bool { return target == ErrSetup }

// rawSetup mirrors the file; pointers tell absent from zero.
type rawSetup struct {
	Vehicle  *rawVehicle  `toml:"vehicle"`
	Sensor   []rawSensor  `toml:"sensor"`
	Input    []rawInput   `toml:"input"`
	Analysis *rawAnalysis `toml:"analysis"`
	Targets  *rawTargets  `toml:"targets"`
	Update   *rawUpdate   `toml:"update"`
}

type rawVehicle struct {
	Name               *string  `toml:"name"`
	MassKg             *float64 `toml:"mass_kg"`
	PitchInertiaKgm2   *float64 `toml:"pitch_inertia_kgm2"`
	RadiusOfGyrationM  *float64 `toml:"radius_of_gyration_m"`
	CGToFrontAxleM     *float64 `toml:"cg_to_front_axle_m"`
	CGToRearAxleM      *float64 `toml:"cg_to_rear_axle_m"`
	FrontRateNPerM     *float64 `toml:"front_rate_n_per_m"`
	RearRateNPerM      *float64 `toml:"rear_rate_n_per_m"`
	FrontDampingNsPerM *float64 `toml:"front_damping_ns_per_m"`
	RearDampingNsPerM  *float64 `toml:"rear_damping_ns_per_m"`

	FrontSpringRateNPerM           *float64 `toml:"front_spring_rate_n_per_m"`
	RearSpringRateNPerM            *float64 `toml:"rear_spring_rate_n_per_m"`
	FrontMotionRatioSpringPerWheel *float64 `toml:"front_motion_ratio_spring_per_wheel"`
	RearMotionRatioSpringPerWheel  *float64 `toml:"rear_motion_ratio_spring_per_wheel"`
	FrontTyreRateNPerM             *float64 `toml:"front_tyre_rate_n_per_m"`
	RearTyreRateNPerM              *float64 `toml:"rear_tyre_rate_n_per_m"`
}

type rawSensor struct {
	Channel *string  `toml:"channel"`
	XM      *float64 `toml:"x_m"`
}

type rawInput struct {
	Channel *string `toml:"channel"`
	Axle    *string `toml:"axle"`
}

type rawAnalysis struct {
	SampleRateHz *float64 `toml:"sample_rate_hz"`
	BandLowHz    *float64 `toml:"band_low_hz"`
	BandHighHz   *float64 `toml:"band_high_hz"`
	Window       *string  `toml:"window"`
	// SegmentSamples and MaxModelOrder are integers in the file.
	SegmentSamples *int `toml:"segment_samples"`
	MaxModelOrder  *int `toml:"max_model_order"`
}

type rawTargets struct {
	BounceFrequencyTolerancePct *float64 `toml:"bounce_frequency_tolerance_pct"`
	PitchFrequencyTolerancePct  *float64 `toml:"pitch_frequency_tolerance_pct"`
	DampingRatioTolerance       *float64 `toml:"damping_ratio_tolerance"`
	RideRateTolerancePct        *float64 `toml:"ride_rate_tolerance_pct"`
	AxleDampingTolerancePct     *float64 `toml:"axle_damping_tolerance_pct"`
	ModeShapeMACMin             *float64 `toml:"mode_shape_mac_min"`
}

type rawUpdate struct {
	FreePitchInertia *bool `toml:"free_pitch_inertia"`
}

// LoadSetup reads and validates the setup file at path.
func LoadSetup(path string) (*Setup, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read the setup file: %w", err)
	}
	return ParseSetup(path, data)
}

// ParseSetup decodes and validates a setup file's content; path names it in
// messages. Decoding is strict: an unknown or misspelt key is an error that
// names the key, its line and column (the decoder's positions; the key path
// with its array-table entry number comes from keyLocator).
func ParseSetup(path string, data []byte) (*Setup, error) {
	if bytes.IndexByte(data, 0) >= 0 {
		return nil, &SetupError{Path: path, Msg: "the file holds binary data (NUL bytes); give a TOML text file"}
	}
	loc := newKeyLocator(data)
	var raw rawSetup
	dec := toml.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&raw); err != nil {
		var strict *toml.StrictMissingError
		var de *toml.DecodeError
		msg := ""
		switch {
		case errors.As(err, &strict):
			de, msg = &strict.Errors[0], "unknown key; check its spelling and table against the setup reference"
		case errors.As(err, &de):
			msg = strings.TrimPrefix(oneLine(de.Error()), "toml: ")
			if m := typeErrorText.FindStringSubmatch(msg); m != nil {
				msg = fmt.Sprintf("wrong type: a TOML %s where %s is expected; write numbers unquoted, names in quotes", m[1], tomlTypeWanted[m[2]])
			} else {
				msg += " (check the TOML syntax)"
			}
		default:
			return nil, &SetupError{Path: path, Msg: oneLine(err.Error())}
		}
		line, col := de.Position()
		return nil, &SetupError{Path: path, Line: line, Column: col, Key: loc.at(line), Msg: msg}
	}
	v := validator{path: path, loc: loc}
	s := v.setup(&raw)
	if v.err != nil {
		return nil, v.err
	}
	s.Path = path
	return s, nil
}

// typeErrorText matches the decoder's message for a value of the wrong type.
var typeErrorText = regexp.MustCompile(`^cannot decode TOML (\w+) into .* of type \*?(\w+)$`)

// tomlTypeWanted words the Go types of rawSetup's fields for a user.
var tomlTypeWanted = map[string]string{"float64": "a number", "int": "an integer", "string": "a quoted name", "bool": "true or false"}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// validator records the first problem found.
type validator struct {
	path string
	loc  *keyLocator
	err  *SetupError
}

func (v *validator) fail(key, line string, format string, args ...any) {
	if v.err != nil {
		return
	}
	v.err = &SetupError{Path: v.path, Line: v.loc.line(line), Key: key, Msg: fmt.Sprintf(format, args...)}
}

// positive checks a required positive value; table is the locator path of its table.
func (v *validator) positive(p *float64, table, key, what string) float64 {
	full := table + "." + key
	if p == nil {
		v.fail(full, table, "missing; give %s", what)
		return 0
	}
	if !(*p > 0) || math.IsInf(*p, 0) {
		v.fail(full, full, "must be positive and finite (got %g); give %s", *p, what)
	}
	return *p
}

func (v *validator) nonNegative(p *float64, table, key, what string) float64 {
	if p == nil {
		return 0
	}
	full := table + "." + key
	if !(*p >= 0) || math.IsInf(*p, 0) {
		v.fail(full, full, "must be zero or positive and finite (got %g); give %s", *p, what)
	}
	return *p
}

func (v *validator) setup(raw *rawSetup) *Setup {
	s := &Setup{}
	if raw.Vehicle == nil {
		v.fail("vehicle", "", "the [vehicle] table is missing; it gives the mass, inertia, axle positions and rates")
		return s
	}
	rv := raw.Vehicle
	vs := &s.Vehicle
	if rv.Name != nil {
		vs.Name = *rv.Name
	}
	vs.MassKg = v.positive(rv.MassKg, "vehicle", "mass_kg", "the sprung mass in kg")
	switch {
	case rv.PitchInertiaKgm2 != nil && rv.RadiusOfGyrationM != nil:
		v.fail("vehicle.radius_of_gyration_m", "vehicle.radius_of_gyration_m",
			"give either pitch_inertia_kgm2 or radius_of_gyration_m, not both")
	case rv.PitchInertiaKgm2 != nil:
		vs.PitchInertiaKgm2 = v.positive(rv.PitchInertiaKgm2, "vehicle", "pitch_inertia_kgm2",
			"the pitch inertia about the CG in kg m^2")
	case rv.RadiusOfGyrationM != nil:
		r := v.positive(rv.RadiusOfGyrationM, "vehicle", "radius_of_gyration_m", "the pitch radius of gyration in m")
		vs.PitchInertiaKgm2 = vs.MassKg * r * r
	default:
		v.fail("vehicle.pitch_inertia_kgm2", "vehicle",
			"missing; give pitch_inertia_kgm2 (kg m^2) or radius_of_gyration_m (m)")
	}
	vs.CGToFrontM = v.positive(rv.CGToFrontAxleM, "vehicle", "cg_to_front_axle_m",
		"the distance from the CG forward to the front axle in m")
	vs.CGToRearM = v.positive(rv.CGToRearAxleM, "vehicle", "cg_to_rear_axle_m",
		"the distance from the CG back to the rear axle in m")
	vs.FrontRateNPerM, vs.FrontBuildUp = v.rideRate("front", rv.FrontRateNPerM, rv.FrontSpringRateNPerM,
		rv.FrontMotionRatioSpringPerWheel, rv.FrontTyreRateNPerM)
	vs.RearRateNPerM, vs.RearBuildUp = v.rideRate("rear", rv.RearRateNPerM, rv.RearSpringRateNPerM,
		rv.RearMotionRatioSpringPerWheel, rv.RearTyreRateNPerM)
	vs.FrontDampingNsPerM = v.nonNegative(rv.FrontDampingNsPerM, "vehicle", "front_damping_ns_per_m",
		"the front axle's damping in N s/m")
	vs.RearDampingNsPerM = v.nonNegative(rv.RearDampingNsPerM, "vehicle", "rear_damping_ns_per_m",
		"the rear axle's damping in N s/m")
	if v.err == nil {
		v.plausibleVehicle(rv, vs)
	}

	seen := map[string]string{}
	channel := func(p *string, key string) string {
		if p == nil || strings.TrimSpace(*p) == "" {
			v.fail(key, strings.TrimSuffix(key, ".channel"), "missing or empty; give the log column name")
			return ""
		}
		c := strings.TrimSpace(*p)
		if prev, dup := seen[c]; dup {
			v.fail(key, key, "channel %q is already used by %s; each log column serves one sensor or input", c, prev)
		}
		seen[c] = strings.TrimSuffix(key, ".channel")
		return c
	}
	// A design-stage setup may give no sensors at all (CheckForLog asks for
	// them where a log is read); rig inputs make sense only beside sensors.
	if len(raw.Sensor) == 0 && len(raw.Input) > 0 {
		v.fail("input", "input[1]", "[[input]] tables without [[sensor]] tables; a rig log needs two or more "+
			"body accelerometers: add [[sensor]] tables with channel and x_m, or remove the [[input]] tables")
	}
	for i, rs := range raw.Sensor {
		key := fmt.Sprintf("sensor[%d]", i+1)
		c := channel(rs.Channel, key+".channel")
		if rs.XM == nil {
			v.fail(key+".x_m", key, "missing; give the sensor's position in m, positive forward of the CG")
			continue
		}
		if math.IsNaN(*rs.XM) || math.IsInf(*rs.XM, 0) {
			v.fail(key+".x_m", key+".x_m", "must be finite")
		}
		s.Sensors = append(s.Sensors, Sensor{Channel: c, XM: *rs.XM})
	}
	if v.err == nil && len(s.Sensors) >= 2 {
		distinct := false
		for _, o := range s.Sensors[1:] {
			if o.XM != s.Sensors[0].XM {
				distinct = true
			}
		}
		if !distinct {
			v.fail("sensor[2].x_m", "sensor[2].x_m", "all sensors sit at the same x_m; pitch needs two positions along the body")
		}
	}
	for i, ri := range raw.Input {
		key := fmt.Sprintf("input[%d]", i+1)
		c := channel(ri.Channel, key+".channel")
		if ri.Axle == nil {
			v.fail(key+".axle", key, `missing; give axle = "front" or "rear"`)
			continue
		}
		ax := *ri.Axle
		if ax != "front" && ax != "rear" {
			v.fail(key+".axle", key+".axle", `must be "front" or "rear" (got %q)`, ax)
		}
		s.Inputs = append(s.Inputs, Input{Channel: c, Axle: ax})
	}
	if v.err == nil && len(s.Inputs) > 0 {
		var f, r bool
		for _, in := range s.Inputs {
			f = f || in.Axle == "front"
			r = r || in.Axle == "rear"
		}
		if !f || !r {
			v.fail("input", "input[1]", "a rig test needs a front and a rear input; omit [[input]] entirely for a drop test")
		}
	}
	if ra := raw.Analysis; ra != nil {
		a := &s.Analysis
		a.SampleRateHz = v.nonNegative(ra.SampleRateHz, "analysis", "sample_rate_hz", "the log's sample rate in Hz")
		a.BandLowHz = v.nonNegative(ra.BandLowHz, "analysis", "band_low_hz", "the lower edge of the analysis band in Hz")
		a.BandHighHz = v.nonNegative(ra.BandHighHz, "analysis", "band_high_hz", "the upper edge of the analysis band in Hz")
		if a.BandHighHz > 0 && a.BandLowHz >= a.BandHighHz {
			v.fail("analysis.band_high_hz", "analysis.band_high_hz",
				"must exceed band_low_hz (%g Hz); the band runs from band_low_hz to band_high_hz", a.BandLowHz)
		}
		if ra.Window != nil {
			a.Window = *ra.Window
			if _, _, ok := WindowName(a.Window); !ok {
				v.fail("analysis.window", "analysis.window", "unknown window %q; use one of %s",
					a.Window, strings.Join(Windows, ", "))
			}
		}
		if p := ra.SegmentSamples; p != nil {
			a.SegmentSamples = *p
			if n := *p; n < 16 || n&(n-1) != 0 {
				v.fail("analysis.segment_samples", "analysis.segment_samples",
					"must be a power of two of at least 16 (got %d); or leave it out to choose it from the damping", n)
			}
		}
		if p := ra.MaxModelOrder; p != nil {
			a.MaxModelOrder = *p
			if n := *p; n < 4 || n%2 == 1 {
				v.fail("analysis.max_model_order", "analysis.max_model_order",
					"must be even and at least 4, room for two modes (got %d)", n)
			}
		}
	}
	if rt := raw.Targets; rt != nil {
		t := &s.Targets
		t.BounceFrequencyTolerancePct = v.optionalPositive(rt.BounceFrequencyTolerancePct, "targets",
			"bounce_frequency_tolerance_pct", "the allowed bounce frequency difference in percent of the model's")
		t.PitchFrequencyTolerancePct = v.optionalPositive(rt.PitchFrequencyTolerancePct, "targets",
			"pitch_frequency_tolerance_pct", "the allowed pitch frequency difference in percent of the model's")
		t.DampingRatioTolerance = v.optionalPositive(rt.DampingRatioTolerance, "targets",
			"damping_ratio_tolerance", "the allowed absolute damping ratio difference, e.g. 0.05")
		t.RideRateTolerancePct = v.optionalPositive(rt.RideRateTolerancePct, "targets",
			"ride_rate_tolerance_pct", "the allowed ride rate difference in percent of the design rate")
		t.AxleDampingTolerancePct = v.optionalPositive(rt.AxleDampingTolerancePct, "targets",
			"axle_damping_tolerance_pct", "the allowed axle damping difference in percent of the design damping")
		t.ModeShapeMACMin = v.optionalPositive(rt.ModeShapeMACMin, "targets",
			"mode_shape_mac_min", "the least acceptable MAC, between 0 and 1")
		if t.ModeShapeMACMin > 1 {
			v.fail("targets.mode_shape_mac_min", "targets.mode_shape_mac_min",
				"must not exceed 1 (got %g); a MAC runs from 0 to 1", t.ModeShapeMACMin)
		}
	} else {
		s.Targets = Targets{math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()}
	}
	if ru := raw.Update; ru != nil && ru.FreePitchInertia != nil {
		s.Update.FreePitchInertia = *ru.FreePitchInertia
	}
	return s
}

// CheckForLog returns a *SetupError unless the setup has what reading a log
// needs: two or more [[sensor]] tables (ParseSetup already checked that each
// has a channel and an x_m, and that their positions differ). A design-stage
// setup with only [vehicle] serves the model and the comparison, not a log.
func (s *Setup) CheckForLog() error {
	if len(s.Sensors) >= 2 {
		return nil
	}
	return &SetupError{Path: s.Path, Key: "sensor", Msg: fmt.Sprintf(
		"reading or simulating a log needs two or more [[sensor]] tables, each with channel (the log column) and "+
			"x_m (m, positive forward of the CG), found %d; add one per body accelerometer, "+
			`e.g. [[sensor]] with channel = "body_front" and x_m = 1.05`, len(s.Sensors))}
}

// optionalPositive checks an optional positive value; NaN when absent.
func (v *validator) optionalPositive(p *float64, table, key, what string) float64 {
	if p == nil {
		return math.NaN()
	}
	return v.positive(p, table, key, what)
}

// rideRate returns an axle's ride rate, given directly or built up from its
// spring rate, motion ratio and tyre rate, and the build-up (nil when the
// ride rate is given).
func (v *validator) rideRate(axle string, ride, spring, ratio, tyre *float64) (float64, *RideRateBuildUp) {
	rideKey, springKey := axle+"_rate_n_per_m", axle+"_spring_rate_n_per_m"
	ratioKey, tyreKey := axle+"_motion_ratio_spring_per_wheel", axle+"_tyre_rate_n_per_m"
	switch {
	case ride != nil && spring != nil:
		v.fail("vehicle."+springKey, "vehicle."+springKey,
			"give either %s (the ride rate) or %s (with %s), not both", rideKey, springKey, ratioKey)
		return 0, nil
	case ride != nil || spring == nil:
		for _, k := range []struct {
			p   *float64
			key string
		}{{ratio, ratioKey}, {tyre, tyreKey}} {
			if k.p != nil {
				v.fail("vehicle."+k.key, "vehicle."+k.key,
					"only used with %s; give the spring rate, or remove this key when %s gives the ride rate",
					springKey, rideKey)
			}
		}
		return v.positive(ride, "vehicle", rideKey, fmt.Sprintf(
			"the %s axle's ride rate in N/m (both wheels), or %s with %s", axle, springKey, ratioKey)), nil
	}
	b := &RideRateBuildUp{TyreRateNPerM: math.Inf(1)}
	b.SpringRateNPerM = v.positive(spring, "vehicle", springKey,
		fmt.Sprintf("the %s axle's spring rate in N/m (both springs)", axle))
	if ratio == nil {
		v.fail("vehicle."+ratioKey, "vehicle."+springKey,
			"missing; %s needs the motion ratio, spring travel per wheel travel", springKey)
		return 0, nil
	}
	b.MotionRatioSpringPerWheel = v.positive(ratio, "vehicle", ratioKey, "spring travel per wheel travel")
	if tyre != nil {
		b.TyreRateNPerM = v.positive(tyre, "vehicle", tyreKey,
			fmt.Sprintf("the %s axle's tyre rate in N/m (both tyres)", axle))
	}
	return b.RideRateNPerM(), b
}

// Defaults of the [analysis] table, for both tests and the command line.
//
// The band: body bounce and pitch of road vehicles lie in about 0.8-2.5 Hz
// (common practice; Gillespie 1992 gives 1-1.5 Hz for passenger cars and up
// to 2.5 Hz for sports cars [memory]); the band leaves room on both sides
// for the fits' residual terms.
const (
	DefaultBandLowHz  = 0.5
	DefaultBandHighHz = 4.0
	DefaultWindow     = "hann"
)

// Windows lists the spectral window names a setup may give (package
// identify maps them to spectral windows).
var Windows = []string{"hann", "hamming", "flattop", "rectangular"}

// windowSpellings maps other common spellings of the windows to their
// names in Windows.
var windowSpellings = map[string]string{"hanning": "hann"}

// WindowName returns the name in Windows that name stands for: name itself,
// or the name of another common spelling ("hanning" is the Hann window)
// with a note that says so; ok is false for an unknown window.
func WindowName(name string) (canonical, note string, ok bool) {
	if slices.Contains(Windows, name) {
		return name, "", true
	}
	if c, found := windowSpellings[name]; found {
		return c, fmt.Sprintf("window %q is read as %q, the name used here; write %q to drop this note", name, c, c), true
	}
	return "", "", false
}

// SensorPositionsM returns the sensors' x_m in their order.
func SensorPositionsM(sensors []Sensor) []float64 {
	pos := make([]float64, len(sensors))
	for i, se := range sensors {
		pos[i] = se.XM
	}
	return pos
}
