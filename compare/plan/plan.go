package plan

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// Defaults of a Request's limits and noise (our choices, stated in the
// plan; set them to the rig's and the loggers' own).
const (
	// DefaultNoiseSDMPerS2 is the noise sd of each channel at the planned
	// rate: 0.05 m/s^2 (5 mg), about what the calibration sweep's 2-5 %
	// noise of a rig or drop channel amounts to; it stands for everything
	// the two-mode model does not hold, not for the accelerometer's
	// electrical noise alone.
	DefaultNoiseSDMPerS2 = 0.05
	// DefaultMaxDriveRMSMPerS2 is the largest RMS pan acceleration: 2
	// m/s^2 keeps a Gaussian drive's peaks (4 sd) under 1 g, as the
	// cautions ask of wheels that are not clamped.
	DefaultMaxDriveRMSMPerS2 = 2
	// DefaultMaxPanTravelM is the largest pan displacement (4 sd of the
	// drive's displacement, either way from the mean).
	DefaultMaxPanTravelM = 0.075
	// DefaultMaxDurationS is the longest rig record planned: an hour.
	DefaultMaxDurationS = 3600
	// DefaultMaxDropHeightM is the highest drop planned: small heights,
	// as the cautions ask.
	DefaultMaxDropHeightM = 0.05
	// DefaultMaxDrops is the most drops planned in one series.
	DefaultMaxDrops = 10
	// Margin is how far under the wanted sd the prediction is planned: a
	// prediction off by a quarter still meets what is wanted.
	Margin = 1.25
	// DefaultRefineSeeds is the number of seeded tests of the small Monte
	// Carlo that refines the asymptotic prediction: 24 pin a value's own
	// realism factor to about 15 %.
	DefaultRefineSeeds = 24
	// ratePerBandHz: the planned sample rate is this many times the
	// analysis band's upper edge, rounded up to a multiple of 50 Hz: the
	// rate the drop route fits at (package decay), well above what the rig
	// route keeps (twice the band's edge), so the logger's anti-alias
	// filter is out of the way.
	ratePerBandHz = 50
	// preTriggerS is the rest logged before a drop.
	preTriggerS = 1
)

// Request is what a plan is made for.
type Request struct {
	// Setup is the car's setup (SetupPath is read when it is nil):
	// [vehicle] (the design model the test is simulated from), the
	// [[sensor]] positions to advise on (two or more; with none, two at
	// the ends of SensorSpanM), the [[input]] pans (rig; with none, one
	// per axle), the [analysis] band and [targets].
	Setup     *ingest.Setup
	SetupPath string
	// Test is "rig" or "drop".
	Test string
	// Wanted is the wanted sd as the flags give it; a value that is zero
	// (or NaN) comes from the setup's [targets] (WantedFrom).
	Wanted Wanted
	// NoiseSDMPerS2 is the noise sd of each channel at the planned rate
	// (0: DefaultNoiseSDMPerS2).
	NoiseSDMPerS2 float64
	// RateHz is the logger's sample rate (0: ratePerBandHz times the
	// band's upper edge, rounded up to a multiple of 50 Hz).
	RateHz float64
	// SensorSpanM bounds the sensor positions: rear, front in m from the
	// CG (none: the axles, -b to +a).
	SensorSpanM []float64
	// Limits; zero takes the defaults above.
	MaxDriveRMSMPerS2, MaxPanTravelM, MaxDurationS float64
	MaxDropHeightM                                 float64
	MaxDrops                                       int
	// Verify, when not zero, is the number of simulated tests (2 or more)
	// that Make runs through Verify.
	Verify int
	// RefineSeeds is the number of simulated tests that refine the
	// prediction (0: DefaultRefineSeeds; fewer are quicker and rougher).
	RefineSeeds int
	// ToolVersion is written into the plan.
	ToolVersion string
}

// Plan is a planned test, as its JSON file holds it.
type Plan struct {
	Tool  compare.Tool     `json:"tool"`
	Setup *compare.FileRef `json:"setup,omitempty"`
	Test  string           `json:"test"`
	// DurationS is the rig record's length, or one drop's log length.
	DurationS    float64 `json:"duration_s"`
	SampleRateHz float64 `json:"sample_rate_hz"`
	// Drops is how many drops to log and pool; null for a rig test.
	Drops *int      `json:"drops"`
	Rig   *RigJSON  `json:"rig,omitempty"`
	Drop  *DropJSON `json:"drop,omitempty"`
	// NoiseSDMPerS2 is the noise assumed on every channel.
	NoiseSDMPerS2 float64 `json:"noise_sd_m_per_s2"`
	Wanted        Wanted  `json:"wanted_sd"`
	// WantedFrom says where each wanted sd came from.
	WantedFrom []string `json:"wanted_from"`
	// SensorSpanM is the span the sensors may take, [rear, front] in m.
	SensorSpanM [2]float64     `json:"sensor_span_m"`
	Sensors     []SensorAdvice `json:"sensors"`
	// SensorsNote compares the planned positions with the given ones at
	// the planned conditions, when they differ.
	SensorsNote string          `json:"sensors_note,omitempty"`
	Modes       []ModePredicted `json:"modes"`
	Rates       *RatesPredicted `json:"rates,omitempty"`
	// Checks set each wanted sd beside its prediction.
	Checks []Check `json:"checks"`
	// Meets is true when every prediction lies within its wanted sd.
	Meets      bool           `json:"meets_wanted"`
	Prediction PredictionJSON `json:"prediction"`
	// Curve is the predicted sd against the record length (rig) or the
	// number of drops, for the figure.
	Curve        Curve         `json:"curve"`
	Verification *Verification `json:"verification,omitempty"`
	Warnings     []string      `json:"warnings"`

	p *planner // what Verify needs
}

// RigJSON is the rig test's recommendation beyond duration and rate.
type RigJSON struct {
	SegmentSamples     int     `json:"segment_samples"`
	ResolutionHz       float64 `json:"resolution_hz"`
	DecimatedRateHz    float64 `json:"decimated_rate_hz"`
	BandLowHz          float64 `json:"band_low_hz"`
	BandHighHz         float64 `json:"band_high_hz"`
	DriveLowHz         float64 `json:"drive_low_hz"`
	DriveHighHz        float64 `json:"drive_high_hz"`
	DriveRMSMPerS2     float64 `json:"drive_rms_m_per_s2"`
	PanTravelM         float64 `json:"pan_travel_m"`
	PanPeakAccelMPerS2 float64 `json:"pan_peak_acceleration_m_per_s2"`
}

// DropJSON is the drop series' recommendation beyond log length and rate.
type DropJSON struct {
	HeightM     float64 `json:"height_m"`
	RearDelayS  float64 `json:"rear_delay_s"`
	PreTriggerS float64 `json:"pre_trigger_s"`
}

// SensorAdvice is one body sensor: where the setup has it, where the plan
// puts it, and what is wrong with the given place.
type SensorAdvice struct {
	Channel  string   `json:"channel"`
	GivenXM  *float64 `json:"given_x_m"` // null when the setup has no sensors
	XM       float64  `json:"x_m"`
	Warnings []string `json:"warnings,omitempty"`
}

// ModePredicted is a mode of the design model with the sd the planned test
// is predicted to give it.
type ModePredicted struct {
	Label                 string              `json:"label"`
	NaturalFrequencyHz    float64             `json:"natural_frequency_hz"`
	DampingRatio          float64             `json:"damping_ratio"`
	PitchPerBounceRadPerM *float64            `json:"pitch_per_bounce_rad_per_m"`
	NodeM                 *float64            `json:"node_m"`
	PredictedSD           compare.Uncertainty `json:"predicted_sd"`
}

// RatesPredicted is the design's rates with their predicted sd.
type RatesPredicted struct {
	FrontRateNPerM float64                    `json:"front_rate_n_per_m"`
	RearRateNPerM  float64                    `json:"rear_rate_n_per_m"`
	PredictedSD    compare.UpdatedUncertainty `json:"predicted_sd"`
}

// Check sets one wanted sd beside its prediction.
type Check struct {
	Key      string  `json:"key"`
	Name     string  `json:"name"`
	Unit     string  `json:"unit"`
	WantedSD float64 `json:"wanted_sd"`
	// PredictedSD is null when nothing predicts the value (the
	// back-calculation failed).
	PredictedSD *float64 `json:"predicted_sd"`
	// Ratio is PredictedSD/WantedSD: at most 1 meets it.
	Ratio *float64 `json:"ratio"`
}

// PredictionJSON says what the prediction rests on.
type PredictionJSON struct {
	Method string `json:"method"`
	// RealismFactor is k, the RMS of (error - bias)/asymptotic random sd
	// over the refining tests and the regular values; RealismFactors are
	// the factors each regular value's random sd is scaled by, by key
	// ("bounce.natural_frequency_hz", "updated.rear_rate_n_per_m").
	RealismFactor  float64            `json:"realism_factor"`
	RealismFactors map[string]float64 `json:"realism_factors"`
	RefineRuns     int                `json:"refine_runs"`
	RefineFailed   int                `json:"refine_failed"`
	Margin         float64            `json:"margin"`
}

// Curve is each wanted value's ratio predicted/wanted against the record
// length (rig, s) or the number of drops pooled.
type Curve struct {
	X      []float64     `json:"x"`
	XLabel string        `json:"x_label"`
	Series []CurveSeries `json:"series"`
	// Chosen is the planned x.
	Chosen float64 `json:"chosen"`
}

// CurveSeries is one wanted quantity's ratio predicted/wanted along the curve.
type CurveSeries struct {
	Name  string    `json:"name"`
	Ratio []float64 `json:"ratio"`
}

// planner holds what every step of a plan uses.
type planner struct {
	req    Request
	setup  *ingest.Setup
	car    compare.Vehicle
	truth  map[string]float64
	band   [2]float64
	rateHz float64
	noise  float64
	span   [2]float64
	inputs []ingest.Input
	// wantedFrom says where each wanted sd came from.
	wantedFrom []string
	// The chosen test: sensors, conditions and the realism factor.
	sensors []ingest.Sensor
	rig     RigTest
	drop    DropTest
	// k is the pooled realism factor (1 until refine sets it), kq the
	// factor of each regular value.
	k  float64
	kq map[string]float64
	// The plan's prediction: asymptotic modes of one test, and the scale
	// of their random sd (one over the root of the number of drops).
	modes []body.Mode
	scale float64
	// rigCache holds the rig predictions made (predictRig).
	rigCache map[rigKey]rigPrediction
}

// Make plans the test of req: conditions, sensor positions and the
// predicted sd, refined by req.RefineSeeds simulated tests through the real
// analysis (which ctx can stop), and verified when req.Verify asks.
// Mistakes in req are *compare.OptionError.
func Make(ctx context.Context, req Request) (*Plan, error) {
	p, err := newPlanner(req)
	if err != nil {
		return nil, err
	}
	given := p.sensors
	var out *Plan
	if req.Test == identify.TestRig {
		out, err = p.planRig(ctx)
	} else {
		out, err = p.planDrop(ctx)
	}
	if err != nil {
		return nil, err
	}
	out.p = p
	out.Tool = compare.Tool{Name: "ridemodes", Version: req.ToolVersion}
	if sum, err := ingest.FileSHA256(p.setup.Path); err == nil {
		out.Setup = &compare.FileRef{Path: p.setup.Path, SHA256: sum}
	}
	out.Test, out.SampleRateHz, out.NoiseSDMPerS2 = req.Test, p.rateHz, p.noise
	out.Wanted, out.WantedFrom, out.SensorSpanM = p.req.Wanted, p.wantedFrom, p.span
	out.Sensors = p.sensorAdvice(given, p.setup.Sensors)
	if len(p.setup.Sensors) >= 2 && !sameLayout(given, p.sensors) {
		out.SensorsNote = p.layoutNote(given)
	}
	if p.k > weakRealism {
		out.Warnings = append(out.Warnings, fmt.Sprintf("the random errors of the simulated tests of the plan were %.2f times the asymptotic sd: "+
			"the test is near what the analysis can resolve (a weakly excited mode, a noisy drop), and the prediction rests "+
			"on %d tests; more signal (drive level, drop height, roll-off) makes it firmer, and --verify checks it", p.k, p.req.RefineSeeds))
	}
	out.Warnings = append(out.Warnings, p.req.Wanted.farNodes(p.truth, p.car.WheelbaseM())...)
	if out.Warnings == nil {
		out.Warnings = []string{}
	}
	if req.Verify != 0 {
		if _, err := Verify(ctx, out, req.Verify); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// layoutNote compares the worst ratio predicted/wanted of the given
// sensor positions with the planned ones, at the planned conditions.
func (p *planner) layoutNote(given []ingest.Sensor) string {
	var ms []body.Mode
	var err error
	if p.req.Test == identify.TestRig {
		ms, err = p.predictRig(given, p.rig)
	} else {
		ms, err = predictDrop(p.car, given, p.drop)
	}
	_, planned := p.checks(p.predicted(p.sensors, p.modes, p.scale))
	if err != nil {
		return fmt.Sprintf("with the sensors where the setup has them, the planned test cannot be predicted (%v); "+
			"at the planned positions its worst ratio predicted/wanted is %.2f", err, planned)
	}
	_, w := p.checks(p.predicted(given, ms, p.scale))
	return fmt.Sprintf("with the sensors where the setup has them, the planned test's worst ratio predicted/wanted "+
		"would be %.2f; at the planned positions it is %.2f", w, planned)
}

func optionErrorf(format string, args ...any) error {
	return &compare.OptionError{Err: fmt.Errorf(format, args...)}
}

// newPlanner checks req and fills the defaults.
func newPlanner(req Request) (*planner, error) {
	if req.Setup == nil {
		s, err := ingest.LoadSetup(req.SetupPath)
		if err != nil {
			return nil, err
		}
		req.Setup = s
	}
	switch {
	case req.Test != identify.TestRig && req.Test != identify.TestDrop:
		return nil, optionErrorf("--test must be %q or %q (got %q)", identify.TestRig, identify.TestDrop, req.Test)
	case req.Verify < 0 || req.Verify == 1:
		return nil, optionErrorf("--verify takes 2 or more simulated tests (got %d)", req.Verify)
	case len(req.SensorSpanM) != 0 && len(req.SensorSpanM) != 2:
		return nil, optionErrorf("--sensor-span takes two positions, REAR,FRONT in m (got %d)", len(req.SensorSpanM))
	}
	car := compare.DesignOf(req.Setup.Vehicle)
	if err := car.Validate(); err != nil {
		return nil, fmt.Errorf("%s: %w", req.Setup.Path, err)
	}
	truth, err := truthOf(car)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", req.Setup.Path, err)
	}
	var from []string
	if req.Wanted, from, err = WantedFrom(req.Setup.Targets, req.Wanted); err != nil {
		return nil, &compare.OptionError{Err: err}
	}
	p := &planner{req: req, setup: req.Setup, car: car, truth: truth, noise: req.NoiseSDMPerS2, k: 1, wantedFrom: from,
		band: [2]float64{ingest.DefaultBandLowHz, ingest.DefaultBandHighHz}}
	if a := req.Setup.Analysis; a.BandLowHz > 0 {
		p.band[0] = a.BandLowHz
	}
	if a := req.Setup.Analysis; a.BandHighHz > 0 {
		p.band[1] = a.BandHighHz
	}
	if p.noise == 0 {
		p.noise = DefaultNoiseSDMPerS2
	}
	p.rateHz = req.RateHz
	if p.rateHz == 0 {
		p.rateHz = 50 * math.Ceil(ratePerBandHz*p.band[1]/50)
	}
	p.span = [2]float64{-car.CGToRearM, car.CGToFrontM}
	if len(req.SensorSpanM) == 2 {
		p.span = [2]float64{req.SensorSpanM[0], req.SensorSpanM[1]}
	}
	defaults := []struct {
		dst *float64
		def float64
	}{{&p.req.MaxDriveRMSMPerS2, DefaultMaxDriveRMSMPerS2}, {&p.req.MaxPanTravelM, DefaultMaxPanTravelM},
		{&p.req.MaxDurationS, DefaultMaxDurationS}, {&p.req.MaxDropHeightM, DefaultMaxDropHeightM}}
	for _, d := range defaults {
		if *d.dst == 0 {
			*d.dst = d.def
		}
	}
	if p.req.MaxDrops == 0 {
		p.req.MaxDrops = DefaultMaxDrops
	}
	if p.req.RefineSeeds == 0 {
		p.req.RefineSeeds = DefaultRefineSeeds
	}
	switch {
	case !(p.noise > 0) || math.IsInf(p.noise, 0):
		return nil, optionErrorf("--noise-sd must be positive (got %g m/s^2)", p.noise)
	case !(p.rateHz > 4*p.band[1]) || math.IsInf(p.rateHz, 0):
		return nil, optionErrorf("--rate %g Hz is too low for the band up to %g Hz; log at %g Hz or more",
			p.rateHz, p.band[1], 4*p.band[1])
	case !(p.span[1] > p.span[0]) || math.IsInf(p.span[0], 0) || math.IsInf(p.span[1], 0):
		return nil, optionErrorf("--sensor-span needs REAR < FRONT (got %g to %g m)", p.span[0], p.span[1])
	case !(p.req.MaxDriveRMSMPerS2 > 0) || !(p.req.MaxPanTravelM > 0) || !(p.req.MaxDropHeightM > 0) ||
		!(p.req.MaxDurationS >= 60) || p.req.MaxDrops < 1 || p.req.RefineSeeds < 2 || p.req.RefineSeeds >= verifySeedBase:
		return nil, optionErrorf("the limits (--max-pan-travel, --max-drop-height, drive, drops) must be positive and the longest record at least 60 s")
	}
	p.inputs = req.Setup.Inputs
	if len(p.inputs) == 0 {
		p.inputs = []ingest.Input{{Channel: "pan_front", Axle: "front"}, {Channel: "pan_rear", Axle: "rear"}}
	}
	p.sensors = slices.Clone(req.Setup.Sensors)
	if len(p.sensors) < 2 {
		p.sensors = []ingest.Sensor{{Channel: "body_front", XM: p.span[1]}, {Channel: "body_rear", XM: p.span[0]}}
	}
	if !body.CanSeparate(ingest.SensorPositionsM(p.sensors)) {
		return nil, errors.New("plan: the sensors must sit at two or more distinct positions")
	}
	return p, nil
}

// setupWith returns the setup with the given sensors and the planned
// inputs: the setup of a planned test's analysis.
func (p *planner) setupWith(sensors []ingest.Sensor) *ingest.Setup {
	s := *p.setup
	s.Sensors, s.Inputs = sensors, p.inputs
	return &s
}

// truthModes returns the design model's modes as measured modes without
// sd, for the plan's tables.
func (p *planner) truthModes() []body.Mode {
	ms, _ := p.car.Modes()
	out := make([]body.Mode, len(ms))
	for i, m := range ms {
		out[i] = body.Mode{Label: m.Label, Pole: m.Pole, NaturalFrequencyHz: m.NaturalFrequencyHz,
			DampedFrequencyHz: m.DampedFrequencyHz, DampingRatio: m.DampingRatio,
			PitchPerBounceRadPerM: m.PitchPerBounceRadPerM, NodeM: m.NodeM, HeaveAndPitch: m.Shape}
	}
	return out
}

// asymptotic returns the values that the asymptotic modes ms give,
// through the analysis's own back-calculation of the rates
// (compare.Result.AssessAgainst): each at its true value, with the random
// sd of ms as sd and the bias of their values as bias (the rig's expected
// estimate is biased by the spectral window; a drop's bound is unbiased).
func (p *planner) asymptotic(sensors []ingest.Sensor, ms []body.Mode) []quantity {
	r := &compare.Result{}
	pos := ingest.SensorPositionsM(sensors)
	for _, m := range ms {
		r.Modes = append(r.Modes, compare.MeasuredJSON(m, pos, ""))
	}
	// A failed back-calculation leaves the rates out; the checks then say
	// that nothing predicts them.
	_ = r.AssessAgainst(p.setupWith(sensors))
	qs := quantitiesOf(r)
	for i, q := range qs {
		t := p.truth[q.key]
		qs[i].value, qs[i].bias = t, q.value-t
	}
	return qs
}

// predicted returns the values that the modes ms predict (asymptotic),
// each with the root mean square error about its true value: the random
// sd times the value's realism factor (factor) and scale (one over the
// root of the number of drops pooled), combined with the bias, which
// pooling does not shrink.
func (p *planner) predicted(sensors []ingest.Sensor, ms []body.Mode, scale float64) []quantity {
	qs := p.asymptotic(sensors, ms)
	for i, q := range qs {
		qs[i].sd = math.Hypot(scale*p.factor(q.key)*q.sd, q.bias)
	}
	return qs
}

// checks returns the wanted quantities of the predicted qs with their
// ratios, and the worst ratio (+Inf when a wanted quantity has no
// prediction). The wanted sd of a relative quantity is taken of its true
// value.
func (p *planner) checks(qs []quantity) ([]Check, float64) {
	var cs []Check
	worst := 0.0
	for _, key := range p.wantedKeys() {
		truth := quantity{key: key, name: key, value: p.truth[key]}
		c := Check{Key: key, Name: key, WantedSD: p.req.Wanted.wantedSD(truth, p.car.WheelbaseM())}
		if i := slices.IndexFunc(qs, func(q quantity) bool { return q.key == key }); i >= 0 {
			q := qs[i]
			c.Name, c.Unit = q.name, q.unit
			c.PredictedSD, c.Ratio = compare.Finite(q.sd), compare.Finite(q.sd/c.WantedSD)
		}
		if c.Ratio == nil {
			worst = math.Inf(1)
		} else {
			worst = math.Max(worst, *c.Ratio)
		}
		cs = append(cs, c)
	}
	return cs, worst
}

// wantedKeys lists the keys of the quantities a wanted sd may apply to, in
// the order of the checks.
func (p *planner) wantedKeys() []string {
	var keys []string
	w := p.req.Wanted
	for _, l := range []string{"bounce", "pitch"} {
		if !math.IsNaN(w.FrequencySDPct) {
			keys = append(keys, l+".natural_frequency_hz")
		}
		if !math.IsNaN(w.DampingSD) {
			keys = append(keys, l+".damping_ratio")
		}
		if !math.IsNaN(w.NodeSDM) && math.Abs(p.truth[l+".node_m"]) <= nodeReachWheelbases*p.car.WheelbaseM() {
			keys = append(keys, l+".node_m")
		}
	}
	if !math.IsNaN(w.RateSDPct) {
		keys = append(keys, "updated.front_rate_n_per_m", "updated.rear_rate_n_per_m")
	}
	return keys
}

// finish fills the predicted modes, rates and checks of out from the
// asymptotic modes ms with the realism factors, scaled by scale (one over
// the root of the number of drops).
func (p *planner) finish(out *Plan, ms []body.Mode, scale float64) {
	p.modes, p.scale = ms, scale
	qs := p.predicted(p.sensors, ms, scale)
	sd := map[string]*float64{}
	for _, q := range qs {
		sd[q.key] = compare.Finite(q.sd)
	}
	val := func(key string) float64 {
		if x := sd[key]; x != nil {
			return *x
		}
		return math.NaN()
	}
	for _, m := range p.truthModes() {
		l := m.Label + "."
		out.Modes = append(out.Modes, ModePredicted{Label: m.Label, NaturalFrequencyHz: m.NaturalFrequencyHz,
			DampingRatio: m.DampingRatio, PitchPerBounceRadPerM: compare.Finite(m.PitchPerBounceRadPerM),
			NodeM: compare.Finite(m.NodeM), PredictedSD: compare.Uncertainty{NaturalFrequencyHz: val(l + "natural_frequency_hz"),
				DampingRatio: val(l + "damping_ratio"), PitchPerBounceRadPerM: sd[l+"pitch_per_bounce_rad_per_m"], NodeM: sd[l+"node_m"]}})
	}
	if sd["updated.front_rate_n_per_m"] != nil && sd["updated.rear_rate_n_per_m"] != nil {
		out.Rates = &RatesPredicted{FrontRateNPerM: p.car.FrontRateNPerM, RearRateNPerM: p.car.RearRateNPerM,
			PredictedSD: compare.UpdatedUncertainty{FrontRateNPerM: val("updated.front_rate_n_per_m"),
				RearRateNPerM: val("updated.rear_rate_n_per_m"), FrontDampingNsPerM: sd["updated.front_damping_ns_per_m"],
				RearDampingNsPerM: sd["updated.rear_damping_ns_per_m"]}}
	}
	var worst float64
	out.Checks, worst = p.checks(qs)
	out.Meets = worst <= 1
}

// WriteJSON writes the plan as indented JSON to path, atomically
// (ingest.WriteFileAtomic).
func (pl *Plan) WriteJSON(path string) error {
	b, err := json.MarshalIndent(pl, "", "  ")
	if err != nil {
		return err
	}
	return ingest.WriteFileAtomic(path, append(b, '\n'))
}
