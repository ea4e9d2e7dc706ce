package compare

import (
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// ModelMethod names the solver behind the model's modes.
func ModelMethod(damped bool) string {
	if damped {
		return "damped state-space eigenproblem"
	}
	return "undamped eigenproblem"
}

// ModelPart is the model part of a result: the design's rates and its
// model's modes.
func ModelPart(spec ingest.VehicleSpec, modes []Mode) *ModelJSON {
	design := DesignOf(spec)
	damped := design.Damped()
	m := &ModelJSON{Damped: damped, Rates: RatesJSON(design.RatesOf())}
	for _, r := range RideRates(spec) {
		m.RideRates = append(m.RideRates, r.JSON())
	}
	for _, md := range modes {
		m.Modes = append(m.Modes, md.JSON("design model, "+ModelMethod(damped)))
	}
	return m
}

// MeasuredJSON writes one identified mode in the contract's form, with its
// shape at the sensors at posM (m from the CG, positive forward) and the
// method that found it.
func MeasuredJSON(m body.Mode, posM []float64, method string) ModeJSON {
	j := ModeJSON{Label: m.Label, NaturalFrequencyHz: m.NaturalFrequencyHz,
		NaturalFrequencyRadPerS: 2 * math.Pi * m.NaturalFrequencyHz, DampedFrequencyHz: m.DampedFrequencyHz,
		DampingRatio: m.DampingRatio, PitchPerBounceRadPerM: Finite(m.PitchPerBounceRadPerM), NodeM: Finite(m.NodeM),
		Method: method, Flagged: m.Flagged, FlagReasons: m.FlagReasons,
		Uncertainty: &Uncertainty{NaturalFrequencyHz: m.SD.NaturalFrequencyHz, DampingRatio: m.SD.DampingRatio,
			PitchPerBounceRadPerM: Finite(m.SD.PitchPerBounceRadPerM), NodeM: Finite(m.SD.NodeM)}}
	for i, w := range m.Shape {
		j.SensorShape = append(j.SensorShape, SensorShapeJSON{XM: posM[i], Re: real(w), Im: imag(w)})
	}
	return j
}

// AssessAgainst adds to a result that holds measured modes the design
// model of setup, the comparison, the back-calculated rates and the checks
// (Assess), and the verdict on the setup's [targets] (r.Verdict).
func (r *Result) AssessAgainst(setup *ingest.Setup) error {
	design := DesignOf(setup.Vehicle)
	model, err := design.Modes()
	if err != nil {
		return fmt.Errorf("%s: %w", setup.Path, err)
	}
	r.Model = ModelPart(setup.Vehicle, model)
	measured, err := MeasuredFromJSON(r.Modes)
	if err != nil {
		return err
	}
	corr, err := r.ModeCorrelation.Correlation()
	if err != nil {
		return err
	}
	a, err := Assess(measured, corr, setup)
	if err != nil {
		return err
	}
	a.Fill(r)
	return nil
}
