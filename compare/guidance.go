package compare

import (
	"fmt"
	"math"
)

// Ride guidance of the trade. None of these is a pass/fail criterion: a check
// outside them is a warning for the engineer to weigh.
const (
	// Body (bounce and pitch) frequencies of about 1 to 1.5 Hz for passenger
	// cars and 1.5 to 2.5 Hz for sports cars [memory, Gillespie 1992].
	guideBodyLowHz       = 1.0
	guidePassengerHighHz = 1.5
	guideBodyHighHz      = 2.5
	// Neither body mode above about 1.3 Hz for a comfort car [memory, Olley
	// as reported by Gillespie 1992].
	guideComfortHighHz = 1.3
	// Front ride frequency below the rear, often quoted as about 80 % of it
	// [memory, Olley as reported by Gillespie 1992]. Below 70 % the front is
	// far softer than that advice asks (our own margin around the quoted
	// figure): a slip in a rate or a load, more often than a design.
	guideFrontRearMax    = 1.0
	guideFrontRearMin    = 0.7
	guideFrontRearQuoted = 0.8
	// Bounce and pitch frequencies close: ratio of the higher to the lower
	// under 1.2 [memory, Olley as reported by Gillespie 1992].
	guideBouncePitchMax = 1.2
	// Body damping ratios of 0.2 to 0.4 [memory, Gillespie 1992].
	guideDampingLow  = 0.2
	guideDampingHigh = 0.4
)

// The sources of the guidance as the checks cite them for people; that the
// figures are recalled from memory is said here and in the README, not in
// the user's output.
const (
	sourceGillespie = "Gillespie, Fundamentals of Vehicle Dynamics (1992)"
	sourceOlley     = "Olley, as reported in Gillespie, Fundamentals of Vehicle Dynamics (1992)"
)

// UncoupledRideFrequenciesHz returns the front and rear ride frequencies of
// v with the axles taken apart: f = (1/(2 pi)) sqrt(k / m_axle), with the
// static axle load shares of the sprung mass, m_front = m b/L and
// m_rear = m a/L. Olley's guidance speaks of these [common practice].
func UncoupledRideFrequenciesHz(v Vehicle) (frontHz, rearHz float64) {
	L := v.WheelbaseM()
	mf, mr := v.MassKg*v.CGToRearM/L, v.MassKg*v.CGToFrontM/L
	return math.Sqrt(v.FrontRateNPerM/mf) / (2 * math.Pi), math.Sqrt(v.RearRateNPerM/mr) / (2 * math.Pi)
}

// BodyModes are the figures the ride guidance looks at; damping ratios are
// NaN when unknown.
type BodyModes struct {
	BounceHz, PitchHz                     float64
	BounceDampingRatio, PitchDampingRatio float64
}

// RideGuidance returns the design-stage ride checks for body modes bm, with
// the uncoupled front and rear frequencies of v (whose rates should be the
// ones that go with bm: the design rates for the model's modes, the updated
// rates for measured ones). subject ("model" or "measured") goes into the
// check names, e.g. "guidance.model.bounce_frequency". Statuses are pass or
// warn, never fail.
//
// References: T. D. Gillespie, Fundamentals of Vehicle Dynamics, SAE, 1992,
// chapter 5 (ride; Olley's flat-ride guidance as reported there). The
// figures are recalled, not copied: marked [memory] here and in the README;
// the details cite the book for people.
func RideGuidance(v Vehicle, bm BodyModes, subject string) []Check {
	name := func(s string) string { return "guidance." + subject + "." + s }
	var out []Check
	for _, m := range []struct {
		label string
		hz    float64
	}{{"bounce", bm.BounceHz}, {"pitch", bm.PitchHz}} {
		c := Check{Name: name(m.label + "_frequency"), Status: "pass"}
		switch {
		case m.hz < guideBodyLowHz || m.hz > guideBodyHighHz:
			c.Status = "warn"
			c.Detail = fmt.Sprintf("%s %.2f Hz lies outside the usual %.1f-%.1f Hz of body modes", m.label, m.hz,
				guideBodyLowHz, guideBodyHighHz)
		case m.hz <= guidePassengerHighHz:
			c.Detail = fmt.Sprintf("%s %.2f Hz: in the passenger-car range %.1f-%.1f Hz", m.label, m.hz,
				guideBodyLowHz, guidePassengerHighHz)
		default:
			c.Detail = fmt.Sprintf("%s %.2f Hz: in the sports-car range %.1f-%.1f Hz", m.label, m.hz,
				guidePassengerHighHz, guideBodyHighHz)
		}
		if m.hz > guideComfortHighHz {
			c.Detail += fmt.Sprintf("; above the %.1f Hz suggested for a comfort car (Olley)", guideComfortHighHz)
		}
		c.Detail += " (" + sourceGillespie + ")"
		out = append(out, c)
	}

	ff, fr := UncoupledRideFrequenciesHz(v)
	c := Check{Name: name("front_rear_frequency_ratio"), Status: "pass"}
	ratio := ff / fr
	c.Detail = fmt.Sprintf("uncoupled ride frequencies front %.2f Hz, rear %.2f Hz (sqrt(k/m_axle)/(2 pi), "+
		"static axle loads): ratio %.2f; front below rear, often about %.0f %% of it (%s)",
		ff, fr, ratio, 100*guideFrontRearQuoted, sourceOlley)
	if ratio >= guideFrontRearMax || ratio < guideFrontRearMin {
		c.Status = "warn"
	}
	if ratio < guideFrontRearMin {
		c.Detail += fmt.Sprintf("; under %.0f %% the front is far softer than that: check the rates and the axle positions", 100*guideFrontRearMin)
	}
	out = append(out, c)

	hi, lo := math.Max(bm.BounceHz, bm.PitchHz), math.Min(bm.BounceHz, bm.PitchHz)
	c = Check{Name: name("bounce_pitch_frequency_ratio"), Status: "pass",
		Detail: fmt.Sprintf("higher over lower body frequency %.3f; under %.1f (%s)", hi/lo, guideBouncePitchMax, sourceOlley)}
	if hi/lo >= guideBouncePitchMax {
		c.Status = "warn"
	}
	out = append(out, c)

	for _, m := range []struct {
		label string
		zeta  float64
	}{{"bounce", bm.BounceDampingRatio}, {"pitch", bm.PitchDampingRatio}} {
		if math.IsNaN(m.zeta) {
			continue
		}
		c := Check{Name: name(m.label + "_damping"), Status: "pass",
			Detail: fmt.Sprintf("%s damping ratio %.3f; body modes usually %.1f-%.1f (%s)",
				m.label, m.zeta, guideDampingLow, guideDampingHigh, sourceGillespie)}
		if m.zeta < guideDampingLow || m.zeta > guideDampingHigh {
			c.Status = "warn"
		}
		out = append(out, c)
	}
	return out
}

// ModelGuidance returns the ride guidance for the design model alone (what
// `ridemodes model` can show); damping checks appear when the model has
// damping.
func ModelGuidance(v Vehicle) ([]Check, error) {
	ms, err := v.Modes()
	if err != nil {
		return nil, err
	}
	damped := v.Damped()
	bm := BodyModes{BounceDampingRatio: math.NaN(), PitchDampingRatio: math.NaN()}
	for _, m := range ms {
		z := math.NaN()
		if damped {
			z = m.DampingRatio
		}
		if m.Label == "bounce" {
			bm.BounceHz, bm.BounceDampingRatio = m.NaturalFrequencyHz, z
		} else {
			bm.PitchHz, bm.PitchDampingRatio = m.NaturalFrequencyHz, z
		}
	}
	return RideGuidance(v, bm, "model"), nil
}
