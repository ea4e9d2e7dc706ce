package spectral

import (
	"errors"
	"fmt"
	"math"
	"math/bits"
)

// Defaults for the resolution choice.
const (
	// DefaultMinAverages is the least effective number of averages accepted:
	// 20 keeps the random error of a PSD near 22 % and of |H| at coherence
	// 0.9 near 5 %.
	DefaultMinAverages = 20
	// DefaultMaxBias is the largest accepted magnitude of the expected
	// resolution bias at the peak, 2 %.
	DefaultMaxBias = 0.02
	// DefaultAssumedDamping is used when no half-power width can be found:
	// the low end of the body-mode range 0.2-0.4 (common practice), so the
	// resolution errs on the fine side.
	DefaultAssumedDamping = 0.2
)

// BankConfig sets up a Bank of Welch estimates with candidate segment
// lengths MinSegmentLen, 2 MinSegmentLen, ..., MaxSegmentLen (powers of two),
// all at 50 % overlap.
type BankConfig struct {
	FsHz          float64
	MinSegmentLen int // zero means 64
	MaxSegmentLen int // zero means 16384
	Window        Window
	Workers       int
}

// Bank runs Accumulators for several candidate segment lengths side by side
// on one stream, so the resolution can be chosen after a single pass in
// constant memory.
type Bank struct {
	accs []*Accumulator
}

// NewBank returns a Bank for the named channels.
func NewBank(cfg BankConfig, channels []string) (*Bank, error) {
	if cfg.MinSegmentLen == 0 {
		cfg.MinSegmentLen = 64
	}
	if cfg.MaxSegmentLen == 0 {
		cfg.MaxSegmentLen = 16384
	}
	for _, n := range []int{cfg.MinSegmentLen, cfg.MaxSegmentLen} {
		if n < 2 || bits.OnesCount(uint(n)) != 1 {
			return nil, fmt.Errorf("spectral: candidate segment length %d is not a power of two >= 2", n)
		}
	}
	if cfg.MinSegmentLen > cfg.MaxSegmentLen {
		return nil, fmt.Errorf("spectral: shortest candidate segment %d exceeds the longest %d", cfg.MinSegmentLen, cfg.MaxSegmentLen)
	}
	b := &Bank{}
	for n := cfg.MinSegmentLen; n <= cfg.MaxSegmentLen; n *= 2 {
		acc, err := NewAccumulator(Config{FsHz: cfg.FsHz, SegmentLen: n, Overlap: n / 2,
			Window: cfg.Window, Workers: cfg.Workers}, channels)
		if err != nil {
			return nil, err
		}
		b.accs = append(b.accs, acc)
	}
	return b, nil
}

// Write passes the block to every candidate.
func (b *Bank) Write(block [][]float64) {
	for _, a := range b.accs {
		a.Write(block)
	}
}

// SetRate replaces the sample rate of every candidate (see
// Accumulator.SetRate).
func (b *Bank) SetRate(fsHz float64) error {
	for _, a := range b.accs {
		if err := a.SetRate(fsHz); err != nil {
			return err
		}
	}
	return nil
}

// ChoiceOptions tune Bank.Choose. The zero value selects the defaults.
type ChoiceOptions struct {
	BandHz         [2]float64 // band holding the body modes; required
	MinAverages    float64
	MaxBias        float64
	AssumedDamping float64
	FRF            FRFOptions // used for the quick FRFs
}

// Choice is the chosen resolution with the figures and reasons behind it.
type Choice struct {
	SegmentLen        int
	ResolutionHz      float64 // fs/N
	NoiseBandwidthHz  float64 // Be of the window at this length
	Segments          int
	EffectiveAverages float64
	PeakHz            float64 // peak of the quick estimate
	DampingRatio      float64 // from the half-power width, or assumed
	DampingAssumed    bool
	HalfPowerHz       float64 // Br = 2 zeta fn
	// ResolutionBias is the expected relative bias of the peak magnitude,
	// -(1/3)(Be/Br)^2 (negative: peaks are underestimated).
	ResolutionBias float64
	Reasons        []string
	Warnings       []Warning
}

// Choose picks the segment length and returns it with its spectra.
//
// Rule: (1) candidates with at least MinAverages effective averages are
// adequate (if none is, the coarsest is taken with a warning). (2) A quick
// damping estimate: the half-power width of the band peak of the sum of |H|
// over all output/input pairs (of the output amplitude spectra sqrt(G_yy)
// when there are no inputs), with the exact single-mode relations of a
// receptance-type peak, q = (f2^2 - f1^2)/(f2^2 + f1^2),
// zeta^2 = (1 - 1/sqrt(1 + q^2))/2, fn^2 = (f1^2 + f2^2)/(2(1 - 2 zeta^2))
// [derived]; it starts on the coarsest adequate candidate. (3) The choice is
// the shortest adequate candidate whose expected bias (1/3)(Be/Br)^2, with
// Br = 2 zeta fn and Be the window's noise bandwidth, is at most MaxBias;
// (4) the damping is re-estimated on the chosen candidate and (3) repeated
// until the choice no longer changes (estimate, then refine: the coarse
// spectra widen peaks and overstate zeta). If no adequate candidate meets
// the bias bound the finest adequate one is taken and a WarnShortRecord
// warning states the record length both would need. Two overlapping modes
// show one merged peak whose width overstates zeta: the rule then errs on
// the coarse side, which the bias margin absorbs only partly.
//
// References:
//   - J. S. Bendat and A. G. Piersol, Random Data, 4th ed., Wiley, 2010,
//     Sec. 8.5.1: resolution bias of a spectral peak about
//     -(1/3)(Be/Br)^2 (from memory).
//   - F. J. Harris, "On the use of windows for harmonic analysis with the
//     discrete Fourier transform", Proc. IEEE 66(1):51-83, 1978 (noise
//     bandwidth, 1.5 bins for Hann).
func (b *Bank) Choose(inputs, outputs []int, opt ChoiceOptions) (*Choice, *Spectra, error) {
	if opt.BandHz[1] <= opt.BandHz[0] {
		panic("spectral: Choose needs a band [lo, hi] with hi > lo")
	}
	if opt.MinAverages == 0 {
		opt.MinAverages = DefaultMinAverages
	}
	if opt.MaxBias == 0 {
		opt.MaxBias = DefaultMaxBias
	}
	if opt.AssumedDamping == 0 {
		opt.AssumedDamping = DefaultAssumedDamping
	}
	if opt.FRF.BandHz == [2]float64{} {
		opt.FRF.BandHz = opt.BandHz
	}
	var specs []*Spectra
	for _, a := range b.accs {
		s, err := a.Spectra()
		if err != nil && !errors.Is(err, ErrTooShort) {
			return nil, nil, err
		}
		specs = append(specs, s) // nil when too short
	}
	c := &Choice{}
	var adequate []int
	for k, s := range specs {
		if s != nil && s.EffectiveAverages >= opt.MinAverages {
			adequate = append(adequate, k)
		}
	}
	if len(adequate) == 0 {
		if specs[0] == nil {
			return nil, nil, &ShortRecordError{Samples: b.accs[0].samples, SegmentLen: b.accs[0].cfg.SegmentLen, Need: 2}
		}
		s := specs[0]
		c.Warnings = append(c.Warnings, Warning{Code: WarnFewAverages, Message: fmt.Sprintf(
			"even the shortest candidate segment (%d samples) gives only %.1f effective averages, fewer than %g: error bands are wide; record longer",
			s.SegmentLen, s.EffectiveAverages, opt.MinAverages)})
		adequate = []int{0}
	}
	c.Reasons = append(c.Reasons, fmt.Sprintf("%d of %d candidate segment lengths give at least %g effective averages",
		len(adequate), len(specs), opt.MinAverages))
	est := adequate[0]
	chosen := -1
	for iter := 0; iter < len(specs); iter++ {
		s := specs[est]
		fnHz, zeta, ok, err := quickDamping(s, inputs, outputs, opt)
		if err != nil {
			return nil, nil, err
		}
		c.DampingAssumed = !ok
		if ok {
			c.PeakHz, c.DampingRatio = fnHz, zeta
			c.Reasons = append(c.Reasons, fmt.Sprintf("half-power width on N=%d (%.4g Hz bins): peak %.4g Hz, zeta %.3f",
				s.SegmentLen, s.ResolutionHz(), fnHz, zeta))
		} else {
			c.PeakHz, c.DampingRatio = fnHz, opt.AssumedDamping
			msg := fmt.Sprintf("no half-power points inside %.3g-%.3g Hz on N=%d: zeta %.2g assumed (low end of the body-mode range)",
				opt.BandHz[0], opt.BandHz[1], s.SegmentLen, opt.AssumedDamping)
			c.Reasons = append(c.Reasons, msg)
		}
		pick := -1
		for _, k := range adequate {
			if resolutionBias(specs[k].NoiseBandwidthHz, c.halfPowerHz()) <= opt.MaxBias {
				pick = k
				break
			}
		}
		if pick < 0 {
			pick = adequate[len(adequate)-1]
		}
		if pick == chosen || pick == est {
			chosen = pick
			break
		}
		chosen, est = pick, pick
	}
	s := specs[chosen]
	c.SegmentLen, c.ResolutionHz, c.NoiseBandwidthHz = s.SegmentLen, s.ResolutionHz(), s.NoiseBandwidthHz
	c.Segments, c.EffectiveAverages = s.Segments, s.EffectiveAverages
	c.HalfPowerHz = c.halfPowerHz()
	bias := resolutionBias(s.NoiseBandwidthHz, c.HalfPowerHz)
	c.ResolutionBias = -bias
	c.Reasons = append(c.Reasons, fmt.Sprintf(
		"chose N=%d: resolution %.4g Hz, noise bandwidth Be %.4g Hz against half-power bandwidth Br = 2 zeta fn = %.4g Hz, expected peak bias %.2g %% (limit %.2g %%), %d segments, %.1f effective averages",
		s.SegmentLen, c.ResolutionHz, s.NoiseBandwidthHz, c.HalfPowerHz, -100*bias, 100*opt.MaxBias, s.Segments, s.EffectiveAverages))
	if bias > opt.MaxBias {
		// Needed: Be <= Br sqrt(3 MaxBias), i.e. N >= noise-bandwidth-bins fs / that.
		beNeedHz := c.HalfPowerHz * math.Sqrt(3*opt.MaxBias)
		nNeed := noiseBandwidthBinsOf(s) * s.FsHz / beNeedHz
		// Segments for MinAverages at 50 % overlap: nd ~ K/1.056 for Hann
		// (Welch 1967), so about 1.06 MinAverages + 1 segments.
		kNeed := math.Ceil(1.06*opt.MinAverages) + 1
		recordS := nNeed * (1 + (kNeed-1)/2) / s.FsHz
		c.Warnings = append(c.Warnings, Warning{Code: WarnShortRecord, Message: fmt.Sprintf(
			"record too short for both resolution and averaging: at %.1f effective averages the expected peak bias is %.2g %%; about %.0f s of record would give %.2g %% with %g averages",
			s.EffectiveAverages, 100*bias, recordS, 100*opt.MaxBias, opt.MinAverages)})
	}
	return c, s, nil
}

func (c *Choice) halfPowerHz() float64 { return 2 * c.DampingRatio * c.PeakHz }

func noiseBandwidthBinsOf(s *Spectra) float64 { return s.NoiseBandwidthHz / s.ResolutionHz() }

// resolutionBias is the magnitude (1/3)(Be/Br)^2 of the expected relative
// bias of a spectral peak (Bendat & Piersol, 4th ed., 2010, Sec. 8.5.1, from
// memory).
func resolutionBias(beHz, brHz float64) float64 {
	r := beHz / brHz
	return r * r / 3
}

// quickDamping returns the peak frequency and the half-power damping of the
// summed FRF magnitude (or output amplitude spectra) in the band.
func quickDamping(s *Spectra, inputs, outputs []int, opt ChoiceOptions) (fnHz, zeta float64, ok bool, err error) {
	mag := make([]float64, len(s.FreqsHz))
	if len(inputs) > 0 {
		set, err := EstimateFRF(s, inputs, outputs, opt.FRF)
		if err != nil {
			return 0, 0, false, err
		}
		for _, row := range set.Pairs {
			for _, p := range row {
				for f, h := range p.H {
					if a := math.Hypot(real(h), imag(h)); !math.IsNaN(a) {
						mag[f] += a
					}
				}
			}
		}
	} else {
		for _, o := range outputs {
			for f, g := range s.G {
				mag[f] += math.Sqrt(real(g[o][o]))
			}
		}
	}
	fnHz, zeta, ok = halfPower(s.FreqsHz, mag, opt.BandHz)
	return fnHz, zeta, ok, nil
}

// halfPower finds the largest peak of mag inside bandHz and its half-power
// points f1 < f2 (mag = peak/sqrt(2), linear interpolation), and returns
// the natural frequency and damping ratio of a receptance-type single mode
// with those points: q = (f2^2 - f1^2)/(f2^2 + f1^2),
// zeta^2 = (1 - 1/sqrt(1+q^2))/2, fn^2 = (f1^2 + f2^2)/(2(1 - 2 zeta^2))
// [derived: solving |1/(1 - r^2 + 2i zeta r)|^2 = 1/(2 |peak|^2)]. ok is
// false (fnHz still the peak) when a half-power point lies outside the band.
func halfPower(freqsHz, mag []float64, bandHz [2]float64) (fnHz, zeta float64, ok bool) {
	peak := -1
	for f, fHz := range freqsHz {
		if InBand(bandHz, fHz) && (peak < 0 || mag[f] > mag[peak]) {
			peak = f
		}
	}
	if peak < 0 {
		return math.NaN(), 0, false
	}
	level := mag[peak] / math.Sqrt2
	cross := func(step int) (float64, bool) {
		for f := peak; f+step >= 0 && f+step < len(mag); f += step {
			g := f + step
			if freqsHz[g] < bandHz[0] || freqsHz[g] > bandHz[1] {
				return 0, false
			}
			if mag[g] < level {
				t := (mag[f] - level) / (mag[f] - mag[g])
				return freqsHz[f] + t*(freqsHz[g]-freqsHz[f]), true
			}
		}
		return 0, false
	}
	f1, ok1 := cross(-1)
	f2, ok2 := cross(+1)
	if !ok1 || !ok2 || f1 <= 0 {
		return freqsHz[peak], 0, false
	}
	q := (f2*f2 - f1*f1) / (f2*f2 + f1*f1)
	z2 := (1 - 1/math.Sqrt(1+q*q)) / 2
	return math.Sqrt((f1*f1 + f2*f2) / (2 * (1 - 2*z2))), math.Sqrt(z2), true
}
