package decay

import (
	"math"

	"github.com/ridemodes/ridemodes/identify/body"
)

// logDecLobeK is the height, in noise sd of the fitted samples, that a
// half-cycle lobe must reach to count: smaller lobes are mostly noise.
const logDecLobeK = 5

// LogDecrement is the one-mode quick estimate on one channel. It assumes a
// single mode and is reported as such: Valid is false, with the reason,
// when the fit shows two modes whose half-power bands overlap (the beat of
// two decaying modes makes successive peaks meaningless for either) or when
// less than one cycle stands above the noise.
type LogDecrement struct {
	Channel int
	// HalfCycles is the number of half-cycle lobes used, less one.
	HalfCycles         int
	DampingRatio       float64 // NaN when HalfCycles < 2
	DampedFrequencyHz  float64 // from the lobe spacing; NaN when HalfCycles < 2
	NaturalFrequencyHz float64
	Valid              bool
	Reason             string
}

// logDecrement splits y (rest level removed, sampled every dtS) into
// half-cycle lobes of alternating sign, each starting when the signal passes
// logDecLobeK*noiseSD on the other side (hysteresis, so noise near a zero
// crossing makes no lobes), takes each lobe's peak |x_k| at t_k (leaving out
// a lobe cut by either end of the window), and with m
// lobes computes the logarithmic decrement per cycle and the damping ratio
//
//	delta = 2 ln(|x_0|/|x_(m-1)|)/(m-1),  zeta = delta/sqrt(4 pi^2 + delta^2),
//
// and the damped frequency (m-1)/(2 (t_(m-1) - t_0)). modes are the fitted
// modes, used only to judge whether a one-mode estimate can hold.
//
// Reference: the logarithmic decrement of a single-degree-of-freedom free
// vibration, e.g. W. T. Thomson and M. D. Dahleh, Theory of Vibration with
// Applications, 5th ed., Prentice Hall, 1998, Sec. 2.6 [memory].
func logDecrement(channel int, y []float64, dtS, noiseSD float64, modes []body.Mode) LogDecrement {
	h := logDecLobeK * noiseSD
	var peaks, times []float64
	sign := 0.0
	for k, v := range y {
		switch {
		case sign == 0 && math.Abs(v) > h:
			sign = math.Copysign(1, v)
			peaks, times = append(peaks, math.Abs(v)), append(times, float64(k)*dtS)
		case sign != 0 && v*sign < -h:
			sign = -sign
			peaks, times = append(peaks, math.Abs(v)), append(times, float64(k)*dtS)
		case sign != 0 && v*sign > peaks[len(peaks)-1]:
			peaks[len(peaks)-1], times[len(times)-1] = math.Abs(v), float64(k)*dtS
		}
	}
	// A lobe whose peak is the first or last sample is cut by the window:
	// its true extremum lies outside, so it is left out.
	if len(peaks) > 0 && times[0] == 0 {
		peaks, times = peaks[1:], times[1:]
	}
	if n := len(peaks); n > 0 && times[n-1] == float64(len(y)-1)*dtS {
		peaks, times = peaks[:n-1], times[:n-1]
	}
	ld := LogDecrement{Channel: channel, HalfCycles: max(len(peaks)-1, 0), DampingRatio: math.NaN(),
		DampedFrequencyHz: math.NaN(), NaturalFrequencyHz: math.NaN(), Valid: true}
	m := len(peaks)
	if m >= 3 {
		delta := 2 * math.Log(peaks[0]/peaks[m-1]) / float64(m-1)
		ld.DampingRatio = delta / math.Sqrt(4*math.Pi*math.Pi+delta*delta)
		ld.DampedFrequencyHz = float64(m-1) / (2 * (times[m-1] - times[0]))
		ld.NaturalFrequencyHz = ld.DampedFrequencyHz / math.Sqrt(1-ld.DampingRatio*ld.DampingRatio)
	}
	switch {
	case m < 3:
		ld.Valid, ld.Reason = false, "less than one cycle stands above the noise"
	case overlapping(modes):
		ld.Valid, ld.Reason = false, "the two fitted modes overlap (their half-power bands meet); a one-mode decrement mixes them"
	}
	return ld
}

// overlapping reports whether two modes' half-power bands (fn +- zeta fn)
// meet.
func overlapping(ms []body.Mode) bool {
	a, b := ms[0], ms[1]
	return math.Abs(b.NaturalFrequencyHz-a.NaturalFrequencyHz) <
		a.DampingRatio*a.NaturalFrequencyHz+b.DampingRatio*b.NaturalFrequencyHz
}
