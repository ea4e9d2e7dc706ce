package decay

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/ridemodes/ridemodes/identify/body"
)

// Support is the evidence, beside the modes' own standard deviations, on
// which Fit flags a mode that the decay cannot support (see flagModes).
type Support struct {
	// ResidualOverNoise is each channel's residual sd over the sd of the
	// noise at rest after the anti-alias filter: about 1 when the two-mode
	// free decay describes the window.
	ResidualOverNoise []float64
	// LargestJumpS is the log time of the largest jump (jumpAt) after the
	// event's last step, and LargestJumpSDs its size in noise sd of the
	// jump measure on its channel.
	LargestJumpS, LargestJumpSDs float64
	// Modes holds, per mode of Result.Modes, the evidence of that mode.
	Modes []ModeSupport
}

// ModeSupport is the evidence on one mode.
type ModeSupport struct {
	// StartSNR is the mode's amplitude at the first fitted sample, 2|A_rc|,
	// over the filtered noise sd, on the sensor where it is largest.
	StartSNR float64
}

// Thresholds of the drop route's own flags (flagModes), measured on 720
// simulated drops (compare/simulate; the three example cars and six
// invented ones, 2 % and 5 % noise, dropped at once and rolled off the
// blocks 0.3 s apart, seeds 1-20; the package documentation gives the
// figures).
const (
	// maxResidualOverNoise: a residual sd over this many times the filtered
	// noise on any channel flags both modes. The sweep's fits gave 0.90-1.16
	// (median 1.02); a rolled-off drop whose rear step went unfound gives
	// 2.9 (TestMissedStepIsFlagged).
	maxResidualOverNoise = 1.3
	// possibleStepK and possibleStepShare: a jump after the last step over
	// both possibleStepK noise sd of the jump measure and possibleStepShare
	// of the event's largest jump on its channel flags both modes. The
	// largest such jump of a free decay was 4.3 sd over the 671 fitted
	// drops (a Gaussian jump measure exceeds 5 sd with probability 6e-7 per
	// sample);
	// between 5 sd and DefaultStepThresholdK a step may have gone unfound.
	possibleStepK     = 5.0
	possibleStepShare = stepShare / 2
	// minStartSNR: a mode whose amplitude at the start of the window is
	// under this many filtered-noise sd on every sensor is flagged: so
	// little signal leaves the linearised sd unreliable. Of the sweep's 107
	// modes under it, 16 had their natural frequency or damping ratio off
	// by more than 3 sd, against 26 of the 1235 above it (mostly swapped
	// labels, flagged by their own rule).
	minStartSNR = 5.0
)

// support gathers the evidence of Support for the fit res (its modes set)
// of the refined parameters p of model m, over the event ev of channels
// (raw, at the log's rate) and the decimated window dec.
func support(res *Result, m expModel, p []float64, channels [][]float64, ev Event, dec decimated) Support {
	var s Support
	for c, sd := range res.ResidualSD {
		s.ResidualOverNoise = append(s.ResidualOverNoise, sd/(ev.NoiseSD[c]*dec.noiseGain))
	}
	s.LargestJumpS, s.LargestJumpSDs = largestLateJump(channels, ev, dec.rateHz)
	for _, md := range res.Modes {
		var ms ModeSupport
		for r := 0; r < m.modes; r++ {
			if m.pole(p, r) != md.Pole {
				continue
			}
			for c := 0; c < m.nch(); c++ {
				amp := 2 * cmplx.Abs(m.amplitude(p, r, c))
				ms.StartSNR = math.Max(ms.StartSNR, amp/(ev.NoiseSD[c]*dec.noiseGain))
			}
		}
		s.Modes = append(s.Modes, ms)
	}
	return s
}

// largestLateJump returns the log time and the size, in noise sd of the
// jump measure, of the largest jump (jumpAt) after the event's last step
// (beyond its stepGuard) on any channel, counting only jumps of at least
// possibleStepShare of the largest on their channel in the event (which
// keeps the smooth decay of a log with little noise out, see stepShare).
func largestLateJump(channels [][]float64, ev Event, rateHz float64) (atS, sds float64) {
	lo, hi := ev.ReleaseIndex, min(ev.RestIndex, len(channels[0])-1)
	for c, x := range channels {
		largest := 0.0
		for i := lo; i < hi; i++ {
			largest = math.Max(largest, math.Abs(jumpAt(x, i)))
		}
		for i := ev.LastStepIndex() + stepGuard + 1; i < hi; i++ {
			j := math.Abs(jumpAt(x, i))
			if v := j / (math.Sqrt(5) * ev.NoiseSD[c]); v > sds && j >= possibleStepShare*largest {
				atS, sds = float64(i)/rateHz, v
			}
		}
	}
	return atS, sds
}

// flagModes flags the modes of res, fitted from sensors at posM, that the
// decay cannot support: by the rules common to both routes
// (body.FlagUnsupported) and by the drop route's own evidence (res.Support).
func flagModes(res *Result, posM []float64, opt Options) {
	s := res.Support
	for i := range res.Modes {
		md, ms := &res.Modes[i], s.Modes[i]
		if ms.StartSNR < minStartSNR {
			how := "roll the car off the blocks one axle after the other"
			if md.Label == "bounce" {
				how = "drop both axles at once"
			}
			md.Flag(fmt.Sprintf("%s: the drop excites this mode weakly, its amplitude at the start of the free "+
				"decay is %.2g noise sd on the best sensor (under %g); %s to excite it, or drop from higher blocks",
				md.Label, ms.StartSNR, minStartSNR, how))
		}
	}
	body.FlagUnsupported(res.Modes, posM, opt.BandLowHz, opt.BandHighHz)
	both := func(reason string) {
		for i := range res.Modes {
			res.Modes[i].Flag(reason)
		}
	}
	for c, r := range s.ResidualOverNoise {
		if r > maxResidualOverNoise {
			both(fmt.Sprintf("the two-mode free decay does not describe the setup's sensor %d: its residual is %.2g "+
				"times the noise at rest (over %.2g), so the window holds something else, a step of the pans, another "+
				"mode or a non-linear damper; check the log around the release", c+1, r, maxResidualOverNoise))
		}
	}
	if s.LargestJumpSDs > possibleStepK {
		both(fmt.Sprintf("a jump of %.2g noise sd at %.3f s, after the last step found and inside the event, may "+
			"be a step of the pans (the rear wheels landing) that the detector (%g sd) did not count, and the decay "+
			"after a step is free only from there; look at the log there, and drop from higher blocks (or use quieter "+
			"sensors) so that each step stands out", s.LargestJumpSDs, s.LargestJumpS, opt.Detect.StepThresholdK))
	}
}
