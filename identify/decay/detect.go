package decay

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Detection defaults.
const (
	// DefaultThresholdK is the departure a release must reach, in multiples
	// of a channel's noise standard deviation. At 8 sd a Gaussian sample
	// exceeds it with probability about 1e-15, so noise alone never triggers.
	DefaultThresholdK = 8
	// DefaultStepThresholdK is the jump, in multiples of the jump measure's
	// noise sd, that marks a later step of the pans inside an event (the
	// rear wheels landing). It is lower than the release's threshold because
	// it is only looked for inside the event, a few hundred samples: at 6 sd
	// a Gaussian sample exceeds it with probability 2e-9, while on 40
	// simulated drops of the example hatchback at 5 % noise (compare/simulate,
	// 460 channel-samples each) the largest jump measure away from a step was
	// 4.2 sd, and the rear step of a roll-off 0.3 s long measured 7.9-10 sd:
	// at 8 sd it was missed in 5 of the 40, and the fit then spanned the step
	// (a spurious pole at 2.4 Hz, 20 of its sd from the truth).
	DefaultStepThresholdK = 6
	// DefaultRestS is the length of the quiet stretch that counts as rest,
	// before a release (the pre-trigger) and after the decay.
	DefaultRestS = 0.5
	// quietFactor: a stretch is quiet when every channel's standard deviation
	// about its own mean over the stretch is at most quietFactor times the
	// channel's noise. An oscillation of amplitude X adds X^2/2 to the
	// variance, so quiet means X below about 1.6 noise sd.
	quietFactor = 1.5
	// sustainS is how long the departure must persist (at least
	// minSustainSamples samples), so a single spike is not a release.
	sustainS          = 0.01
	minSustainSamples = 3
)

// DetectOptions set the event detector. Zero values take the defaults.
type DetectOptions struct {
	// ThresholdK is the departure from rest, in noise standard deviations,
	// that marks a release (default DefaultThresholdK).
	ThresholdK float64
	// StepThresholdK is the jump, in noise standard deviations of the jump
	// measure, that marks a later step of the pans inside an event (default
	// DefaultStepThresholdK).
	StepThresholdK float64
	// RestS is the length of quiet log that counts as rest (default
	// DefaultRestS). A release is only recognised after RestS of rest.
	RestS float64
}

func (o DetectOptions) withDefaults() DetectOptions {
	if o.ThresholdK == 0 {
		o.ThresholdK = DefaultThresholdK
	}
	if o.StepThresholdK == 0 {
		o.StepThresholdK = DefaultStepThresholdK
	}
	if o.RestS == 0 {
		o.RestS = DefaultRestS
	}
	if !(o.ThresholdK > 0) || !(o.StepThresholdK > 0) || !(o.RestS > 0) || math.IsInf(o.ThresholdK, 0) ||
		math.IsInf(o.StepThresholdK, 0) || math.IsInf(o.RestS, 0) {
		panic(fmt.Sprintf("decay: detection needs positive thresholds and rest length (got %g, %g, %g s)",
			o.ThresholdK, o.StepThresholdK, o.RestS))
	}
	return o
}

// Event is one release found in a log. Indices count samples from 0, times
// are index/rate in s.
type Event struct {
	ReleaseIndex int     // first sample that departs from rest
	ReleaseS     float64 // ReleaseIndex / rate
	// RestIndex is the first sample of the quiet stretch that ends the decay
	// (the log's length when the body never came to rest again).
	RestIndex int
	RestS     float64
	// Settled is false when the decay had not died into the noise by the
	// end of the log.
	Settled bool
	// RestLevel is each channel's mean over the rest stretch just before the
	// release (DC offset and gravity, if the sensor shows it), in the log's
	// units.
	RestLevel []float64
	// NoiseSD is each channel's noise standard deviation, estimated robustly
	// over the whole log (see Detect).
	NoiseSD []float64
	// PeakDeparture is the largest departure from the rest level during the
	// event, in noise standard deviations (the largest over channels).
	PeakDeparture float64
	// Steps are the sample indices at which the pans stepped during the
	// event (see findSteps), in order; the first is ReleaseIndex. A drop of
	// both axles at once has one step; a car rolled off the blocks has a
	// second where the rear wheels land. Only the decay after the last step
	// is free.
	Steps []int
}

// LastStepIndex is the sample of the event's last step, where the free
// decay begins.
func (e Event) LastStepIndex() int { return e.Steps[len(e.Steps)-1] }

// ErrNoEvent is matched (errors.Is) by a *NoEventError.
var ErrNoEvent = errors.New("no release in the log")

// NoEventError reports a log in which no release was found.
type NoEventError struct {
	DurationS  float64
	ThresholdK float64
	RestS      float64
	// NeverAtRest is true when no stretch of RestS was quiet, so there was
	// no rest to depart from.
	NeverAtRest bool
	// LargestDeparture is the largest departure from rest seen, in noise
	// standard deviations (0 when NeverAtRest).
	LargestDeparture float64
}

func (e *NoEventError) Error() string {
	if e.NeverAtRest {
		return fmt.Sprintf("the %.3g s log is never at rest for %.3g s, so no release can be found; "+
			"record a pre-trigger of at least %.3g s with the car still, check that the channels are body "+
			"accelerometers, or shorten the rest length", e.DurationS, e.RestS, e.RestS)
	}
	return fmt.Sprintf("no release in the %.3g s log: the body channels never depart from rest by more "+
		"than %g times their noise (largest departure %.3g times); check that the log covers the drop, that the "+
		"channels are the body accelerometers and their scaling, or lower the threshold",
		e.DurationS, e.ThresholdK, e.LargestDeparture)
}

// Is lets errors.Is match ErrNoEvent.
func (e *NoEventError) Is(target error) bool { return target == ErrNoEvent }

// ConstantChannelError reports a channel without noise or signal: a dead
// sensor or a flat-lined channel.
type ConstantChannelError struct{ Channel int }

func (e *ConstantChannelError) Error() string {
	return fmt.Sprintf("channel %d is constant (no noise, no signal); check the sensor, its cable and "+
		"the channel mapping", e.Channel)
}

// Detect finds every release in a multi-channel log of body accelerations
// (channels[c][i], any units, equal lengths) sampled at rateHz.
//
// The rule: each channel's noise sd is measured from its first differences
// (see noiseSD), robust to the minority of the log in motion and blind to DC
// offsets and slow drift. A stretch of opt.RestS is
// rest when every channel's standard deviation over it is at most
// quietFactor times its noise. After rest, the release is the first sample
// at which some channel departs from its mean over the preceding rest
// stretch by more than ThresholdK noise sd, provided the departure persists
// for sustainS (at least minSustainSamples samples); the reference moves
// with the sample, so slow drift is followed. The event ends at the first
// quiet stretch after the release (RestIndex), and the detector re-arms
// there, so several drops in one log give several events. Within each event
// the steps of the pans are found by findSteps (Event.Steps): a car rolled
// off the blocks lands on its rear wheels a wheelbase after the front ones,
// inside the same event.
//
// Detect returns a *NoEventError when there is no release and a
// *ConstantChannelError for a dead channel. Mismatched channel lengths, no
// channels or a non-positive rate are caller mistakes and panic.
func Detect(rateHz float64, channels [][]float64, opt DetectOptions) ([]Event, error) {
	checkChannels(rateHz, channels)
	opt = opt.withDefaults()
	n := len(channels[0])
	w := max(int(math.Round(opt.RestS*rateHz)), 8)
	if n < 2*w+1 {
		return nil, fmt.Errorf("the log has %d samples (%.3g s); it needs at least %d (twice the rest "+
			"length %.3g s) to show rest and a release", n, float64(n)/rateHz, 2*w+1, opt.RestS)
	}
	sd := make([]float64, len(channels))
	for c, x := range channels {
		sd[c] = noiseSD(x)
		if sd[c] == 0 {
			return nil, &ConstantChannelError{Channel: c}
		}
	}
	pw := newPrefixWindows(channels)
	sustain := max(int(math.Round(sustainS*rateHz)), minSustainSamples)
	quiet := func(i int) bool { // the stretch [i-w, i)
		for c := range channels {
			if pw.variance(c, i-w, i) > quietFactor*quietFactor*sd[c]*sd[c] {
				return false
			}
		}
		return true
	}
	departure := func(i, ref int) float64 { // at sample i from the mean of [ref-w, ref)
		d := 0.0
		for c, x := range channels {
			d = math.Max(d, math.Abs(x[i]-pw.mean(c, ref-w, ref))/sd[c])
		}
		return d
	}
	held := func(i, ref int) bool { // the departure lasts sustain samples
		for j := i; j < i+sustain; j++ {
			if departure(j, ref) <= opt.ThresholdK {
				return false
			}
		}
		return true
	}
	var events []Event
	everRest := false
	largest := 0.0
	ref := -1 // the last sample whose preceding stretch was rest; -1: not armed
	for i := w; i+sustain <= n; {
		if quiet(i) {
			ref, everRest = i, true
		}
		if ref < 0 {
			i++
			continue
		}
		if !held(i, ref) {
			largest = math.Max(largest, departure(i, ref))
			i++
			continue
		}
		ev := Event{ReleaseIndex: i, ReleaseS: float64(i) / rateHz, NoiseSD: sd, RestLevel: make([]float64, len(channels))}
		for c := range channels {
			ev.RestLevel[c] = pw.mean(c, ref-w, ref)
		}
		j := i + sustain + w
		for j <= n && !quiet(j) {
			j++
		}
		ev.Settled = j <= n
		ev.RestIndex = n
		if ev.Settled {
			ev.RestIndex = j - w
		}
		ev.RestS = float64(ev.RestIndex) / rateHz
		for k := i; k < ev.RestIndex; k++ {
			ev.PeakDeparture = math.Max(ev.PeakDeparture, departure(k, ref))
		}
		ev.Steps = findSteps(channels, sd, ev.ReleaseIndex, ev.RestIndex, opt.StepThresholdK)
		events = append(events, ev)
		ref, i = -1, j
	}
	if len(events) == 0 {
		return nil, &NoEventError{DurationS: float64(n) / rateHz, ThresholdK: opt.ThresholdK, RestS: opt.RestS,
			NeverAtRest: !everRest, LargestDeparture: largest}
	}
	return events, nil
}

// Step detection.
const (
	// stepShare: a later step's jump on a channel must reach this share of
	// the largest jump on that channel in the event (the release's, as a
	// rule). It keeps the smooth decay out: for a sinusoid of amplitude X
	// the jump measure leaves about X (omega dt)^3 / 2, under 0.008 X for
	// modes up to 4 Hz logged at 100 Hz or faster, while a step of the pans
	// makes a jump of the order of the release's.
	stepShare = 0.1
	// stepGuard: a step is the largest jump measure within this many
	// samples either side; a step's own side lobes (minus half its jump,
	// one sample either side) are not steps of their own.
	stepGuard = 2
)

// jumpAt returns the jump of x between samples i-1 and i beyond the smooth
// motion: the first difference d_i = x_i - x_{i-1} less the mean of its
// neighbours, d_i - (d_{i-1} + d_{i+1})/2 = 1.5 x_i - 1.5 x_{i-1} +
// 0.5 x_{i-2} - 0.5 x_{i+1}. It vanishes on any quadratic in time, returns
// J for a step of J between i-1 and i (and -J/2 one sample either side),
// and carries sqrt(5) times the sd of white noise on x. It needs
// 2 <= i <= len(x)-2.
func jumpAt(x []float64, i int) float64 {
	return 1.5*(x[i]-x[i-1]) + 0.5*(x[i-2]-x[i+1])
}

// findSteps returns the steps of the pans in the event that starts at
// sample release and ends before rest: release itself, then every later
// sample i at which, on some channel c, the jump measure jumpAt exceeds both
// thresholdK times its noise sd (sqrt(5) sd[c], sd from noiseSD) and
// stepShare times the largest jump on channel c over the event, and which
// carries the largest such score (jump over the larger of the two
// thresholds, taken over the channels) within stepGuard samples either
// side. A step of the pans makes the body's acceleration jump at once (the
// springs' new static deflection and the dampers' impulse), which no free
// decay does; a spike in the log inside the event counts as a step too, so
// the fit starts after it.
func findSteps(channels [][]float64, sd []float64, release, rest int, thresholdK float64) []int {
	steps := []int{release}
	// jumpAt over [lo, hi); Detect's release lies at least its rest length
	// (8 samples or more) into the log, so jumpAt reaches back far enough.
	lo, hi := release, min(rest, len(channels[0])-1)
	if hi-lo <= stepGuard {
		return steps
	}
	floor := make([]float64, len(channels))
	for c, x := range channels {
		largest := 0.0
		for i := lo; i < hi; i++ {
			largest = math.Max(largest, math.Abs(jumpAt(x, i)))
		}
		floor[c] = math.Max(thresholdK*math.Sqrt(5)*sd[c], stepShare*largest)
	}
	score := make([]float64, hi-lo)
	for k := range score {
		for c, x := range channels {
			score[k] = math.Max(score[k], math.Abs(jumpAt(x, lo+k))/floor[c])
		}
	}
	for k := 1; k < len(score); k++ { // score[0] is the release
		if score[k] <= 1 {
			continue
		}
		top := true // of equal scores, the earliest counts
		for j := max(k-stepGuard, 0); j <= min(k+stepGuard, len(score)-1) && top; j++ {
			top = j == k || score[j] < score[k] || (j > k && score[j] == score[k])
		}
		if top {
			steps = append(steps, lo+k)
		}
	}
	return steps
}

// checkChannels panics on caller mistakes in the shape of the data.
func checkChannels(rateHz float64, channels [][]float64) {
	if !(rateHz > 0) || math.IsInf(rateHz, 0) {
		panic(fmt.Sprintf("decay: sample rate %g Hz; give a positive finite rate", rateHz))
	}
	if len(channels) == 0 {
		panic("decay: no channels")
	}
	for c, x := range channels {
		if len(x) != len(channels[0]) {
			panic(fmt.Sprintf("decay: channel %d has %d samples, channel 0 has %d", c, len(x), len(channels[0])))
		}
	}
}

// noiseBlock is the length, in samples, of the blocks over which noiseSD
// measures the noise.
const noiseBlock = 64

// noiseSD returns a robust estimate of the white-noise standard deviation of
// x: the first differences (offsets and drift cancel in them; a difference
// of two independent samples has twice the variance) are cut into blocks of
// noiseBlock, each block gives its RMS over sqrt(2), and the median over the
// blocks is the estimate. Blocks in motion give larger values and are
// outvoted as long as more than half the log is at rest.
func noiseSD(x []float64) float64 {
	var per []float64
	for a := 1; a < len(x); a += noiseBlock {
		b := min(a+noiseBlock, len(x))
		var ss float64
		for i := a; i < b; i++ {
			ss += (x[i] - x[i-1]) * (x[i] - x[i-1])
		}
		per = append(per, math.Sqrt(ss/float64(2*(b-a))))
	}
	return median(per)
}

// median returns the median of x, reordering x.
func median(x []float64) float64 {
	sort.Float64s(x)
	m := len(x) / 2
	if len(x)%2 == 1 {
		return x[m]
	}
	return (x[m-1] + x[m]) / 2
}

// prefixWindows gives the mean and variance of any stretch of each channel
// in O(1) from running sums of x - x[0] (the shift keeps large offsets from
// cancelling digits).
type prefixWindows struct {
	s1, s2 [][]float64 // s1[c][i] = sum over [0, i) of (x - x0)
	x0     []float64
}

func newPrefixWindows(channels [][]float64) prefixWindows {
	p := prefixWindows{s1: make([][]float64, len(channels)), s2: make([][]float64, len(channels)),
		x0: make([]float64, len(channels))}
	for c, x := range channels {
		p.x0[c] = x[0]
		p.s1[c] = make([]float64, len(x)+1)
		p.s2[c] = make([]float64, len(x)+1)
		for i, v := range x {
			d := v - x[0]
			p.s1[c][i+1] = p.s1[c][i] + d
			p.s2[c][i+1] = p.s2[c][i] + d*d
		}
	}
	return p
}

// mean of channel c over [a, b).
func (p prefixWindows) mean(c, a, b int) float64 {
	return p.x0[c] + (p.s1[c][b]-p.s1[c][a])/float64(b-a)
}

// variance (population) of channel c over [a, b).
func (p prefixWindows) variance(c, a, b int) float64 {
	m := float64(b - a)
	s := p.s1[c][b] - p.s1[c][a]
	return math.Max((p.s2[c][b]-p.s2[c][a])/m-(s/m)*(s/m), 0)
}
