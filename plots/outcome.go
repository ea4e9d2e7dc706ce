package plots

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// bandErrorSDs is the width of the FRF error band drawn in the report, in
// standard deviations of |H| on each side (about a 95 % band).
const bandErrorSDs = 2

// OutcomeReport is the report input of one analysed log: its result and
// the figures its route's data allow.
func OutcomeReport(o *job.Outcome) ReportInput {
	in := ReportInput{
		Title:   "Body bounce and pitch: " + o.Result.Test + " test" + pooledTitle(o),
		Vehicle: o.Setup.Vehicle.Name,
		Result:  o.Result,
		Shapes:  shapeData(o.Result, o.Setup),
	}
	if o.Identified == nil {
		return in // a pooled analysis: its runs' data differ, the shapes are pooled
	}
	if rig := o.Identified.Rig; rig != nil {
		in.FRF = frfData(rig, o.Result.Modes)
		in.Indicator, in.Stabilisation = indicatorData(rig, o.Result.Modes)
	}
	if drop := o.Identified.Drop; drop != nil {
		in.Decay = decayData(drop, o.Setup.Sensors)
	}
	return in
}

// usableBins returns the FRF bins inside the fit band where every FRF and
// the indicator are finite.
func usableBins(set *modal.FRFSet, cmif modal.CMIF, loHz, hiHz float64) []int {
	var bins []int
next:
	for k, f := range set.FreqHz {
		if f < loHz || f > hiHz {
			continue
		}
		for o := range set.H {
			for i := range set.H[o] {
				if h := set.H[o][i][k]; cmplx.IsNaN(h) || cmplx.IsInf(h) || cmplx.Abs(h) == 0 {
					continue next
				}
			}
		}
		for _, sv := range cmif.Singular {
			if !(sv[k] > 0) || math.IsInf(sv[k], 0) {
				continue next
			}
		}
		bins = append(bins, k)
	}
	return bins
}

// markers marks each mode at its natural frequency, labelled with its name
// and frequency.
func markers(ms []compare.ModeJSON) []Marker {
	var out []Marker
	for _, m := range ms {
		out = append(out, Marker{Label: fmt.Sprintf("%s %.3f Hz", m.Label, m.NaturalFrequencyHz), FreqHz: m.NaturalFrequencyHz})
	}
	return out
}

// frfData sets the measured FRFs, their error bands and the fitted model
// side by side over the fit band.
func frfData(rig *identify.RigDetail, modes []compare.ModeJSON) *FRFData {
	set, fit := rig.Set, rig.Fit
	cmif := modal.Indicator(set)
	bins := usableBins(set, cmif, fit.BandLowHz, fit.BandHighHz)
	d := &FRFData{MagnitudeUnit: "-", Markers: markers(modes), LogFrequency: true}
	for _, k := range bins {
		d.FreqHz = append(d.FreqHz, set.FreqHz[k])
	}
	for o := range set.H {
		for i := range set.H[o] {
			c := FRFCurve{Name: set.OutputNames[o] + " / " + set.InputNames[i], Output: set.OutputNames[o], Input: set.InputNames[i]}
			for _, k := range bins {
				h := set.H[o][i][k]
				mag := cmplx.Abs(h)
				// The band is multiplicative, |H| exp(+-2 eps) with eps = sigma/|H|:
				// the same as |H| (1 +- 2 eps) to first order, and never negative.
				eps := set.SigmaAbs[o][i][k] / mag
				fm := fit.ModelFRF(o, i, set.FreqHz[k])
				c.Magnitude = append(c.Magnitude, mag)
				c.PhaseDeg = append(c.PhaseDeg, cmplx.Phase(h)*180/math.Pi)
				c.Lower = append(c.Lower, mag*math.Exp(-bandErrorSDs*eps))
				c.Upper = append(c.Upper, mag*math.Exp(bandErrorSDs*eps))
				c.FitMagnitude = append(c.FitMagnitude, cmplx.Abs(fm))
				c.FitPhaseDeg = append(c.FitPhaseDeg, cmplx.Phase(fm)*180/math.Pi)
			}
			unwrapDeg(c.PhaseDeg)
			unwrapDeg(c.FitPhaseDeg)
			d.Curves = append(d.Curves, c)
		}
		if o < len(set.Coherence) && set.Coherence[o] != nil {
			s := Series{Name: set.OutputNames[o]}
			for _, k := range bins {
				s.Values = append(s.Values, set.Coherence[o][k])
			}
			d.Coherence = append(d.Coherence, s)
		}
	}
	return d
}

// indicatorData returns the mode indicator and the stabilisation figures' data.
func indicatorData(rig *identify.RigDetail, modes []compare.ModeJSON) (*IndicatorData, *StabData) {
	set, fit := rig.Set, rig.Fit
	cmif := modal.Indicator(set)
	bins := usableBins(set, cmif, fit.BandLowHz, fit.BandHighHz)
	ind := &IndicatorData{Unit: "-", LogFrequency: true}
	for _, k := range bins {
		ind.FreqHz = append(ind.FreqHz, cmif.FreqHz[k])
	}
	for j, sv := range cmif.Singular {
		s := Series{Name: fmt.Sprintf("singular value %d", j+1)}
		for _, k := range bins {
			s.Values = append(s.Values, sv[k])
		}
		ind.Values = append(ind.Values, s)
	}
	for _, q := range fit.Quick {
		ind.Peaks = append(ind.Peaks, Marker{Label: fmt.Sprintf("peak %.3f Hz", q.PeakHz), FreqHz: q.PeakHz})
		ind.PeakSeries = append(ind.PeakSeries, q.Curve)
	}
	st := &StabData{Selected: markers(modes), IndicatorFreqHz: ind.FreqHz, LogFrequency: true}
	if len(ind.Values) > 0 {
		st.Indicator = ind.Values[0].Values
	}
	for _, p := range fit.Stabilisation.Points {
		if !p.Physical || !(p.NaturalFrequencyHz > 0) {
			continue // not a body pole, or not one a log frequency axis can show
		}
		status := PoleNew
		switch p.Status {
		case modal.PoleStable:
			status = PoleStable
		case modal.PoleFrequencyStable:
			status = PoleFrequencyOnly
		}
		st.Poles = append(st.Poles, StabPole{Order: p.Order, FreqHz: p.NaturalFrequencyHz, Status: status})
	}
	return ind, st
}

// shapeData draws each measured mode's shape beside the model's, from the
// result alone (so it serves any route).
func shapeData(res *compare.Result, setup *ingest.Setup) *ShapeData {
	d := &ShapeData{FrontM: setup.Vehicle.CGToFrontM, RearM: setup.Vehicle.CGToRearM}
	for _, s := range setup.Sensors {
		d.SensorXM = append(d.SensorXM, s.XM)
	}
	model := map[string]compare.ModeJSON{}
	if res.Model != nil {
		for _, m := range res.Model.Modes {
			model[m.Label] = m
		}
	}
	line := func(m compare.ModeJSON) *ShapeLine {
		if m.PitchPerBounceRadPerM == nil {
			return nil
		}
		return &ShapeLine{FreqHz: m.NaturalFrequencyHz, DampingRatio: m.DampingRatio,
			PitchPerBounceRadPerM: *m.PitchPerBounceRadPerM}
	}
	for _, m := range res.Modes {
		sm := ShapeMode{Label: m.Label, Measured: line(m)}
		if p, ok := model[m.Label]; ok {
			sm.Model = line(p)
		}
		if len(m.SensorShape) == len(d.SensorXM) {
			for _, w := range m.SensorShape {
				sm.SensorW = append(sm.SensorW, w.Re)
			}
		}
		if sm.Measured == nil && sm.Model == nil {
			continue
		}
		d.Modes = append(d.Modes, sm)
	}
	if len(d.Modes) == 0 {
		return nil
	}
	return d
}

// decayData shows the whole drop log around the event, in SI units, with
// the fitted free decay over its window. Long logs are thinned to at most
// maxDecayPoints samples for the figure (every k-th sample).
func decayData(drop *identify.DropDetail, sensors []ingest.Sensor) *DecayData {
	c := drop.Fit.Curves
	d := &DecayData{FitTimeS: c.TimeS, Unit: "m/s^2",
		WindowStartS: drop.Fit.WindowStartS, WindowEndS: drop.Fit.WindowEndS}
	sum := drop.Log.Summary
	n := sum.Samples
	step := max(1, n/maxDecayPoints)
	for i := 0; i < n; i += step {
		d.TimeS = append(d.TimeS, sum.T0S+float64(i)/sum.SampleRateHz)
	}
	for i, s := range sensors {
		data := drop.Log.Channel(s.Channel)
		m := Series{Name: s.Channel}
		for k := 0; k < n; k += step {
			m.Values = append(m.Values, data[k])
		}
		d.Measured = append(d.Measured, m)
		d.Fitted = append(d.Fitted, Series{Name: s.Channel + " fit", Values: c.Fitted[i]})
	}
	return d
}

// maxDecayPoints bounds the samples drawn per channel in the time history.
const maxDecayPoints = 20000

// unwrapDeg removes the 360 degree jumps of a phase curve in place, so a
// phase passing -180 degrees is drawn as one line.
func unwrapDeg(p []float64) {
	for k := 1; k < len(p); k++ {
		p[k] -= 360 * math.Round((p[k]-p[k-1])/360)
	}
}

// pooledTitle notes a pooled analysis in the report's title.
func pooledTitle(o *job.Outcome) string {
	if len(o.Runs) < 2 {
		return ""
	}
	return fmt.Sprintf(", %d logs pooled", len(o.Runs))
}
