package spectral

import (
	"fmt"
	"math"
	"math/bits"
	"sync"
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

// quickMinAverages is the least effective number of averages of the
// spectra the half-power width is read from: with fewer, a noise spike on
// the peak reads as a narrow mode (at 10 averages a PSD's random error is
// 32 %).
const quickMinAverages = DefaultMinAverages

// Constants of the bias-variance choice (ChoiceOptions.DampingErrorScale).
const (
	// dampingBiasCoefficient is beta in the relative damping bias
	// beta (Be/Br)^2 of a fit to Hann-windowed Welch FRFs. Derived: the
	// expected cross spectrum of windowed segments is the true one seen
	// through the window's lag window rho(tau) = 1 - (2 pi^2/3)(tau/T)^2 + ...
	// (Hann), which multiplies a mode's impulse response and so steepens
	// its decay; near the peak that lowers |H| by (4/3)(pi/(T sigma))^2 with
	// sigma = zeta omega_n, i.e. by (4/3)/2.25 (Be/Br)^2 = 0.59 (Be/Br)^2,
	// which the fit reads as extra damping. Measured on 40 seeded 5-minute
	// and 24 hour-long simulated rig logs (identify/modal's resolution bias
	// refit): 0.33-0.73, median 0.6.
	dampingBiasCoefficient = 0.6
	// fewAveragesPenalty is a in the random error's growth (1 + a/nd) as the
	// effective averages nd fall at a fixed record length: a fit to FRFs
	// over more, noisier bins keeps its nominal precision only while every
	// bin's error band (from the estimated coherence) is itself well
	// determined. Measured on the hour-long logs: the RMS damping error of
	// heavily damped modes rose by 16 % from nd = 66 to nd = 16 (a = 8);
	// on 5-minute logs it rose by 45 % from nd = 10 to nd = 4.7.
	fewAveragesPenalty = 8.0
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

// A Recording plays a recorded stream of sample blocks back, in order and
// unchanged, as often as asked (package identify/spool keeps one in bounded
// memory). Replay passes every block to write, which does not keep it;
// replays may run concurrently.
type Recording interface {
	Samples() int // samples per channel
	Replay(write func(block [][]float64)) error
}

// Bank holds the candidate segment lengths of a recorded stream and runs
// the Welch estimate of a candidate only when the resolution choice needs
// its spectra (Choose): a choice looks at two or three of the nine default
// candidates, and which ones depends on the damping found on the way. The
// figures that decide which candidates are adequate (segments, effective
// averages, noise bandwidth) follow from the record length alone.
//
// An estimate replays the whole recording through an Accumulator, so the
// spectra are exactly those of an Accumulator fed the stream directly.
type Bank struct {
	cfg      BankConfig
	channels []string
	rec      Recording
	cands    []*candidate
}

// candidate is one segment length of a Bank.
type candidate struct {
	cfg      Config
	segments int
	// nd is the effective number of averages, beHz the noise bandwidth:
	// the values the candidate's Spectra will carry.
	nd, beHz float64
	// estimate runs the Welch estimate once and returns it ever after;
	// it may be called from several goroutines.
	estimate func() (*Spectra, error)
}

// NewBank returns a Bank over the recording rec of the named channels,
// sampled at cfg.FsHz.
func NewBank(cfg BankConfig, channels []string, rec Recording) (*Bank, error) {
	if cfg.MinSegmentLen == 0 {
		cfg.MinSegmentLen = 64
	}
	if cfg.MaxSegmentLen == 0 {
		cfg.MaxSegmentLen = 16384
	}
	for _, n := range []int{cfg.MinSegmentLen, cfg.MaxSegmentLen} {
		if n < 2 || bits.OnesCount(uint(n)) != 1 {
			return nil, fmt.Errorf("candidate segment length %d is not a power of two >= 2", n)
		}
	}
	if cfg.MinSegmentLen > cfg.MaxSegmentLen {
		return nil, fmt.Errorf("shortest candidate segment %d exceeds the longest %d", cfg.MinSegmentLen, cfg.MaxSegmentLen)
	}
	b := &Bank{cfg: cfg, channels: channels, rec: rec}
	samples := rec.Samples()
	for n := cfg.MinSegmentLen; n <= cfg.MaxSegmentLen; n *= 2 {
		c := &candidate{cfg: Config{FsHz: cfg.FsHz, SegmentLen: n, Overlap: n / 2, Window: cfg.Window, Workers: cfg.Workers}}
		if err := c.cfg.validate(); err != nil {
			return nil, err
		}
		win, err := cfg.Window.Values(n)
		if err != nil {
			return nil, err
		}
		hop := n - c.cfg.Overlap
		if samples >= n {
			c.segments = (samples-n)/hop + 1
		}
		c.nd = effectiveAverages(win, hop, c.segments)
		c.beHz = noiseBandwidthBins(win) * cfg.FsHz / float64(n)
		c.estimate = sync.OnceValues(func() (*Spectra, error) {
			acc, err := NewAccumulator(c.cfg, channels)
			if err != nil {
				return nil, err
			}
			if err := rec.Replay(acc.Write); err != nil {
				return nil, err
			}
			return acc.Spectra()
		})
		b.cands = append(b.cands, c)
	}
	return b, nil
}

// estimate returns the spectra of candidate k, replaying the recording the
// first time they are asked for.
func (b *Bank) estimate(k int) (*Spectra, error) { return b.cands[k].estimate() }

// ChoiceOptions tune Bank.Choose. The zero value selects the defaults.
type ChoiceOptions struct {
	BandHz         [2]float64 // band holding the body modes; required
	MinAverages    float64
	MaxBias        float64
	AssumedDamping float64
	FRF            FRFOptions // used for the quick FRFs
	// DampingErrorScale, when positive, makes the choice trade the bias of
	// a modal fit's damping against its random error for the record at
	// hand (see Choose): it is c in the damping's nominal relative random
	// error c/sqrt(Br T), T the record length. Zero keeps the magnitude
	// rule: the shortest candidate within MaxBias.
	DampingErrorScale float64
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
	// RecordS is the record length T the spectra came from [s].
	RecordS  float64
	Reasons  []string
	Warnings []Warning
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
// Br = 2 zeta fn and Be the window's noise bandwidth, is at most MaxBias.
// With DampingErrorScale c > 0 (the modal fit's rule) it is instead, of the
// adequate candidates within MaxBias, the one of least expected squared
// relative damping error
//
//	(beta (Be/Br)^2)^2 + (c^2/(Br T)) (1 + a/nd),
//
// the resolution bias (beta = dampingBiasCoefficient) against the random
// error of a record of length T, which grows as the effective averages nd
// fall (a = fewAveragesPenalty): a long record buys a fine resolution, and a
// light damping (narrow Br) needs one. Bendat & Piersol (Sec. 8.5.4, from
// memory) minimise the same sum for a spectral peak, where the variance is
// 1/(Be T); for a fit over all bins of the peak the variance hardly depends
// on the resolution until the averages run short, hence the second term.
// (4) the damping is re-estimated on the chosen candidate, or on the finest
// coarser one with quickMinAverages averages when the choice has fewer, and
// (3) repeated until the choice no longer changes (estimate, then refine:
// the coarse spectra widen peaks and overstate zeta). If no adequate
// candidate meets the bias bound the finest adequate one is taken and a
// WarnShortRecord warning states the record length both would need. Two overlapping modes
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
	samples := b.rec.Samples()
	recordS := float64(samples) / b.cfg.FsHz
	c := &Choice{RecordS: recordS}
	var adequate []int
	for k, cd := range b.cands {
		if cd.segments > 0 && cd.nd >= opt.MinAverages {
			adequate = append(adequate, k)
		}
	}
	if len(adequate) == 0 {
		cd := b.cands[0]
		if cd.segments == 0 {
			return nil, nil, &ShortRecordError{Samples: samples, SegmentLen: cd.cfg.SegmentLen, Need: 2}
		}
		c.Warnings = append(c.Warnings, Warning{Code: WarnFewAverages, Message: fmt.Sprintf(
			"even the shortest candidate segment (%d samples) gives only %.1f effective averages, fewer than %g: error bands are wide; record longer",
			cd.cfg.SegmentLen, cd.nd, opt.MinAverages)})
		adequate = []int{0}
	}
	c.Reasons = append(c.Reasons, fmt.Sprintf("%d of %d candidate segment lengths give at least %g effective averages",
		len(adequate), len(b.cands), opt.MinAverages))
	// step is rule (3) and the next estimate of rule (4) for a half-power
	// bandwidth brHz: the pick and the candidate to estimate on next.
	step := func(brHz float64) (pick, next int) {
		pick = -1
		bestErr := math.Inf(1)
		for _, k := range adequate {
			cd := b.cands[k]
			if resolutionBias(cd.beHz, brHz) > opt.MaxBias {
				continue
			}
			if opt.DampingErrorScale == 0 {
				pick = k
				break
			}
			if e := dampingError(cd.beHz, cd.nd, brHz, recordS, opt.DampingErrorScale); e < bestErr {
				pick, bestErr = k, e
			}
		}
		if pick < 0 {
			pick = adequate[len(adequate)-1]
		}
		next = adequate[0]
		for k := pick; k > adequate[0]; k-- {
			if cd := b.cands[k]; cd.segments > 0 && cd.nd >= quickMinAverages {
				next = k
				break
			}
		}
		return pick, next
	}
	est := adequate[0]
	// The first estimate, on the shortest candidate, seldom resolves a
	// body-mode peak (the damping is then assumed): the estimate that would
	// follow, for the assumed damping at the band's geometric centre, runs
	// beside it. A wrong guess costs a replay, never the result.
	var ahead sync.WaitGroup
	defer ahead.Wait() // the recording stays the caller's to close
	if _, guess := step(2 * opt.AssumedDamping * math.Sqrt(opt.BandHz[0]*opt.BandHz[1])); guess != est {
		ahead.Go(func() { b.cands[guess].estimate() })
	}
	chosen := -1
	for iter := 0; iter < len(b.cands); iter++ {
		s, err := b.estimate(est)
		if err != nil {
			return nil, nil, err
		}
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
		pick, next := step(c.halfPowerHz())
		if pick == chosen || next == est {
			chosen = pick
			break
		}
		chosen, est = pick, next
	}
	s, err := b.estimate(chosen)
	if err != nil {
		return nil, nil, err
	}
	c.SegmentLen, c.ResolutionHz, c.NoiseBandwidthHz = s.SegmentLen, s.ResolutionHz(), s.NoiseBandwidthHz
	c.Segments, c.EffectiveAverages = s.Segments, s.EffectiveAverages
	c.HalfPowerHz = c.halfPowerHz()
	bias := resolutionBias(s.NoiseBandwidthHz, c.HalfPowerHz)
	c.ResolutionBias = -bias
	c.Reasons = append(c.Reasons, fmt.Sprintf(
		"chose N=%d: resolution %.4g Hz, noise bandwidth Be %.4g Hz against half-power bandwidth Br = 2 zeta fn = %.4g Hz, expected peak bias %.2g %% (limit %.2g %%), %d segments, %.1f effective averages",
		s.SegmentLen, c.ResolutionHz, s.NoiseBandwidthHz, c.HalfPowerHz, -100*bias, 100*opt.MaxBias, s.Segments, s.EffectiveAverages))
	if opt.DampingErrorScale > 0 && bias <= opt.MaxBias {
		r := s.NoiseBandwidthHz / c.HalfPowerHz
		c.Reasons = append(c.Reasons, fmt.Sprintf(
			"of the candidates it gives the least expected damping error for a %.0f s record: resolution bias %.2g %% of zeta against a random error of about %.2g %%",
			recordS, 100*dampingBiasCoefficient*r*r,
			100*opt.DampingErrorScale/math.Sqrt(c.HalfPowerHz*recordS)*math.Sqrt(1+fewAveragesPenalty/s.EffectiveAverages)))
	}
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

// dampingError is the expected squared relative damping error of a fit to
// spectra of noise bandwidth beHz and nd effective averages from a
// recordS-long record, for a half-power bandwidth br (Choose's
// bias-variance rule).
func dampingError(beHz, nd, br, recordS, scale float64) float64 {
	r := beHz / br
	bias := dampingBiasCoefficient * r * r
	return bias*bias + scale*scale/(br*recordS)*(1+fewAveragesPenalty/nd)
}

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
		fo := opt.FRF
		fo.bandOnly = true // halfPower reads the band alone
		set, err := EstimateFRF(s, inputs, outputs, fo)
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
