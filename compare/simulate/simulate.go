package simulate

import (
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"time"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// Drive kinds for a rig test.
const (
	// DriveRandom: independent band-limited Gaussian noise at the front and rear pans.
	DriveRandom = "random"
	// DriveSweep: a logarithmic sine sweep over the band, front and rear in
	// phase for the first half of the record and in anti-phase for the second,
	// so that both inputs are identifiable.
	DriveSweep = "sweep"
	// DriveRoad: band-limited noise at the front, the same noise delayed by
	// wheelbase/speed at the rear, as on a road (the inputs are correlated).
	DriveRoad = "road"
)

// Unit choices for the written channels.
const (
	UnitsSI    = "m/s^2"
	UnitsG     = "g"
	UnitsMixed = "mixed" // channels alternate g and m/s^2, starting with g
)

// Options are the test conditions; Defaults gives them for each test.
// The rig fields (Drive to RoadSpeedMPerS) are ignored by a drop and the
// drop fields by a rig test, so one Options can hold both.
type Options struct {
	// DurationS is the log's length in s; Run takes 0 as the test's default.
	DurationS     float64
	RateHz        float64
	Seed          uint64
	NoiseFraction float64 // noise standard deviation / channel RMS (rig) or peak (drop)
	// NoiseSDMPerS2 is an absolute noise standard deviation in m/s^2, the
	// same on every channel (a sensor's noise floor at RateHz), used
	// instead of NoiseFraction; give one or the other.
	NoiseSDMPerS2 float64
	OffsetMPerS2  float64 // DC offset added to every channel
	Units         string  // UnitsSI, UnitsG or UnitsMixed

	Drive          string  // DriveRandom, DriveSweep or DriveRoad
	BandLowHz      float64 // drive band, lower edge
	BandHighHz     float64 // drive band, upper edge
	DriveRMSMPerS2 float64 // RMS pan acceleration of each axle's drive
	RoadSpeedMPerS float64 // DriveRoad only

	DropHeightM float64 // drop only: height of the blocks
	PreTriggerS float64 // drop only: rest before the release
	// RearDelayS (drop only, s, >= 0) is how long after the front axle the
	// rear axle drops, as when the car is rolled forward off the blocks
	// (wheelbase / rolling speed). 0, the default, drops both axles at once.
	// It need not be a whole number of samples; the rear step must fall at
	// or before the last sample.
	RearDelayS float64

	// TestDate, when not empty, is a calendar date (YYYY-MM-DD) written
	// into the log's notes as its test date, where a logger would put it;
	// the report shows the first date of a log's notes.
	TestDate string
}

// Defaults returns the default options for test "rig" or "drop".
func Defaults(test string) Options {
	o := Options{RateHz: 200, Seed: 1, Units: UnitsSI}
	if test == "drop" {
		o.DurationS, o.DropHeightM, o.PreTriggerS = 10, 0.04, 1
		return o
	}
	o.DurationS, o.Drive, o.BandLowHz, o.BandHighHz, o.DriveRMSMPerS2, o.RoadSpeedMPerS =
		300, DriveRandom, 0.5, 8, 2, 15
	return o
}

// isDate reports whether s is a calendar date written YYYY-MM-DD.
func isDate(s string) bool {
	_, err := time.Parse(time.DateOnly, s)
	return err == nil
}

// notes returns a synthetic log's notes: what was simulated, that it is
// not a measurement, and the test date when one was given.
func (o *Options) notes(what string) []string {
	ns := []string{what, "synthetic data from the design model in the setup file; not a measurement"}
	if o.TestDate != "" {
		ns = append(ns, "test date "+o.TestDate+" (given to simulate)")
	}
	return ns
}

// Log is a synthetic log: notes for the file's header and the columns in SI.
type Log struct {
	Notes   []string
	RateHz  float64
	Columns []ingest.LogColumn
}

// Write writes the log as CSV in the dialect package ingest reads
// (ingest.WriteLog: the notes, a time column from 0 s, the channels).
func (l *Log) Write(w io.Writer) error {
	return ingest.WriteLog(w, l.Notes, l.RateHz, 0, l.Columns)
}

// WriteFile writes the log to path atomically (ingest.WriteAtomic).
func (l *Log) WriteFile(path string) error {
	return ingest.WriteAtomic(path, l.Write)
}

// ErrUndamped is matched (errors.Is) by the refusal to simulate a car
// without damping.
var ErrUndamped = errors.New("a car needs damping at both axles to be simulated")

// checkCar refuses a car that cannot be simulated as a car: without damping
// at both axles the response to a rig drive at a body mode has no bound and
// a drop never decays, so no log of it can be analysed.
func checkCar(v compare.Vehicle) error {
	if err := v.Validate(); err != nil {
		return err
	}
	if !(v.FrontDampingNsPerM > 0 && v.RearDampingNsPerM > 0) {
		return fmt.Errorf("%w: without it the body's response "+
			"to a rig drive has no bound and a drop never decays, so analyze could not use the log; give "+
			"front_damping_ns_per_m and rear_damping_ns_per_m in [vehicle] (N s/m, both wheels of the axle)", ErrUndamped)
	}
	return nil
}

// check refuses options outside what the flags allow, with an
// *compare.OptionError that names the flag.
func (o *Options) check(rig bool) error {
	bad := compare.OptionErrorf
	switch {
	case !(o.RateHz > 0) || math.IsInf(o.RateHz, 0):
		return bad("--rate takes the sample rate in Hz, a positive number (got %g)", o.RateHz)
	case !(o.DurationS > 0) || math.IsInf(o.DurationS, 0):
		return bad("--duration takes the log's length in s, a positive number (got %g)", o.DurationS)
	case o.DurationS*o.RateHz < 16:
		return bad("--duration %g s at --rate %g Hz gives fewer than 16 samples; log longer or faster", o.DurationS, o.RateHz)
	case o.DurationS*o.RateHz > 1e9:
		return bad("--duration %g s at --rate %g Hz is over 1e9 samples; log shorter or slower", o.DurationS, o.RateHz)
	case !(o.NoiseFraction >= 0) || o.NoiseFraction > 1:
		return bad("--noise is a fraction from 0 to 1 of each channel's RMS (rig) or peak (drop), e.g. 0.05 for 5 %% (got %g)", o.NoiseFraction)
	case !(o.NoiseSDMPerS2 >= 0) || math.IsInf(o.NoiseSDMPerS2, 0):
		return bad("the noise standard deviation must be zero or positive and finite (got %g m/s^2)", o.NoiseSDMPerS2)
	case o.NoiseSDMPerS2 > 0 && o.NoiseFraction > 0:
		return bad("give the noise as a fraction of each channel's level (--noise) or as an absolute standard deviation, not both")
	case math.IsNaN(o.OffsetMPerS2) || math.IsInf(o.OffsetMPerS2, 0):
		return bad("--offset takes a finite number in m/s^2")
	case o.Units != UnitsSI && o.Units != UnitsG && o.Units != UnitsMixed:
		return bad("--units takes %q, %q or %q (got %q; units are case-sensitive: g is the standard acceleration of gravity)",
			UnitsSI, UnitsG, UnitsMixed, o.Units)
	case o.TestDate != "" && !isDate(o.TestDate):
		return bad("--test-date takes a calendar date as YYYY-MM-DD, such as 2031-05-04 (got %q)", o.TestDate)
	}
	if !rig {
		if !(o.DropHeightM > 0) || o.DropHeightM > 0.5 {
			return bad("--drop-height takes the blocks' height in m, above 0 and at most 0.5 (got %g)", o.DropHeightM)
		}
		if !(o.PreTriggerS >= 0) || o.PreTriggerS >= o.DurationS {
			return bad("--pre-trigger takes the rest before the release in s, from 0 to less than --duration %g s (got %g)", o.DurationS, o.PreTriggerS)
		}
		if !(o.RearDelayS >= 0) || math.IsInf(o.RearDelayS, 0) {
			return bad("--rear-delay takes a time in s, zero or positive (got %g)", o.RearDelayS)
		}
		return nil
	}
	nyq := o.RateHz / 2
	switch {
	case o.Drive != DriveRandom && o.Drive != DriveSweep && o.Drive != DriveRoad:
		return bad("--drive takes %q, %q or %q (got %q)", DriveRandom, DriveSweep, DriveRoad, o.Drive)
	case !(o.BandLowHz > 0) || !(o.BandHighHz > o.BandLowHz):
		return bad("the drive band needs 0 < --drive-band-low < --drive-band-high (got %g to %g Hz)", o.BandLowHz, o.BandHighHz)
	case o.BandHighHz >= nyq:
		return bad("--drive-band-high %g Hz must lie below the Nyquist frequency %g Hz of --rate %g Hz", o.BandHighHz, nyq, o.RateHz)
	case !(o.DriveRMSMPerS2 > 0) || math.IsInf(o.DriveRMSMPerS2, 0):
		return bad("--drive-rms takes the pans' RMS acceleration in m/s^2, a positive number (got %g)", o.DriveRMSMPerS2)
	case o.Drive == DriveRoad && !(o.RoadSpeedMPerS > 0):
		return bad("--road-speed takes the speed of a road drive in m/s, a positive number (got %g)", o.RoadSpeedMPerS)
	}
	return nil
}

// Run simulates test ("rig" or "drop") of the car that setup describes,
// with its sensors (and, for a rig test, its inputs): Rig or Drop after the
// checks. A DurationS of 0 takes the test's default. Mistakes in test or o
// are *compare.OptionError; a setup that cannot give a log (no sensors, no
// damping) is an error that names the file.
func Run(setup *ingest.Setup, test string, o Options) (*Log, error) {
	if test != "rig" && test != "drop" {
		return nil, compare.OptionErrorf(`--test takes "rig" or "drop" (got %q)`, test)
	}
	if err := setup.CheckForLog(); err != nil {
		return nil, err
	}
	if o.DurationS == 0 {
		o.DurationS = Defaults(test).DurationS
	}
	v := compare.DesignOf(setup.Vehicle)
	var log *Log
	var err error
	if test == "rig" {
		log, err = Rig(v, setup.Sensors, setup.Inputs, o)
	} else {
		log, err = Drop(v, setup.Sensors, o)
	}
	var oe *compare.OptionError
	if err != nil && !errors.As(err, &oe) {
		return nil, fmt.Errorf("%s: %w", setup.Path, err)
	}
	return log, err
}

// smoothLength returns the least n' >= n whose prime factors are 2, 3 and 5,
// a length the FFT handles fast.
func smoothLength(n int) int {
	for m := n; ; m++ {
		k := m
		for _, p := range []int{2, 3, 5} {
			for k%p == 0 {
				k /= p
			}
		}
		if k == 1 {
			return m
		}
	}
}

func unitFor(units string, i int) string {
	switch units {
	case UnitsMixed:
		if i%2 == 0 {
			return "g"
		}
		return "m/s^2"
	default:
		return units
	}
}

// Rig simulates a rig test: each [[input]] channel logs its axle's pan
// acceleration, each [[sensor]] the body's vertical acceleration at its x_m.
func Rig(v compare.Vehicle, sensors []ingest.Sensor, inputs []ingest.Input, o Options) (*Log, error) {
	if err := checkCar(v); err != nil {
		return nil, err
	}
	if err := o.check(true); err != nil {
		return nil, err
	}
	if len(inputs) == 0 {
		return nil, errors.New("a rig test needs the pans' channels as [[input]] tables in the setup (channel, axle); for a drop, give --test drop")
	}
	n := int(math.Round(o.DurationS * o.RateHz))
	nfft := smoothLength(n)
	fft := fourier.NewFFT(nfft)
	rng := rand.New(rand.NewPCG(o.Seed, 0x72696465)) // second word: fixed stream id

	uf, ur := drive(fft, o, v.WheelbaseM(), rng)
	// Scale each axle's drive to the requested RMS over the written record.
	for _, u := range []*[]float64{&uf, &ur} {
		g := o.DriveRMSMPerS2 / rms((*u)[:n])
		for i := range *u {
			(*u)[i] *= g
		}
	}
	Uf := fft.Coefficients(nil, uf)
	Ur := fft.Coefficients(nil, ur)

	log := &Log{RateHz: o.RateHz, Notes: o.notes(fmt.Sprintf(
		"ridemodes simulate: rig test, %s drive %g-%g Hz, %g m/s^2 RMS per axle, %g s at %g Hz, seed %d, noise %g, offset %g m/s^2",
		o.Drive, o.BandLowHz, o.BandHighHz, o.DriveRMSMPerS2, o.DurationS, o.RateHz, o.Seed, o.NoiseFraction, o.OffsetMPerS2))}
	for _, in := range inputs {
		src := uf
		if in.Axle == "rear" {
			src = ur
		}
		log.Columns = append(log.Columns, ingest.LogColumn{Name: in.Channel, Data: append([]float64(nil), src[:n]...)})
	}
	Y := make([]complex128, len(Uf))
	y := make([]float64, nfft)
	for _, s := range sensors {
		for k := range Uf {
			hf, hr := v.Transmissibility(fft.Freq(k)*o.RateHz, s.XM)
			Y[k] = hf*Uf[k] + hr*Ur[k]
		}
		fft.Sequence(y, Y)
		out := make([]float64, n)
		for i := range out {
			out[i] = y[i] / float64(nfft)
		}
		log.Columns = append(log.Columns, ingest.LogColumn{Name: s.Channel, Data: out})
	}
	finish(log, o, rng, rms)
	return log, nil
}

// drive returns the front and rear pan accelerations over nfft samples
// (unscaled), periodic over nfft, with no energy outside the band.
func drive(fft *fourier.FFT, o Options, wheelbaseM float64, rng *rand.Rand) (uf, ur []float64) {
	nfft := fft.Len()
	if o.Drive == DriveSweep {
		return sweep(nfft, o)
	}
	F := make([]complex128, nfft/2+1)
	R := make([]complex128, nfft/2+1)
	delayS := wheelbaseM / o.RoadSpeedMPerS
	for k := range F {
		f := fft.Freq(k) * o.RateHz
		if f < o.BandLowHz || f > o.BandHighHz || k == 0 || 2*k == nfft {
			continue
		}
		F[k] = complex(rng.NormFloat64(), rng.NormFloat64())
		if o.Drive == DriveRoad {
			R[k] = F[k] * complex(math.Cos(2*math.Pi*f*delayS), -math.Sin(2*math.Pi*f*delayS))
		} else {
			R[k] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
	}
	return fft.Sequence(nil, F), fft.Sequence(nil, R)
}

// sweep returns a logarithmic sine sweep from BandLowHz to BandHighHz in each
// half of nfft samples (front and rear in phase, then in anti-phase), with
// half-second cosine tapers at the ends of each sweep. Its energy outside the
// band is small but not zero.
func sweep(nfft int, o Options) (uf, ur []float64) {
	uf = make([]float64, nfft)
	ur = make([]float64, nfft)
	half := nfft / 2
	T := float64(half) / o.RateHz
	k := math.Log(o.BandHighHz / o.BandLowHz)
	taper := math.Min(0.5*o.RateHz, float64(half)/4)
	for i := 0; i < half; i++ {
		t := float64(i) / o.RateHz
		phase := 2 * math.Pi * o.BandLowHz * T / k * (math.Exp(t/T*k) - 1)
		w := 1.0
		if e := math.Min(float64(i), float64(half-1-i)); e < taper {
			w = 0.5 * (1 - math.Cos(math.Pi*e/taper))
		}
		s := w * math.Sin(phase)
		uf[i], ur[i] = s, s
		uf[half+i], ur[half+i] = s, -s
	}
	return uf, ur
}

func rms(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s / float64(len(x)))
}

func peak(x []float64) float64 {
	var p float64
	for _, v := range x {
		p = math.Max(p, math.Abs(v))
	}
	return p
}

// finish adds noise (sized by level of the clean channel, or absolute) and the offset to
// every channel, in column order, and assigns the units.
func finish(log *Log, o Options, rng *rand.Rand, level func([]float64) float64) {
	for i := range log.Columns {
		c := &log.Columns[i]
		c.Unit = unitFor(o.Units, i)
		sd := o.NoiseFraction * level(c.Data)
		if o.NoiseSDMPerS2 > 0 {
			sd = o.NoiseSDMPerS2
		}
		for j := range c.Data {
			if sd > 0 {
				c.Data[j] += sd * rng.NormFloat64()
			}
			c.Data[j] += o.OffsetMPerS2
		}
	}
}

// Drop simulates a drop test: the car rests on blocks for PreTriggerS, then
// its axles drop by DropHeightM (a step of the pans) and the body decays
// freely. With RearDelayS = 0 both axles drop at once; otherwise the front
// pan steps at the release and the rear pan RearDelayS later, as when the
// car is rolled forward off the blocks. Each [[sensor]] logs the body's
// vertical acceleration at its x_m; nothing is logged at the pans.
//
// The propagation is exact. A step du of the pans at rest moves the static
// equilibrium by K^-1 Kin du and gives the body the velocity M^-1 Cin du
// through the dampers; measured from the new equilibrium, the state just
// after it is compare.Vehicle.StepState(du). Between steps the state x,
// measured from the current equilibrium, moves by the transition matrix:
// x(t + dt) = exp(A dt) x(t). The front step gives x = StepState(-h, 0)
// from the equilibrium on the front wheels and the blocks at the rear. At
// the rear step the body's position does not change, but the
// equilibrium moves by K^-1 Kin (0, -h) and the dampers add M^-1 Cin (0, -h)
// to the velocity, so x(tau+) = x(tau-) + StepState(0, -h): linearity makes
// the jump the same as that of a rear step from rest. A rear step between
// two samples, a fraction f of a sample after the earlier one, is
// propagated over that sample in two exact parts, exp(A f dt) then the jump
// then exp(A (1-f) dt); a sample that falls on a step logs the state just
// after it, as the release sample does. The acceleration logged is that of
// the state matrix, A x, the pans being at rest between steps.
func Drop(v compare.Vehicle, sensors []ingest.Sensor, o Options) (*Log, error) {
	if err := checkCar(v); err != nil {
		return nil, err
	}
	if err := o.check(false); err != nil {
		return nil, err
	}
	n := int(math.Round(o.DurationS * o.RateHz))
	i0 := int(math.Round(o.PreTriggerS * o.RateHz))
	dt := 1 / o.RateHz
	A := v.StateMatrix()
	Phi := transition(A, dt)
	h := o.DropHeightM
	x := v.StepState(-h, -h)
	// The rear step lies frac of a sample after sample rear; rear < 0: no
	// separate rear step.
	rear, frac := -1, 0.0
	var phiBefore, phiAfter *mat.Dense
	if o.RearDelayS > 0 {
		x = v.StepState(-h, 0)
		at := float64(i0) + o.RearDelayS*o.RateHz
		if at > float64(n-1) {
			return nil, compare.OptionErrorf("the rear axle drops at %.6g s, after the log's last sample at %.6g s; "+
				"lengthen --duration or shorten --rear-delay", at*dt, float64(n-1)*dt)
		}
		whole := math.Floor(at)
		rear, frac = int(whole), at-whole
		if frac > 0 {
			phiBefore, phiAfter = transition(A, frac*dt), transition(A, (1-frac)*dt)
		}
	}
	jump := v.StepState(0, -h)
	acc := make([][2]float64, n)
	for i := i0; i < n; i++ {
		if i == rear && frac == 0 {
			x = addStates(x, jump)
		}
		for r := 0; r < 2; r++ {
			for c := 0; c < 4; c++ {
				acc[i][r] += A.At(2+r, c) * x[c]
			}
		}
		if i == rear && frac > 0 {
			x = propagate(phiAfter, addStates(propagate(phiBefore, x), jump))
			continue
		}
		x = propagate(Phi, x)
	}
	note := fmt.Sprintf("ridemodes simulate: drop test, %g m drop at %g s, %g s at %g Hz, seed %d, noise %g, offset %g m/s^2",
		o.DropHeightM, float64(i0)*dt, o.DurationS, o.RateHz, o.Seed, o.NoiseFraction, o.OffsetMPerS2)
	if o.RearDelayS > 0 {
		note = fmt.Sprintf("ridemodes simulate: drop test rolled off the blocks, front %g m drop at %g s, rear axle %g s "+
			"after the front, %g s at %g Hz, seed %d, noise %g, offset %g m/s^2",
			o.DropHeightM, float64(i0)*dt, o.RearDelayS, o.DurationS, o.RateHz, o.Seed, o.NoiseFraction, o.OffsetMPerS2)
	}
	log := &Log{RateHz: o.RateHz, Notes: o.notes(note)}
	for _, s := range sensors {
		w := make([]float64, n)
		for i := range w {
			w[i] = acc[i][0] - s.XM*acc[i][1]
		}
		log.Columns = append(log.Columns, ingest.LogColumn{Name: s.Channel, Data: w})
	}
	rng := rand.New(rand.NewPCG(o.Seed, 0x72696465))
	finish(log, o, rng, peak)
	return log, nil
}

// transition returns exp(A tS), the exact transition matrix of the state
// over tS seconds.
func transition(A *mat.Dense, tS float64) *mat.Dense {
	var At, phi mat.Dense
	At.Scale(tS, A)
	phi.Exp(&At)
	return &phi
}

// propagate returns phi x.
func propagate(phi *mat.Dense, x compare.State) compare.State {
	var next compare.State
	for r := 0; r < 4; r++ {
		for c := 0; c < 4; c++ {
			next[r] += phi.At(r, c) * x[c]
		}
	}
	return next
}

// addStates returns x + y.
func addStates(x, y compare.State) compare.State {
	for r := range x {
		x[r] += y[r]
	}
	return x
}
