package compare

import (
	"errors"
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/identify/body"
)

// MeasuredMode is one identified body mode, from whatever test (rig or drop)
// and method produced it. Values that were not measured are NaN (or nil).
type MeasuredMode struct {
	Label              string  // "bounce" or "pitch"
	NaturalFrequencyHz float64 // |lambda|/(2 pi)
	DampingRatio       float64 // -Re(lambda)/|lambda|; NaN when not measured
	// PitchPerBounceRadPerM is Re(theta/z) of the shape; NaN when unknown.
	PitchPerBounceRadPerM float64
	// Shape is the complex mode shape at the body sensors (any common scale
	// and phase); nil when only the pitch per bounce is known.
	Shape []SensorValue
	Sigma ModeSigma
	// Flagged is true when the data cannot support the mode (FlagReasons say
	// why, in sentences); target checks that use it are then inconclusive.
	Flagged     bool
	FlagReasons []string
}

// SensorValue is the complex vertical motion W of a mode shape at position XM
// (m from the CG, positive forward).
type SensorValue struct {
	XM float64
	W  complex128
}

// ModeSigma holds one standard deviation of each measured value; zero when
// not given.
type ModeSigma struct {
	NaturalFrequencyHz    float64
	DampingRatio          float64
	PitchPerBounceRadPerM float64
}

// HasDamping reports whether the damping ratio was measured.
func (m MeasuredMode) HasDamping() bool { return !math.IsNaN(m.DampingRatio) }

// HasShape reports whether anything of the mode shape was measured.
func (m MeasuredMode) HasShape() bool {
	return len(m.Shape) > 0 || !math.IsNaN(m.PitchPerBounceRadPerM)
}

// MeasuredFromJSON turns the contract's modes (an analyze result or a
// hand-written modes file) into measured modes. A damping_ratio of 0 counts
// as not measured (a hand-written file that leaves it out); a missing pitch
// per bounce is taken from node_m as 1/node, and its standard deviation from
// the node's as sigma_node/node^2. Shapes at the sensors come from
// sensor_shape when present; flagged and flag_reasons are carried over.
func MeasuredFromJSON(ms []ModeJSON) ([]MeasuredMode, error) {
	out := make([]MeasuredMode, 0, len(ms))
	for i, j := range ms {
		if j.Label != "bounce" && j.Label != "pitch" {
			return nil, fmt.Errorf("mode %d has label %q; label each mode \"bounce\" or \"pitch\"", i+1, j.Label)
		}
		if !(j.NaturalFrequencyHz > 0) || math.IsInf(j.NaturalFrequencyHz, 0) {
			return nil, fmt.Errorf("mode %d (%s) has natural_frequency_hz %g; give a positive frequency in Hz",
				i+1, j.Label, j.NaturalFrequencyHz)
		}
		m := MeasuredMode{Label: j.Label, NaturalFrequencyHz: j.NaturalFrequencyHz,
			DampingRatio: math.NaN(), PitchPerBounceRadPerM: math.NaN(),
			Flagged: j.Flagged, FlagReasons: j.FlagReasons}
		if j.DampingRatio != 0 {
			if !(j.DampingRatio > 0 && j.DampingRatio < 1) {
				return nil, fmt.Errorf("mode %d (%s) has damping_ratio %g; give a value between 0 and 1, "+
					"or leave it out", i+1, j.Label, j.DampingRatio)
			}
			m.DampingRatio = j.DampingRatio
		}
		var sigNode float64
		if u := j.Uncertainty; u != nil {
			m.Sigma.NaturalFrequencyHz, m.Sigma.DampingRatio = u.NaturalFrequencyHz, u.DampingRatio
			if u.PitchPerBounceRadPerM != nil {
				m.Sigma.PitchPerBounceRadPerM = *u.PitchPerBounceRadPerM
			}
			if u.NodeM != nil {
				sigNode = *u.NodeM
			}
		}
		switch {
		case j.PitchPerBounceRadPerM != nil:
			m.PitchPerBounceRadPerM = *j.PitchPerBounceRadPerM
		case j.NodeM != nil && *j.NodeM != 0:
			m.PitchPerBounceRadPerM = 1 / *j.NodeM
			if m.Sigma.PitchPerBounceRadPerM == 0 {
				m.Sigma.PitchPerBounceRadPerM = sigNode / (*j.NodeM * *j.NodeM)
			}
		}
		for _, s := range j.SensorShape {
			m.Shape = append(m.Shape, SensorValue{XM: s.XM, W: complex(s.Re, s.Im)})
		}
		for _, s := range []float64{m.Sigma.NaturalFrequencyHz, m.Sigma.DampingRatio, m.Sigma.PitchPerBounceRadPerM} {
			if !(s >= 0) || math.IsInf(s, 0) {
				return nil, fmt.Errorf("mode %d (%s) has an uncertainty of %g; standard deviations "+
					"must be zero or positive and finite", i+1, j.Label, s)
			}
		}
		out = append(out, m)
	}
	return out, nil
}

// shapeVectors returns the measured and the model shape of a mode at the
// same positions: the measured sensor shape when there is one, otherwise
// (z, theta) = (1, pitch per bounce) evaluated as w(s) = z - s theta at
// sensorsXM (at the axles, +a and -b of the model car, when sensorsXM is
// empty). ok is false when the mode has no measured shape.
func shapeVectors(meas MeasuredMode, model Mode, sensorsXM []float64, car Vehicle) (mv, pv []complex128, ok bool) {
	if len(sensorsXM) == 0 {
		sensorsXM = []float64{car.CGToFrontM, -car.CGToRearM}
	}
	switch {
	case len(meas.Shape) > 0:
		for _, s := range meas.Shape {
			mv = append(mv, s.W)
			pv = append(pv, model.ShapeAt(s.XM))
		}
	case !math.IsNaN(meas.PitchPerBounceRadPerM):
		as := Mode{Shape: [2]complex128{1, complex(meas.PitchPerBounceRadPerM, 0)}}
		for _, s := range sensorsXM {
			mv = append(mv, as.ShapeAt(s))
			pv = append(pv, model.ShapeAt(s))
		}
	default:
		return nil, nil, false
	}
	return mv, pv, true
}

// macSamples is the number of points at which MACSigma evaluates the MAC
// across the pitch-per-bounce interval (ends included).
const macSamples = 41

// MACSigma returns the MAC of a measured mode with a model mode, as Compare
// computes it, and a standard uncertainty for it from the standard deviation
// of the measured pitch per bounce (the only shape uncertainty the
// identification reports). The measured shape w at the positions s_k is
// moved along the pitch direction, w_k - s_k delta z with z its heave (1 for
// a shape given by its pitch per bounce; by Kinematics for a sensor shape),
// which changes Re(theta/z) by delta; over delta in [-U, U], U = 2 sigma,
// the least MAC is taken on a grid of macSamples points, and sigma is
// (MAC - least)/2, so that MAC - 2 sigma is that least MAC. First-order
// propagation (JCGM 100:2008, 5.1.2 [memory]) would give zero where the MAC
// is at its maximum, because it is flat there; the interval does not.
// The imaginary part of a sensor shape carries no uncertainty here.
//
// ok is false when the mode has no shape, no standard deviation of its pitch
// per bounce, or a sensor shape whose heave cannot be found (fewer than two
// distinct positions).
func MACSigma(meas MeasuredMode, model Mode, sensorsXM []float64, car Vehicle) (mac, sigma float64, ok bool) {
	mv, pv, ok := shapeVectors(meas, model, sensorsXM, car)
	sp := meas.Sigma.PitchPerBounceRadPerM
	if !ok || !(sp > 0) || math.IsInf(sp, 0) {
		return math.NaN(), math.NaN(), false
	}
	mac = body.MAC(mv, pv)
	pos := sensorsXM
	if len(pos) == 0 {
		pos = []float64{car.CGToFrontM, -car.CGToRearM}
	}
	z := complex(1, 0)
	if len(meas.Shape) > 0 {
		pos = make([]float64, len(meas.Shape))
		for i, s := range meas.Shape {
			pos[i] = s.XM
		}
		if !body.CanSeparate(pos) {
			return math.NaN(), math.NaN(), false
		}
		z, _ = body.NewKinematics(pos).HeavePitch(mv)
	}
	least := mac
	moved := make([]complex128, len(mv))
	for i := 0; i < macSamples; i++ {
		delta := coverageFactor * sp * (2*float64(i)/(macSamples-1) - 1)
		for k := range mv {
			moved[k] = mv[k] - complex(pos[k]*delta, 0)*z
		}
		m := body.MAC(moved, pv)
		if math.IsNaN(m) {
			return math.NaN(), math.NaN(), false
		}
		least = math.Min(least, m)
	}
	if math.IsNaN(mac) {
		return math.NaN(), math.NaN(), false
	}
	return mac, (mac - least) / coverageFactor, true
}

// macMatrix returns MAC[i][j] between measured mode i and model mode j (NaN
// without a measured shape).
func macMatrix(meas []MeasuredMode, model []Mode, sensorsXM []float64, car Vehicle) [][]float64 {
	out := make([][]float64, len(meas))
	for i, mm := range meas {
		out[i] = make([]float64, len(model))
		for j, pm := range model {
			out[i][j] = math.NaN()
			if mv, pv, ok := shapeVectors(mm, pm, sensorsXM, car); ok {
				out[i][j] = body.MAC(mv, pv)
			}
		}
	}
	return out
}

// ErrModes is matched by errors.Is when the measured modes are not one
// bounce and one pitch mode.
var ErrModes = errors.New("give exactly one measured bounce and one measured pitch mode")

// pairByLabel returns the measured modes ordered like the model's (bounce
// and pitch as the model labels them).
func pairByLabel(meas []MeasuredMode, model []Mode) ([]MeasuredMode, error) {
	if len(meas) != 2 || meas[0].Label == meas[1].Label {
		labels := make([]string, len(meas))
		for i, m := range meas {
			labels[i] = m.Label
		}
		return nil, fmt.Errorf("%w (got %d modes labelled %q)", ErrModes, len(meas), labels)
	}
	out := make([]MeasuredMode, 2)
	for _, m := range meas {
		for j, pm := range model {
			if pm.Label == m.Label {
				out[j] = m
			}
		}
	}
	return out, nil
}

// nodeRuleWarning warns when the labels of measured modes (a hand-written
// file's, most often) look swapped by the node rule of package
// identify/body, the mode whose node lies farther from the CG being bounce:
// the mode labelled bounce has its node between the axles of car, and the
// mode labelled pitch has its node farther out or none measured.
func nodeRuleWarning(ms []MeasuredMode, car Vehicle) string {
	node := map[string]float64{"bounce": math.NaN(), "pitch": math.NaN()}
	for _, m := range ms {
		if m.PitchPerBounceRadPerM != 0 {
			node[m.Label] = 1 / m.PitchPerBounceRadPerM // NaN when not measured
		}
	}
	b, p := node["bounce"], node["pitch"]
	if math.IsNaN(b) || !(b > -car.CGToRearM && b < car.CGToFrontM) || math.Abs(p) <= math.Abs(b) {
		return ""
	}
	w := fmt.Sprintf("the mode labelled bounce has its node %+.2f m from the CG, between the axles (%+.2f m to %+.2f m), "+
		"where a pitch mode's node lies", b, -car.CGToRearM, car.CGToFrontM)
	if !math.IsNaN(p) {
		w += fmt.Sprintf(", and the mode labelled pitch has its node farther out, at %+.2f m", p)
	}
	return w + ": the labels look swapped (the mode whose node lies farther from the CG is bounce); check the labels of the measured modes"
}

// Compare sets the measured modes beside the modes of the design model
// (from design.Modes()), paired by label: frequency difference in percent of
// the predicted, damping, node, pitch per bounce and the MAC of the shapes at
// the sensor positions sensorsXM (used when a measured mode has only its
// pitch per bounce; the axles when empty). The warnings say when the pairing
// by label disagrees with the pairing of best MAC.
func Compare(measured []MeasuredMode, design Vehicle, sensorsXM []float64) ([]Comparison, []string, error) {
	model, err := design.Modes()
	if err != nil {
		return nil, nil, err
	}
	paired, err := pairByLabel(measured, model)
	if err != nil {
		return nil, nil, err
	}
	macs := macMatrix(paired, model, sensorsXM, design)
	var warns []string
	if own, swapped := macs[0][0]+macs[1][1], macs[0][1]+macs[1][0]; swapped > own {
		warns = append(warns, fmt.Sprintf("the mode shapes pair the other way round: the measured %s mode "+
			"resembles the model's %s mode (MAC %.3f against %.3f for the same label) and the measured %s the "+
			"model's %s (MAC %.3f against %.3f); check the labels of the measured modes and the sensor positions",
			paired[0].Label, model[1].Label, macs[0][1], macs[0][0],
			paired[1].Label, model[0].Label, macs[1][0], macs[1][1]))
	} else if w := nodeRuleWarning(paired, design); w != "" {
		warns = append(warns, w)
	}
	out := make([]Comparison, 2)
	for i, mm := range paired {
		pm := model[i]
		c := Comparison{
			Label:                          mm.Label,
			MeasuredHz:                     mm.NaturalFrequencyHz,
			PredictedHz:                    pm.NaturalFrequencyHz,
			DifferencePct:                  100 * (mm.NaturalFrequencyHz - pm.NaturalFrequencyHz) / pm.NaturalFrequencyHz,
			MeasuredDampingRatio:           Finite(mm.DampingRatio),
			PredictedDampingRatio:          pm.DampingRatio,
			MeasuredPitchPerBounceRadPerM:  Finite(mm.PitchPerBounceRadPerM),
			PredictedPitchPerBounceRadPerM: Finite(pm.PitchPerBounceRadPerM),
			MeasuredNodeM:                  Finite(1 / mm.PitchPerBounceRadPerM),
			PredictedNodeM:                 Finite(pm.NodeM),
		}
		if !math.IsNaN(macs[i][i]) {
			c.ShapeMeasured = true
			c.MAC = macs[i][i]
		}
		out[i] = c
	}
	return out, warns, nil
}

// ChooseRoot picks, among candidate rate sets for car, the one whose model
// reproduces the measured mode shapes best: the largest sum of MAC over the
// two modes (paired by frequency order, the only order that both roots
// share). Without any measured shape it picks the candidate closest to the
// design rates (in the sum of squared log ratios of the rates) and says so.
// The reason says how the choice was made.
func ChooseRoot(car Vehicle, cands []Rates, measured []MeasuredMode, sensorsXM []float64, design Rates) (int, string, error) {
	if len(cands) == 0 {
		return 0, "", errors.New("no candidate rates to choose from")
	}
	if len(measured) != 2 {
		return 0, "", fmt.Errorf("%w (got %d modes)", ErrModes, len(measured))
	}
	byFreq := measured
	if byFreq[0].NaturalFrequencyHz > byFreq[1].NaturalFrequencyHz {
		byFreq = []MeasuredMode{measured[1], measured[0]}
	}
	if !byFreq[0].HasShape() && !byFreq[1].HasShape() {
		best, bestD := 0, math.Inf(1)
		for i, c := range cands {
			d := sq(math.Log(c.FrontRateNPerM/design.FrontRateNPerM)) + sq(math.Log(c.RearRateNPerM/design.RearRateNPerM))
			if d < bestD {
				best, bestD = i, d
			}
		}
		return best, "no mode shape measured: the root closest to the design rates was chosen", nil
	}
	best, bestScore := -1, math.Inf(-1)
	for i, c := range cands {
		ms, err := car.WithRates(c).Modes()
		if err != nil {
			continue
		}
		score := 0.0
		for k, mm := range byFreq {
			if mv, pv, ok := shapeVectors(mm, ms[k], sensorsXM, car); ok {
				if mac := body.MAC(mv, pv); !math.IsNaN(mac) {
					score += mac
				}
			}
		}
		if score > bestScore {
			best, bestScore = i, score
		}
	}
	if best < 0 {
		return 0, "", errors.New("no candidate rates give an oscillating model")
	}
	return best, fmt.Sprintf("chosen by the measured mode shapes (sum of MAC %.4f over both modes)", bestScore), nil
}

func sq(x float64) float64 { return x * x }
