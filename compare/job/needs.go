package job

import (
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/identify/decay"
	"github.com/ridemodes/ridemodes/ingest"
)

// decayedFraction is how far the slower body mode's envelope must decay
// after a drop for the fit: to 5 % of its start, three time constants (our
// own margin: on the example hatchback with 2 % noise a 2.2 s drop log
// leaves the modes flagged and a 2.85 s one, this need, does not; the fit
// itself stops where the decay sinks into the noise).
const decayedFraction = 0.05

// ShortLogWarning returns a warning when a log of durationS seconds of test
// ("rig" or "drop") is shorter than Analyze needs with setup, else "": for a
// rig test the record its analysis band needs (identify.MinRigRecordS of
// the band's lower edge, which the reader enforces); for a drop the rest
// before the release that the release detector needs (preTriggerS, at
// least decay.DefaultRestS), the rear axle's delay, the decay of the slower
// body mode of the setup's car to decayedFraction, and a rest after it.
// It is what simulate says of a log it writes.
func ShortLogWarning(setup *ingest.Setup, test string, durationS, preTriggerS, rearDelayS float64) string {
	var need float64
	var why string
	if test == identify.TestRig {
		lo := setup.Analysis.BandLowHz
		if lo == 0 {
			lo = ingest.DefaultBandLowHz
		}
		need, why = identify.MinRigRecordS(lo), fmt.Sprintf("FRFs down to the analysis band's lower edge, %g Hz", lo)
	} else {
		modes, err := compare.DesignOf(setup.Vehicle).Modes()
		if err != nil {
			return ""
		}
		slowest := math.Inf(1) // the least decay rate zeta omega_n, 1/s
		for _, m := range modes {
			slowest = math.Min(slowest, m.DampingRatio*2*math.Pi*m.NaturalFrequencyHz)
		}
		need = math.Max(preTriggerS, decay.DefaultRestS) + rearDelayS - math.Log(decayedFraction)/slowest + decay.DefaultRestS
		why = "rest before the release, the decay of the body modes and rest after it"
	}
	if durationS >= need {
		return ""
	}
	return fmt.Sprintf("the %.3g s %s log is shorter than the %.3g s analyze needs (%s); give --duration %.0f or more",
		durationS, test, need, why, math.Ceil(need))
}
