package compare

import (
	"errors"
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/ingest"
)

// Check statuses.
const (
	StatusPass = "pass"
	StatusWarn = "warn"
	StatusFail = "fail"
)

// coverageFactor is the number of standard deviations a measured value must
// keep inside a tolerance to pass outright; closer to the limit it is a
// warning (k = 2, the usual expanded uncertainty of the GUM, JCGM 100:2008
// [common practice]).
const coverageFactor = 2

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
	// AnyFailed is true when a [targets] check failed (exit code 3).
	AnyFailed bool
	// RideRates says how the setup's ride rates were obtained, for printing.
	RideRates []AxleRideRate
}

// Assess sets the measured modes (from any test: rig or drop) beside the
// setup's design model and returns the comparison, the updated rates, the
// target checks and the ride guidance. Measured modes that are not one bounce
// and one pitch mode, or a model without oscillating modes, are errors; a
// measurement that the model cannot fit is not (UpdateErr).
func Assess(measured []MeasuredMode, setup *ingest.Setup) (*Assessment, error) {
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
	a.Update, a.UpdateErr = UpdateModel(design, measured, sensors, UpdateOptions{FreePitchInertia: setup.Update.FreePitchInertia})
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
	a.Checks = TargetChecks(setup.Targets, design, paired, a.Comparison, a.Update, a.UpdateErr)
	for _, c := range a.Checks {
		a.AnyFailed = a.AnyFailed || c.Status == StatusFail
	}
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

// Fill writes the comparison, updated and checks parts into r and appends
// the warnings.
func (a *Assessment) Fill(r *Result) {
	r.Comparison, r.Updated = a.Comparison, a.Updated
	r.Checks = append(r.Checks, a.Checks...)
	r.Warnings = append(r.Warnings, a.Warnings...)
}

// tolerance grades |diff| against tol with the standard deviation sigma of
// diff: fail outside, warn inside but within coverageFactor sigmas of the
// limit, pass otherwise.
func tolerance(diff, sigma, tol float64) string {
	switch {
	case math.Abs(diff) > tol:
		return StatusFail
	case math.Abs(diff)+coverageFactor*sigma > tol:
		return StatusWarn
	default:
		return StatusPass
	}
}

// TargetChecks grades the measurement against the [targets] tolerances t
// (absent tolerances give no check): frequencies and damping ratios of the
// paired modes (ordered like cmp) against the model's, the MAC of the
// shapes, and the updated rates and damping against design. A tolerance that
// cannot be checked (nothing measured) is a warning; rates of a measurement
// the model cannot fit fail.
func TargetChecks(t ingest.Targets, design Vehicle, paired []MeasuredMode, cmp []Comparison, u *Update, updErr error) []Check {
	var out []Check
	for i, c := range cmp {
		tol := t.BounceFrequencyTolerancePct
		if c.Label == "pitch" {
			tol = t.PitchFrequencyTolerancePct
		}
		if !math.IsNaN(tol) {
			sig := 100 * paired[i].Sigma.NaturalFrequencyHz / c.PredictedHz
			out = append(out, Check{Name: "target." + c.Label + "_frequency", Status: tolerance(c.DifferencePct, sig, tol),
				Detail: fmt.Sprintf("measured %.3f Hz (sigma %.3f), model %.3f Hz: %+.1f %% against +-%.1f %%",
					c.MeasuredHz, paired[i].Sigma.NaturalFrequencyHz, c.PredictedHz, c.DifferencePct, tol)})
		}
	}
	if tol := t.DampingRatioTolerance; !math.IsNaN(tol) {
		for i, c := range cmp {
			ch := Check{Name: "target." + c.Label + "_damping_ratio"}
			switch {
			case !design.Damped():
				ch.Status, ch.Detail = StatusWarn, "the model has no damping to compare with; give "+
					"front_damping_ns_per_m and rear_damping_ns_per_m in [vehicle]"
			case c.MeasuredDampingRatio == nil:
				ch.Status, ch.Detail = StatusWarn, "no damping ratio was measured for this mode"
			default:
				d := *c.MeasuredDampingRatio - c.PredictedDampingRatio
				ch.Status = tolerance(d, paired[i].Sigma.DampingRatio, tol)
				ch.Detail = fmt.Sprintf("measured %.3f (sigma %.3f), model %.3f: %+.3f against +-%.3f",
					*c.MeasuredDampingRatio, paired[i].Sigma.DampingRatio, c.PredictedDampingRatio, d, tol)
			}
			out = append(out, ch)
		}
	}
	if min := t.ModeShapeMACMin; !math.IsNaN(min) {
		for _, c := range cmp {
			ch := Check{Name: "target." + c.Label + "_mode_shape", Status: StatusPass,
				Detail: fmt.Sprintf("MAC %.3f against a least of %.3f", c.MAC, min)}
			switch {
			case !c.ShapeMeasured:
				ch.Status, ch.Detail = StatusWarn, "no mode shape was measured for this mode"
			case c.MAC < min:
				ch.Status = StatusFail
			}
			out = append(out, ch)
		}
	}
	type axleValue struct {
		name              string
		got, sigma, want  float64
		unit              string
		needsDamping      bool
		designHasNoDamper bool
	}
	check := func(tol float64, items []axleValue) {
		if math.IsNaN(tol) {
			return
		}
		for _, it := range items {
			ch := Check{Name: "target." + it.name}
			switch {
			case updErr != nil && errors.Is(updErr, ErrNoFit):
				ch.Status, ch.Detail = StatusFail, "no "+it.name+" could be back-calculated: "+updErr.Error()
			case updErr != nil:
				ch.Status, ch.Detail = StatusWarn, "no "+it.name+" could be back-calculated: "+updErr.Error()
			case it.needsDamping && !u.Damped:
				ch.Status, ch.Detail = StatusWarn, "no damping was measured, so none was back-calculated"
			case it.designHasNoDamper:
				ch.Status, ch.Detail = StatusWarn, "the design gives no damping for this axle to compare with"
			default:
				d := 100 * (it.got - it.want) / it.want
				ch.Status = tolerance(d, 100*it.sigma/it.want, tol)
				ch.Detail = fmt.Sprintf("back-calculated %.0f %s (sigma %.0f), design %.0f %s: %+.1f %% against +-%.1f %%",
					it.got, it.unit, it.sigma, it.want, it.unit, d, tol)
			}
			out = append(out, ch)
		}
	}
	var got, sig Rates
	if u != nil {
		got, sig = u.Vehicle.RatesOf(), u.Sigma
	}
	want := design.RatesOf()
	check(t.RideRateTolerancePct, []axleValue{
		{"front_ride_rate", got.FrontRateNPerM, sig.FrontRateNPerM, want.FrontRateNPerM, "N/m", false, false},
		{"rear_ride_rate", got.RearRateNPerM, sig.RearRateNPerM, want.RearRateNPerM, "N/m", false, false},
	})
	check(t.AxleDampingTolerancePct, []axleValue{
		{"front_damping", got.FrontDampingNsPerM, sig.FrontDampingNsPerM, want.FrontDampingNsPerM, "N s/m", true, want.FrontDampingNsPerM == 0},
		{"rear_damping", got.RearDampingNsPerM, sig.RearDampingNsPerM, want.RearDampingNsPerM, "N s/m", true, want.RearDampingNsPerM == 0},
	})
	return out
}
