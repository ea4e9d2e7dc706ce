package compare

import (
	"errors"
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/ingest"
)

// Assessment is what a measurement says about the design model: the parts
// of a Result that compare writes, the numeric update behind them, and the
// verdict.
type Assessment struct {
	Comparison []Comparison
	Updated    *Updated // nil when the update failed (see UpdateErr)
	Update     *Update
	// UpdateErr is why no update was possible (errors.Is(UpdateErr,
	// ErrNoFit) when the modes cannot come from the model); its message is
	// also among the Warnings.
	UpdateErr error
	Checks    []Check
	Warnings  []string
	// Verdict answers the [targets]: its Status is none, pass, fail or
	// inconclusive, for the caller to map to an exit code (3 for fail, 4 for
	// inconclusive).
	Verdict Verdict
	// AnyFailed is true when a [targets] check failed (Verdict.Status is
	// fail; exit code 3).
	AnyFailed bool
	// RideRates says how the setup's ride rates were obtained, for printing.
	RideRates []AxleRideRate
}

// Assess sets the measured modes (from any test: rig or drop) beside the
// setup's design model and returns the comparison, the updated rates, the
// target checks and the ride guidance. corr relates the measured figures
// for the rate update (nil: independent). Measured modes that are not one bounce
// and one pitch mode, or a model without oscillating modes, are errors; a
// measurement that the model cannot fit is not (UpdateErr).
func Assess(measured []MeasuredMode, corr *body.Correlation, setup *ingest.Setup) (*Assessment, error) {
	design := DesignOf(setup.Vehicle)
	model, err := design.Modes()
	if err != nil {
		return nil, err
	}
	sensors := ingest.SensorPositionsM(setup.Sensors)
	a := &Assessment{RideRates: RideRates(setup.Vehicle)}
	a.Comparison, a.Warnings, err = Compare(measured, design, sensors)
	if err != nil {
		return nil, err
	}
	a.Update, a.UpdateErr = UpdateModel(design, measured, sensors, UpdateOptions{FreePitchInertia: setup.Update.FreePitchInertia,
		Correlation: corr})
	if a.UpdateErr != nil {
		a.Warnings = append(a.Warnings, a.UpdateErr.Error())
	} else {
		a.Updated = a.Update.JSON()
		a.equivalentSprings(setup.Vehicle)
		if a.Update.NominalWeights {
			a.Warnings = append(a.Warnings, "some measured values came without a standard deviation: the "+
				"least-squares update weighted them with nominal ones, so its uncertainties are indicative only")
		}
	}
	paired, _ := pairByLabel(measured, model) // checked by Compare
	a.Checks = TargetChecks(setup.Targets, design, model, paired, sensors, a.Comparison, a.Update, a.UpdateErr)
	a.Verdict = verdictOf(a.Checks)
	a.AnyFailed = a.Verdict.Status == StatusFail
	guide := design
	if a.Update != nil {
		guide = a.Update.Vehicle
	}
	bm := BodyModes{}
	for _, m := range paired {
		if m.Label == "bounce" {
			bm.BounceHz, bm.BounceDampingRatio = m.NaturalFrequencyHz, m.DampingRatio
		} else {
			bm.PitchHz, bm.PitchDampingRatio = m.NaturalFrequencyHz, m.DampingRatio
		}
	}
	a.Checks = append(a.Checks, RideGuidance(guide, bm, "measured")...)
	return a, nil
}

// DesignOf returns the design model of a setup file's [vehicle] table.
func DesignOf(s ingest.VehicleSpec) Vehicle {
	return Vehicle{
		MassKg: s.MassKg, PitchInertiaKgm2: s.PitchInertiaKgm2,
		CGToFrontM: s.CGToFrontM, CGToRearM: s.CGToRearM,
		FrontRateNPerM: s.FrontRateNPerM, RearRateNPerM: s.RearRateNPerM,
		FrontDampingNsPerM: s.FrontDampingNsPerM, RearDampingNsPerM: s.RearDampingNsPerM,
	}
}

// equivalentSprings fills the spring rates that would give the updated ride
// rates, for axles whose setup gives a spring rate.
func (a *Assessment) equivalentSprings(spec ingest.VehicleSpec) {
	for _, ax := range []struct {
		b    *ingest.RideRateBuildUp
		ride float64
		dst  **float64
	}{{spec.FrontBuildUp, a.Updated.FrontRateNPerM, &a.Updated.FrontSpringRateNPerM},
		{spec.RearBuildUp, a.Updated.RearRateNPerM, &a.Updated.RearSpringRateNPerM}} {
		if ax.b == nil {
			continue
		}
		ks, err := SpringRateFor(*ax.b, ax.ride)
		if err != nil {
			a.Warnings = append(a.Warnings, err.Error())
			continue
		}
		*ax.dst = Finite(ks)
	}
}

// Fill writes the comparison, updated, checks and verdict parts into r and
// appends the warnings.
func (a *Assessment) Fill(r *Result) {
	r.Comparison, r.Updated = a.Comparison, a.Updated
	v := a.Verdict
	r.Verdict = &v
	r.Checks = append(r.Checks, a.Checks...)
	r.Warnings = append(r.Warnings, a.Warnings...)
}

// openCheck is a target check that cannot be judged: inconclusive, with the
// reason why in its detail and in the verdict.
func openCheck(name, why string) Check {
	return Check{Name: name, Status: StatusInconclusive, Detail: why + ": " + StatusInconclusive,
		summary: phrase(plainName(name), StatusInconclusive, why)}
}

// TargetChecks judges the measurement against the [targets] tolerances t
// (absent tolerances give no check) by the decision rule of decide:
// frequencies and damping ratios of the paired modes (ordered like the
// design's model modes and like cmp) against the model's, the MAC of the
// shapes (one-sided: at least the target, its uncertainty from MACSigma with
// the sensor positions sensorsXM), and the rates and damping of the update u
// against design. The references (the model's values and the design rates)
// are exact, so each check's uncertainty is the measured value's.
//
// A measured value without a standard deviation (zero in ModeSigma), a rate
// whose uncertainty rests on nominal weights, a tolerance with nothing to
// check (no damping or shape measured, no damper in the design, an update
// that failed) and any check that uses a flagged mode are inconclusive, with
// the reason in the detail. Rates of a measurement the model cannot fit
// (ErrNoFit) fail when the measured frequency ratio with its expanded
// uncertainty lies wholly below the least that the body allows, and are
// inconclusive otherwise.
func TargetChecks(t ingest.Targets, design Vehicle, model []Mode, paired []MeasuredMode, sensorsXM []float64,
	cmp []Comparison, u *Update, updErr error) []Check {
	var out []Check
	noSigma := func(what string) string { return "no standard deviation was given for the " + what }
	for i, c := range cmp {
		tol := t.BounceFrequencyTolerancePct
		if c.Label == "pitch" {
			tol = t.PitchFrequencyTolerancePct
		}
		if math.IsNaN(tol) {
			continue
		}
		sig := positiveOrNaN(paired[i].Sigma.NaturalFrequencyHz)
		out = append(out, judged{name: "target." + c.Label + "_frequency", value: c.MeasuredHz, sigma: sig,
			sigmaWhy: noSigma(c.Label + " frequency"),
			low:      c.PredictedHz * (1 - tol/100), high: c.PredictedHz * (1 + tol/100), shown: shownHz,
			against: fmt.Sprintf("%+.1f %% against the model, tolerance ±%g %%", c.DifferencePct, tol),
			flagged: flagWords(paired[i]),
			detail: fmt.Sprintf("measured %s, model %.3f Hz: %+.1f %% against ±%.1f %%",
				withSD("%.3f", c.MeasuredHz, paired[i].Sigma.NaturalFrequencyHz, " Hz"), c.PredictedHz, c.DifferencePct, tol)}.check())
	}
	if tol := t.DampingRatioTolerance; !math.IsNaN(tol) {
		for i, c := range cmp {
			name := "target." + c.Label + "_damping_ratio"
			switch {
			case !design.Damped():
				out = append(out, openCheck(name, "the model has no damping to compare with; give "+
					"front_damping_ns_per_m and rear_damping_ns_per_m in [vehicle]"))
			case c.MeasuredDampingRatio == nil:
				out = append(out, openCheck(name, "no damping ratio was measured for this mode"))
			default:
				d := *c.MeasuredDampingRatio - c.PredictedDampingRatio
				out = append(out, judged{name: name, value: *c.MeasuredDampingRatio,
					sigma: positiveOrNaN(paired[i].Sigma.DampingRatio), sigmaWhy: noSigma(c.Label + " damping ratio"),
					low: c.PredictedDampingRatio - tol, high: c.PredictedDampingRatio + tol, shown: shownRatio,
					against: fmt.Sprintf("%+.3f against the model, tolerance ±%g", d, tol),
					flagged: flagWords(paired[i]),
					detail: fmt.Sprintf("measured %s, model %.3f: %+.3f against ±%.3f",
						withSD("%.3f", *c.MeasuredDampingRatio, paired[i].Sigma.DampingRatio, ""), c.PredictedDampingRatio, d, tol)}.check())
			}
		}
	}
	if min := t.ModeShapeMACMin; !math.IsNaN(min) {
		for i, c := range cmp {
			name := "target." + c.Label + "_mode_shape"
			if !c.ShapeMeasured {
				out = append(out, openCheck(name, "no mode shape was measured for this mode"))
				continue
			}
			_, sig, ok := MACSigma(paired[i], model[i], sensorsXM, design)
			if !ok {
				sig = math.NaN()
			}
			out = append(out, judged{name: name, value: c.MAC, sigma: sig,
				sigmaWhy: "the mode comes without a standard deviation of its pitch per bounce, " +
					"which the MAC's uncertainty is taken from",
				low: min, high: math.NaN(), shown: shownRatio,
				against: fmt.Sprintf("MAC with the model's shape, least %g", min),
				flagged: flagWords(paired[i]),
				detail:  fmt.Sprintf("MAC %.3f against a least of %.3f", c.MAC, min)}.check())
		}
	}
	type axleValue struct {
		name              string
		got, sigma, want  float64
		shown             unitShown
		needsDamping      bool
		designHasNoDamper bool
	}
	sigmaWhy := rateSigmaWhy(paired, u)
	check := func(tol float64, items []axleValue) {
		if math.IsNaN(tol) {
			return
		}
		for _, it := range items {
			name := "target." + it.name
			words := plainName(name)
			switch {
			case updErr != nil && errors.Is(updErr, ErrNoFit):
				out = append(out, noFitCheck(name, updErr, paired))
			case updErr != nil:
				out = append(out, openCheck(name, "no "+words+" could be back-calculated: "+updErr.Error()))
			case it.needsDamping && !u.Damped:
				out = append(out, openCheck(name, "no damping was measured, so none was back-calculated"))
			case it.designHasNoDamper:
				out = append(out, openCheck(name, "the design gives no damping for this axle to compare with"))
			default:
				d := 100 * (it.got - it.want) / it.want
				sig := it.sigma
				if sigmaWhy != "" {
					sig = math.NaN()
				}
				out = append(out, judged{name: name, value: it.got, sigma: sig, sigmaWhy: sigmaWhy,
					low: it.want * (1 - tol/100), high: it.want * (1 + tol/100), shown: it.shown,
					against: fmt.Sprintf("%+.1f %% against design, tolerance ±%g %%", d, tol),
					flagged: flagWords(paired...),
					detail: fmt.Sprintf("back-calculated %s, design %.0f %s: %+.1f %% against ±%.1f %%",
						withSD("%.0f", it.got, it.sigma, " "+it.shown.json), it.want, it.shown.json, d, tol)}.check())
			}
		}
	}
	var got, sig Rates
	if u != nil {
		got, sig = u.Vehicle.RatesOf(), u.Sigma
	}
	want := design.RatesOf()
	check(t.RideRateTolerancePct, []axleValue{
		{"front_ride_rate", got.FrontRateNPerM, sig.FrontRateNPerM, want.FrontRateNPerM, shownRate, false, false},
		{"rear_ride_rate", got.RearRateNPerM, sig.RearRateNPerM, want.RearRateNPerM, shownRate, false, false},
	})
	check(t.AxleDampingTolerancePct, []axleValue{
		{"front_damping", got.FrontDampingNsPerM, sig.FrontDampingNsPerM, want.FrontDampingNsPerM, shownDamping, true, want.FrontDampingNsPerM == 0},
		{"rear_damping", got.RearDampingNsPerM, sig.RearDampingNsPerM, want.RearDampingNsPerM, shownDamping, true, want.RearDampingNsPerM == 0},
	})
	return out
}

// withSD formats a value, its unit and its standard deviation, e.g.
// "1.235 Hz (sd 0.003)"; without a standard deviation (0 or not finite:
// none was given) the value alone.
func withSD(format string, v, sd float64, unit string) string {
	s := fmt.Sprintf(format, v) + unit
	if sd > 0 && !math.IsInf(sd, 0) {
		s += " (sd " + fmt.Sprintf(format, sd) + ")"
	}
	return s
}

// positiveOrNaN returns a measured standard deviation, or NaN (unknown) when
// it was not given (zero) or is not finite.
func positiveOrNaN(sigma float64) float64 {
	if sigma > 0 && !math.IsInf(sigma, 0) {
		return sigma
	}
	return math.NaN()
}

// rateSigmaWhy says why the update's standard deviations are not a
// measurement uncertainty ("" when they are): a measured frequency or
// damping ratio that the update used came without a standard deviation, or
// the least squares weighted some value with a nominal one.
func rateSigmaWhy(paired []MeasuredMode, u *Update) string {
	if u == nil {
		return ""
	}
	if u.NominalWeights {
		return "some measured values came without a standard deviation and the update weighted them " +
			"with nominal ones"
	}
	given := u.HasSigma
	for _, m := range paired {
		given = given && m.Sigma.NaturalFrequencyHz > 0 && (!u.Damped || m.Sigma.DampingRatio > 0)
	}
	if !given {
		return "a measured frequency or damping ratio that the update used came without a standard deviation"
	}
	return ""
}

// noFitCheck judges a rate target when no rates of the design's body
// reproduce the measured modes (err matches ErrNoFit): the measured ratio of
// the higher to the lower natural frequency against the least ratio the body
// allows, by decide; fail only when the ratio with its expanded uncertainty
// lies wholly below it.
func noFitCheck(name string, err error, paired []MeasuredMode) Check {
	head := "no " + plainName(name) + " could be back-calculated: " + err.Error()
	var nf *NoFitError
	if !errors.As(err, &nf) || nf.Damped {
		return openCheck(name, head+"; whether the measured poles lie outside what the body allows "+
			"is not known with their uncertainty")
	}
	var rel2 float64
	for _, m := range paired {
		rel2 += sq(positiveOrNaN(m.Sigma.NaturalFrequencyHz) / m.NaturalFrequencyHz)
	}
	sigma := nf.FrequencyRatio * math.Sqrt(rel2)
	if math.IsNaN(sigma) {
		return openCheck(name, head+"; without standard deviations of both frequencies it is not known "+
			"whether the measured ratio lies outside what the body allows")
	}
	status := decide(nf.FrequencyRatio, sigma, nf.MinFrequencyRatio, math.NaN())
	words := fmt.Sprintf("%s: the measured frequency ratio %.4f ± %.4f (k = 2) against the least of %.4f "+
		"that this body allows", plainName(name), nf.FrequencyRatio, coverageFactor*sigma, nf.MinFrequencyRatio)
	why := "the ratio with its expanded uncertainty reaches the least"
	detail := fmt.Sprintf("%s; the measured frequency ratio %s against the least of %.4f",
		head, withSD("%.4f", nf.FrequencyRatio, sigma, ""), nf.MinFrequencyRatio)
	if fl := flagWords(paired...); fl != "" {
		status, why = StatusInconclusive, fl
		detail += "; " + fl + ", so the check cannot be trusted"
	}
	detail += ": " + status + " (decision rule of JCGM 106:2012, U = 2 sigma)"
	return Check{Name: name, Status: status, Detail: detail, summary: phrase(words, status, why)}
}
