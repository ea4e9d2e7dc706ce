package compare

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// Result is the JSON result of the contract. Commands fill the parts they
// compute; empty parts are left out.
type Result struct {
	Tool     Tool       `json:"tool"`
	Setup    *FileRef   `json:"setup,omitempty"`
	Log      *LogRef    `json:"log,omitempty"`
	Test     string     `json:"test,omitempty"`
	Analysis *Analysis  `json:"analysis,omitempty"`
	Modes    []ModeJSON `json:"modes,omitempty"`
	// ModeCorrelation relates the measured modes' figures (one fit's);
	// absent, they are taken as independent.
	ModeCorrelation *ModeCorrelation `json:"mode_correlation,omitempty"`
	Model           *ModelJSON       `json:"model,omitempty"`
	Comparison      []Comparison     `json:"comparison,omitempty"`
	Updated         *Updated         `json:"updated,omitempty"`
	Checks          []Check          `json:"checks,omitempty"`
	// Verdict answers the setup's targets; written by Assessment.Fill.
	Verdict  *Verdict `json:"verdict,omitempty"`
	Warnings []string `json:"warnings"`
	// Runs and Pooling describe a pooled analysis of several logs (then Log
	// is left out); a single log leaves them out.
	Runs    []RunJSON    `json:"runs,omitempty"`
	Pooling *PoolingJSON `json:"pooling,omitempty"`
}

// Analysis records how the modes were identified: the band, the choices
// made with their reasons, and the quick single-mode estimate that the fit
// is set beside.
type Analysis struct {
	BandLowHz     float64         `json:"band_low_hz"`
	BandHighHz    float64         `json:"band_high_hz"`
	Choices       []string        `json:"choices"`
	QuickEstimate []QuickEstimate `json:"quick_estimate,omitempty"`
	// QuickEstimateNotes say where the quick estimate's assumptions fail
	// (overlapping or heavily damped modes): expected on a car body, and the
	// reason the fit, not the quick estimate, gives the modes.
	QuickEstimateNotes []string `json:"quick_estimate_notes,omitempty"`
	// FitResidual is the fit's normalised residual (0 for a perfect fit).
	FitResidual float64 `json:"fit_residual"`
	// ModeShapeMAC is the MAC between the two measured mode shapes (near 0:
	// well separated shapes).
	ModeShapeMAC float64 `json:"mode_shape_mac"`
	// CoherenceInBand is the mean multiple coherence of each body sensor's
	// FRFs over the band (rig tests), in the setup's sensor order.
	CoherenceInBand []float64 `json:"coherence_in_band,omitempty"`
}

// ModeCorrelation is the correlation matrix of the measured modes'
// figures: Figures names them ("bounce.natural_frequency_hz", the mode's
// label, a dot and the mode's key; see body.FigureName), Matrix[i][j] is the
// correlation coefficient of figures i and j.
type ModeCorrelation struct {
	Figures []string    `json:"figures"`
	Matrix  [][]float64 `json:"matrix"`
}

// CorrelationJSON returns c in the result's form (nil for nil).
func CorrelationJSON(c *body.Correlation) *ModeCorrelation {
	if c == nil {
		return nil
	}
	return &ModeCorrelation{Figures: c.Figures, Matrix: c.Matrix}
}

// Correlation checks j and returns it as a body.Correlation (nil for nil):
// a square, symmetric matrix with ones on the diagonal and coefficients
// within [-1, 1], one row per named figure, each name a mode's label, a dot
// and one of the keys natural_frequency_hz, damping_ratio,
// pitch_per_bounce_rad_per_m, no name twice.
func (j *ModeCorrelation) Correlation() (*body.Correlation, error) {
	if j == nil {
		return nil, nil
	}
	n := len(j.Figures)
	if len(j.Matrix) != n {
		return nil, fmt.Errorf("compare: mode_correlation has %d figures and %d matrix rows; give one row per figure",
			n, len(j.Matrix))
	}
	seen := map[string]bool{}
	for i, f := range j.Figures {
		label, key, ok := strings.Cut(f, ".")
		known := key == body.FigureNaturalFrequency || key == body.FigureDampingRatio || key == body.FigurePitchPerBounce
		if !ok || (label != "bounce" && label != "pitch") || !known || seen[f] {
			return nil, fmt.Errorf("compare: mode_correlation figure %d is %q; name each figure once as bounce or "+
				"pitch, a dot and natural_frequency_hz, damping_ratio or pitch_per_bounce_rad_per_m", i+1, f)
		}
		seen[f] = true
		if len(j.Matrix[i]) != n {
			return nil, fmt.Errorf("compare: mode_correlation row %d has %d entries; give %d", i+1, len(j.Matrix[i]), n)
		}
	}
	const symmetryTol = 1e-9
	for i := range n {
		for k := range n {
			v := j.Matrix[i][k]
			switch {
			case i == k && math.Abs(v-1) > symmetryTol:
				return nil, fmt.Errorf("compare: mode_correlation[%d][%d] is %g; a figure's correlation with itself is 1",
					i+1, k+1, v)
			case !(math.Abs(v) <= 1):
				return nil, fmt.Errorf("compare: mode_correlation[%d][%d] is %g; a correlation lies within -1 and 1",
					i+1, k+1, v)
			case math.Abs(v-j.Matrix[k][i]) > symmetryTol:
				return nil, fmt.Errorf("compare: mode_correlation[%d][%d] is %g but [%d][%d] is %g; the matrix is symmetric",
					i+1, k+1, v, k+1, i+1, j.Matrix[k][i])
			}
		}
	}
	return &body.Correlation{Figures: j.Figures, Matrix: j.Matrix}, nil
}

// QuickEstimate is a single-mode estimate (peak picking with half-power
// points, or a log decrement): a first look, not the result.
type QuickEstimate struct {
	Source             string   `json:"source"`
	NaturalFrequencyHz float64  `json:"natural_frequency_hz"`
	DampingRatio       *float64 `json:"damping_ratio"`
}

// Tool names the program that wrote a result.
type Tool struct {
	Name    string `json:"name"`
	Version string `json:"version"`
}

// FileRef identifies an input file by path and content.
type FileRef struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
}

// LogRef describes the log a result came from.
type LogRef struct {
	Path         string   `json:"path"`
	SHA256       string   `json:"sha256"`
	Samples      int      `json:"samples"`
	SampleRateHz float64  `json:"sample_rate_hz"`
	DurationS    float64  `json:"duration_s"`
	Notes        []string `json:"notes"`
	// Quality holds the reader's data-quality findings (clipping, dropouts,
	// offsets, roll-off, rate) with channel, line and time; their messages
	// are in the result's warnings too.
	Quality []ingest.Warning `json:"quality,omitempty"`
}

// ModelJSON is the model part of a result.
type ModelJSON struct {
	Damped bool `json:"damped"`
	// Rates are the design's ride rates and damping, as the setup gives
	// them (damping 0 when it gives none): the reference of the
	// back-calculated ones.
	Rates RatesJSON `json:"rates"`
	// RideRates says per axle how the ride rate in Rates was obtained:
	// given, or built up from the spring rate, the motion ratio and the
	// tyre rate.
	RideRates []RideRateJSON `json:"ride_rates"`
	Modes     []ModeJSON     `json:"modes"`
}

// RideRateJSON is one axle's ride rate and, when the setup builds it up,
// its parts under the setup's own key names (N/m per axle; the motion ratio
// is spring travel per wheel travel). TyreRateNPerM is absent for a rigid
// tyre (none given).
type RideRateJSON struct {
	Axle                      string   `json:"axle"`
	RideRateNPerM             float64  `json:"ride_rate_n_per_m"`
	Source                    string   `json:"source"` // "given" or "built_up"
	SpringRateNPerM           *float64 `json:"spring_rate_n_per_m,omitempty"`
	MotionRatioSpringPerWheel *float64 `json:"motion_ratio_spring_per_wheel,omitempty"`
	WheelRateNPerM            *float64 `json:"wheel_rate_n_per_m,omitempty"`
	TyreRateNPerM             *float64 `json:"tyre_rate_n_per_m,omitempty"`
}

// ModeJSON is one mode as the contract writes it. Pointers are null when a
// value does not exist (no node for a pure bounce shape).
type ModeJSON struct {
	Label                   string       `json:"label"`
	NaturalFrequencyHz      float64      `json:"natural_frequency_hz"`
	NaturalFrequencyRadPerS float64      `json:"natural_frequency_rad_per_s"`
	DampedFrequencyHz       float64      `json:"damped_frequency_hz"`
	DampingRatio            float64      `json:"damping_ratio"`
	PitchPerBounceRadPerM   *float64     `json:"pitch_per_bounce_rad_per_m"`
	NodeM                   *float64     `json:"node_m"`
	Uncertainty             *Uncertainty `json:"uncertainty,omitempty"`
	Method                  string       `json:"method"`
	// SensorShape is the complex mode shape at the body sensors, when the
	// identification gives one (any common scale and phase).
	SensorShape []SensorShapeJSON `json:"sensor_shape,omitempty"`
	// Flagged is true when the data cannot support a measured mode, for the
	// reasons in FlagReasons (sentences); the target checks that use a
	// flagged mode are inconclusive.
	Flagged     bool     `json:"flagged"`
	FlagReasons []string `json:"flag_reasons,omitempty"`
}

// SensorShapeJSON is a mode shape's complex vertical motion re + i im at the
// sensor at x_m (m from the CG, positive forward).
type SensorShapeJSON struct {
	XM float64 `json:"x_m"`
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

// Uncertainty holds one standard deviation of each estimated value.
type Uncertainty struct {
	NaturalFrequencyHz    float64  `json:"natural_frequency_hz"`
	DampingRatio          float64  `json:"damping_ratio"`
	PitchPerBounceRadPerM *float64 `json:"pitch_per_bounce_rad_per_m,omitempty"`
	NodeM                 *float64 `json:"node_m,omitempty"`
}

// Comparison sets one measured mode beside the model's.
type Comparison struct {
	Label         string  `json:"label"`
	MeasuredHz    float64 `json:"measured_hz"`
	PredictedHz   float64 `json:"predicted_hz"`
	DifferencePct float64 `json:"difference_pct"`
	MAC           float64 `json:"mac"`
	// ShapeMeasured is false when the measured mode has no shape; MAC is then 0.
	ShapeMeasured                  bool     `json:"shape_measured"`
	MeasuredDampingRatio           *float64 `json:"measured_damping_ratio"`
	PredictedDampingRatio          float64  `json:"predicted_damping_ratio"`
	MeasuredPitchPerBounceRadPerM  *float64 `json:"measured_pitch_per_bounce_rad_per_m"`
	PredictedPitchPerBounceRadPerM *float64 `json:"predicted_pitch_per_bounce_rad_per_m"`
	MeasuredNodeM                  *float64 `json:"measured_node_m"`
	PredictedNodeM                 *float64 `json:"predicted_node_m"`
}

// Updated holds back-calculated effective rates and damping.
type Updated struct {
	FrontRateNPerM     float64 `json:"front_rate_n_per_m"`
	RearRateNPerM      float64 `json:"rear_rate_n_per_m"`
	FrontDampingNsPerM float64 `json:"front_damping_ns_per_m"`
	RearDampingNsPerM  float64 `json:"rear_damping_ns_per_m"`
	// DampingEstimated is false when no damping was measured; the damping
	// values are then 0 and mean nothing.
	DampingEstimated bool `json:"damping_estimated"`
	// PitchInertiaKgm2 is the updated pitch inertia when it was freed.
	PitchInertiaKgm2 *float64 `json:"pitch_inertia_kgm2,omitempty"`
	// Method names the solution: closed form (undamped or damped) or
	// weighted least squares.
	Method string `json:"method"`
	// RootChoice says how the root was chosen among the closed-form roots.
	RootChoice string `json:"root_choice"`
	// ClosedForm is the chosen closed-form root, when the least squares
	// started from it.
	ClosedForm *RatesJSON `json:"closed_form,omitempty"`
	// OtherRoots are the closed-form roots not chosen.
	OtherRoots []RatesJSON `json:"other_roots"`
	// Uncertainty holds one standard deviation of each updated value,
	// propagated from the modal uncertainties; absent when none were given.
	Uncertainty *UpdatedUncertainty `json:"uncertainty,omitempty"`
	// Residual is the misfit of a least-squares update.
	Residual *FitResidual `json:"residual,omitempty"`
	// FrontSpringRateNPerM and RearSpringRateNPerM are the axle spring rates
	// that would give the updated ride rates, for an axle whose setup gives
	// its spring rate (same motion ratio and tyre rate).
	FrontSpringRateNPerM *float64 `json:"front_spring_rate_n_per_m,omitempty"`
	RearSpringRateNPerM  *float64 `json:"rear_spring_rate_n_per_m,omitempty"`
}

// RatesJSON is one set of rates and damping.
type RatesJSON struct {
	FrontRateNPerM     float64 `json:"front_rate_n_per_m"`
	RearRateNPerM      float64 `json:"rear_rate_n_per_m"`
	FrontDampingNsPerM float64 `json:"front_damping_ns_per_m"`
	RearDampingNsPerM  float64 `json:"rear_damping_ns_per_m"`
}

// UpdatedUncertainty holds one standard deviation of each updated value.
type UpdatedUncertainty struct {
	FrontRateNPerM     float64  `json:"front_rate_n_per_m"`
	RearRateNPerM      float64  `json:"rear_rate_n_per_m"`
	FrontDampingNsPerM *float64 `json:"front_damping_ns_per_m,omitempty"`
	RearDampingNsPerM  *float64 `json:"rear_damping_ns_per_m,omitempty"`
	PitchInertiaKgm2   *float64 `json:"pitch_inertia_kgm2,omitempty"`
	// NominalWeights is true when some measured values had no standard
	// deviation and nominal ones were used: the uncertainties are then
	// indicative only.
	NominalWeights bool `json:"nominal_weights"`
}

// FitResidual is the misfit of a weighted least-squares update.
type FitResidual struct {
	ChiSquare        float64       `json:"chi_square"`
	DegreesOfFreedom int           `json:"degrees_of_freedom"`
	Observations     []Observation `json:"observations"`
}

// Observation is one measured value against the updated model's.
type Observation struct {
	Name       string  `json:"name"`
	Measured   float64 `json:"measured"`
	Fitted     float64 `json:"fitted"`
	Sigma      float64 `json:"sigma"`
	Normalised float64 `json:"normalised_residual"` // (fitted - measured)/sigma
}

// Check is one target or guidance item. Target checks ("target.*") are pass,
// fail or inconclusive (see decide) and carry their numbers in Quantity when
// they judge one; guidance checks ("guidance.*") are pass or warn and carry
// none.
type Check struct {
	Name   string `json:"name"`
	Status string `json:"status"` // pass, warn, fail or inconclusive
	Detail string `json:"detail"`
	// Quantity adds value, unit, sigma, low and high to the JSON of a
	// numeric target check; nil (no such keys) otherwise.
	*Quantity
	// summary is the check's phrase in the verdict summary (target checks).
	summary string
}

// Finite returns a pointer to x, or nil for NaN and infinities (JSON null).
func Finite(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

// JSON returns the contract's form of a mode; method says where it came from.
func (m Mode) JSON(method string) ModeJSON {
	return ModeJSON{
		Label:                   m.Label,
		NaturalFrequencyHz:      m.NaturalFrequencyHz,
		NaturalFrequencyRadPerS: 2 * math.Pi * m.NaturalFrequencyHz,
		DampedFrequencyHz:       m.DampedFrequencyHz,
		DampingRatio:            m.DampingRatio,
		PitchPerBounceRadPerM:   Finite(m.PitchPerBounceRadPerM),
		NodeM:                   Finite(m.NodeM),
		Method:                  method,
	}
}

// Marshal returns the indented JSON of r with a final newline.
func (r *Result) Marshal() ([]byte, error) {
	if r.Warnings == nil {
		r.Warnings = []string{}
	}
	b, err := json.MarshalIndent(r, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}
