package identify

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/ridemodes/ridemodes/identify/lpm"
	"github.com/ridemodes/ridemodes/identify/spectral"
	"github.com/ridemodes/ridemodes/identify/spool"
	"github.com/ridemodes/ridemodes/ingest"
)

const (
	// spectraSpan is how far above the band the spectra are kept (for plots
	// and the out-of-band residuals): the decimator keeps spectraSpan times
	// the band's upper edge.
	spectraSpan = 2.0
	// sameDriveCorrelation is the least correlation coefficient at which two
	// pans of one axle count as driven together.
	sameDriveCorrelation = 0.95
)

// FRFOptions configure an FRFStage. Zero values choose from the data.
type FRFOptions struct {
	BandLowHz, BandHighHz float64
	SegmentLen            int // a power of two; 0 chooses it from the damping
	Window                spectral.Window
	Workers               int
	// MaxResolutionBias bounds the expected resolution bias at the peak when
	// the segment length is chosen (0: DefaultFitResolutionBias).
	MaxResolutionBias float64
	// Estimator picks the FRFs the modal fit sees (rig tests with the
	// segment length chosen from the data): EstimatorAuto chooses.
	Estimator Estimator
}

// Estimator names the FRF estimator of the modal fit.
type Estimator int

const (
	// EstimatorAuto takes the local polynomial FRFs when the record is
	// long for the damping (useLocalPolynomial), else Welch's.
	EstimatorAuto Estimator = iota
	// EstimatorWelch takes the Welch-averaged two-input H1 (package spectral).
	EstimatorWelch
	// EstimatorLocalPolynomial takes the local polynomial FRFs of the whole
	// record (package identify/lpm) when the pans can be told apart.
	EstimatorLocalPolynomial
)

// WindowNamed returns the spectral window a setup's [analysis] window or the
// command line names: one of ingest.Windows, which are the spectral windows'
// own names (Window.String); "" is ingest.DefaultWindow. An unknown name is
// an error that lists the valid ones.
func WindowNamed(name string) (w spectral.Window, note string, err error) {
	if name == "" {
		name = ingest.DefaultWindow
	}
	if canonical, note, ok := ingest.WindowName(name); ok {
		for _, w := range []spectral.Window{spectral.Hann, spectral.Hamming, spectral.FlatTop, spectral.Rectangular} {
			if w.String() == canonical {
				return w, note, nil
			}
		}
	}
	return 0, "", fmt.Errorf("unknown window %q; use one of %s", name, strings.Join(ingest.Windows, ", "))
}

// DefaultFitResolutionBias caps the expected resolution bias when the
// segment length is chosen for the modal fit: (1/3)(Be/Br)^2 <= 0.003, a
// window bandwidth Be at most a tenth of the half-power bandwidth Br. It is
// stricter than the spectral package's default, which bounds the bias of a
// peak's magnitude only, because leakage also biases the fitted damping.
// Within the cap the choice weighs bias against random error for the record
// at hand (fitDampingErrorScale), which on long records takes segments far
// finer than the cap asks; the fit then states the bias that remains in its
// standard deviations (modal.Result.ResolutionBias).
//
// Measured with the cap alone (the shortest candidate within it): over
// 100 seeded cars of TestRigRouteAccuracy (-rig.cases 100) bounds 0.004,
// 0.003 and 0.002 gave 4, 1 and 0 natural frequencies of 200 missing
// 0.5 %, and the mean damping error was +0.0012, +0.0008 and +0.0006. With
// the bias-variance choice and the stated bias: no miss, worst 0.44 %, 97.2 %
// of the errors within two reported standard deviations. On the resolution
// sweep (identify/sweep_test.go, 40 five-minute and 24 hour-long logs, 5 %
// noise), the cap alone chose N = 512-1024 (at 20 Hz after decimation) on
// both lengths; the damping came out +0.0011 (5 min) and +0.0010 (1 h) high,
// and on hour-long logs with RMS z = error/sd of 3.2 and errors up to 8 sd.
// Now: N = 1024 on 5-minute logs (damping +0.0006, RMS z 1.01, 96 % within
// 2 sd) and 2048-8192 on hour-long ones (damping +0.0001, RMS z 1.10, 92 %
// within 2 sd, worst 3.0 sd; natural frequency RMS z 0.95 and 1.03).
const DefaultFitResolutionBias = 0.003

// FitMinAverages is the least effective number of averages the resolution
// choice accepts for the modal fit: fewer than the spectral package's
// default of 20. The fit weights every bin by its own error band, so fewer
// averages cost precision, which the reported standard deviations carry;
// too coarse a resolution costs accuracy through leakage, which nothing
// reports. Measured on the 20 seeded logs of TestRigRouteAccuracy: with 20,
// 12 and 8 averages, 86.7 %, 91.7 % and 95.0 % of the errors lay within two
// reported standard deviations, and the damping bias fell.
const FitMinAverages = 8

// fitDampingErrorScale is c in the nominal relative random error of a
// fitted damping ratio, c/sqrt(Br T) (Br the half-power bandwidth, T the
// record length), with which the resolution choice weighs bias against
// variance (spectral.ChoiceOptions.DampingErrorScale). Measured on seeded
// simulated rig logs with 5 % noise (40 of 5 minutes, 24 of an hour): the
// delta-method sd of zeta/zeta times sqrt(Br T) had means 0.02-0.10 over the
// candidates with at least FitMinAverages averages, 0.06 for heavily damped
// modes; quieter logs have smaller random errors, for which this errs on the
// coarse side, and the fit states the remaining resolution bias in its sd.
const fitDampingErrorScale = 0.05

func (o *FRFOptions) defaults() error {
	if o.BandLowHz == 0 {
		o.BandLowHz = ingest.DefaultBandLowHz
	}
	if o.BandHighHz == 0 {
		o.BandHighHz = ingest.DefaultBandHighHz
	}
	if o.MaxResolutionBias == 0 {
		o.MaxResolutionBias = DefaultFitResolutionBias
	}
	if !(o.BandLowHz > 0) || !(o.BandHighHz > o.BandLowHz) {
		return fmt.Errorf("the analysis band needs 0 < low < high (got %g to %g Hz)", o.BandLowHz, o.BandHighHz)
	}
	if o.SegmentLen != 0 && (o.SegmentLen < 16 || o.SegmentLen&(o.SegmentLen-1) != 0) {
		return fmt.Errorf("the segment length must be a power of two of at least 16 (got %d)", o.SegmentLen)
	}
	return nil
}

// FRFStage consumes the blocks of a log stream and estimates the spectra and,
// when the setup has rig inputs, the FRFs from the front and rear pans to
// every body sensor. Two or more pans on one axle (a four-post rig) are
// averaged into the axle's input, with a warning when they were not driven
// together. When the segment length is chosen from the data, the decimated
// stream is spooled (package identify/spool: memory stays bounded on the
// longest logs) and the candidate lengths are estimated after the read
// (spectral.Bank); a given length is accumulated during the read. The
// spooled record also gives the local polynomial FRFs of the whole record
// (package identify/lpm, one DFT per channel), which the modal fit takes
// instead of Welch's when the record is long for the damping
// (FRFOptions.Estimator).
//
// The sample rate: the blocks carry the rate known from a log's first steps
// (ingest.Block.SampleRateHz), the whole log's rate being known only at its
// end (ingest.Summary.SampleRateHz, fitted to every time stamp). The stage
// uses the early rate only for what must be fixed before the first sample and
// is set in fractions of the rate: the decimation factor q and the
// anti-alias filter. Every frequency comes from the rate given to Result:
// the spectra count segments in samples, so their frequency axis, densities
// and noise bandwidth follow the final rate exactly (the Bank is made with it,
// an Accumulator takes it by SetRate).
// The two rates differ by the time stamps' rounding and jitter (ingest
// bounds it well under 30 %), far less than the factor spectraSpan between
// the band's upper edge and the frequency that fixed q, so the band stays
// inside the decimator's passband.
type FRFStage struct {
	opt       FRFOptions
	axleCols  [2][]int // block data columns of the front and rear pans
	sensorCol []int
	names     []string // stage channels: [front, rear,] sensors...
	nIn       int

	fsHz  float64              // rate of the stream: early until Result
	q     int                  // decimation factor (1: none)
	sink  spectral.BlockWriter // decimator, or the spool or accumulator directly
	spool *spool.Spool         // when the segment length is chosen from the data
	acc   *spectral.Accumulator
	view  [][]float64  // one block of stage channels: the block's columns or mean
	mean  [2][]float64 // the mean of an axle's pans, for an axle of several
	pairs []pairStats  // per extra pan of an axle: its correlation with the first
}

// pairStats accumulates the correlation of two pans of one axle.
type pairStats struct {
	axle         int
	a, b         int // block columns
	n            float64
	sa, sb       float64
	saa, sbb     float64
	sab          float64
	nameA, nameB string
}

func (p *pairStats) add(x, y float64) {
	p.n++
	p.sa += x
	p.sb += y
	p.saa += x * x
	p.sbb += y * y
	p.sab += x * y
}

func (p *pairStats) correlation() float64 {
	va := p.saa - p.sa*p.sa/p.n
	vb := p.sbb - p.sb*p.sb/p.n
	return (p.sab - p.sa*p.sb/p.n) / math.Sqrt(va*vb)
}

// NewFRFStage prepares a stage for a stream whose blocks hold the channels
// named in channels (ingest.Info.Channels order).
func NewFRFStage(channels []string, sensors []ingest.Sensor, inputs []ingest.Input, opt FRFOptions) (*FRFStage, error) {
	if err := opt.defaults(); err != nil {
		return nil, err
	}
	col := map[string]int{}
	for i, c := range channels {
		col[c] = i
	}
	find := func(name string) (int, error) {
		i, ok := col[name]
		if !ok {
			return 0, fmt.Errorf("channel %q of the setup is not in the stream", name)
		}
		return i, nil
	}
	s := &FRFStage{opt: opt}
	for _, in := range inputs {
		i, err := find(in.Channel)
		if err != nil {
			return nil, err
		}
		ax := 0
		if in.Axle == "rear" {
			ax = 1
		}
		s.axleCols[ax] = append(s.axleCols[ax], i)
	}
	if len(inputs) > 0 {
		if len(s.axleCols[0]) == 0 || len(s.axleCols[1]) == 0 {
			return nil, errors.New("a rig test needs a front and a rear input")
		}
		for ax, cols := range s.axleCols {
			var ns []string
			for _, c := range cols {
				ns = append(ns, channels[c])
			}
			name := ns[0]
			if len(ns) > 1 {
				name = "mean(" + strings.Join(ns, "+") + ")"
				for _, c := range cols[1:] {
					s.pairs = append(s.pairs, pairStats{axle: ax, a: cols[0], b: c, nameA: channels[cols[0]], nameB: channels[c]})
				}
			}
			s.names = append(s.names, name)
		}
		s.nIn = 2
	}
	for _, se := range sensors {
		i, err := find(se.Channel)
		if err != nil {
			return nil, err
		}
		s.sensorCol = append(s.sensorCol, i)
		s.names = append(s.names, se.Channel)
	}
	return s, nil
}

// checkNyquist refuses a band that reaches the Nyquist frequency of a log
// sampled at fsHz.
func (s *FRFStage) checkNyquist(fsHz float64) error {
	if !(fsHz > 0) || math.IsInf(fsHz, 0) {
		return fmt.Errorf("sample rate %g Hz, need a positive finite rate", fsHz)
	}
	if s.opt.BandHighHz >= fsHz/2 {
		return fmt.Errorf("the band's upper edge %g Hz is at or above the Nyquist frequency %.6g Hz of the log",
			s.opt.BandHighHz, fsHz/2)
	}
	return nil
}

// start builds the decimator and the accumulators from the stream's early
// rate (see FRFStage).
func (s *FRFStage) start(fsHz float64) error {
	if err := s.checkNyquist(fsHz); err != nil {
		return err
	}
	s.fsHz = fsHz
	s.q = DecimationFactor(fsHz, s.opt.BandHighHz)
	outHz := fsHz / float64(s.q)
	if s.opt.SegmentLen > 0 {
		acc, err := spectral.NewAccumulator(spectral.Config{FsHz: outHz, SegmentLen: s.opt.SegmentLen,
			Overlap: s.opt.SegmentLen / 2, Window: s.opt.Window,
			Workers: s.opt.Workers}, s.names)
		if err != nil {
			return err
		}
		s.acc, s.sink = acc, acc
	} else {
		// The candidate segment lengths are estimated after the read, on
		// the spooled decimated stream (spectral.Bank).
		s.spool = spool.New(len(s.names))
		s.sink = s.spool
	}
	if s.q > 1 {
		dec, err := spectral.NewDecimator(s.q, len(s.names), fsHz, s.sink)
		if err != nil {
			return err
		}
		s.sink = dec
	}
	s.view = make([][]float64, len(s.names))
	return nil
}

// DecimationFactor returns the factor q by which an FRF stage decimates a
// log sampled at fsHz for an analysis band ending at bandHighHz: it keeps
// spectraSpan times the band's upper edge (at most 0.4 fsHz) in the
// decimator's passband, so the spectra come at fsHz/q.
func DecimationFactor(fsHz, bandHighHz float64) int {
	return spectral.DecimationFactor(fsHz, math.Min(spectraSpan*bandHighHz, 0.4*fsHz))
}

// Consume takes one block of the stream (ingest.Reader.Stream's callback).
func (s *FRFStage) Consume(b ingest.Block) error {
	if s.sink == nil {
		if err := s.start(b.SampleRateHz); err != nil {
			return err
		}
	}
	// The stage's channels are the block's own columns, but for an axle
	// of several pans, whose mean is built in s.mean.
	n := b.Len()
	if s.nIn == 2 {
		for ax, cols := range s.axleCols {
			if len(cols) == 1 {
				s.view[ax] = b.Data[cols[0]]
				continue
			}
			if cap(s.mean[ax]) < n {
				s.mean[ax] = make([]float64, n)
			}
			dst := s.mean[ax][:n]
			copy(dst, b.Data[cols[0]])
			for _, c := range cols[1:] {
				for j, v := range b.Data[c] {
					dst[j] += v
				}
			}
			k := float64(len(cols))
			for j := range dst {
				dst[j] /= k
			}
			s.view[ax] = dst
		}
		for pi := range s.pairs {
			p := &s.pairs[pi]
			for j := 0; j < n; j++ {
				p.add(b.Data[p.a][j], b.Data[p.b][j])
			}
		}
	}
	for k, c := range s.sensorCol {
		s.view[s.nIn+k] = b.Data[c]
	}
	s.sink.Write(s.view)
	return nil
}

// Close releases what the stage holds of the stream (its spool and the
// spool's temporary file). Result closes the stage; a caller that stops
// before Result, on an error of the stream, should close it. Close may be
// called more than once.
func (s *FRFStage) Close() error {
	if s.spool == nil {
		return nil
	}
	err := s.spool.Close()
	s.spool = nil
	return err
}

// FRFResult is what an FRFStage estimated.
type FRFResult struct {
	Spectra *spectral.Spectra
	Choice  *spectral.Choice // nil when the segment length was given
	FRF     *spectral.FRFSet // nil without rig inputs
	// Local are the local polynomial FRFs of the whole record, which the
	// modal fit then takes instead of FRF's (FRFOptions.Estimator); nil
	// when Welch's serve.
	Local *lpm.FRFs
	// localChosen: Local was chosen by EstimatorAuto (FitRig may fall back).
	localChosen bool
	// DecimationFactor is q: the spectra come from every q-th sample of the
	// anti-alias filtered stream.
	DecimationFactor int
	InputRateHz      float64
	// BandLowHz and BandHighHz are the analysis band.
	BandLowHz, BandHighHz float64
	Reasons               []string // the choices made, for the result JSON
	Warnings              []string
}

// Result finishes the estimate after the last block. sampleRateHz is the
// stream's rate over the whole log (ingest.Summary.SampleRateHz): every
// frequency of the result comes from it. It closes the stage (Close).
func (s *FRFStage) Result(sampleRateHz float64) (*FRFResult, error) {
	if s.sink == nil {
		return nil, errors.New("the log held no samples")
	}
	defer s.Close()
	if err := s.checkNyquist(sampleRateHz); err != nil {
		return nil, err
	}
	s.fsHz = sampleRateHz
	outHz := sampleRateHz / float64(s.q)
	var bank *spectral.Bank
	var err error
	if s.spool != nil {
		bank, err = spectral.NewBank(spectral.BankConfig{FsHz: outHz, Window: s.opt.Window, Workers: s.opt.Workers}, s.names, s.spool)
	} else {
		err = s.acc.SetRate(outHz)
	}
	if err != nil {
		return nil, err
	}
	r := &FRFResult{DecimationFactor: s.q, InputRateHz: s.fsHz, BandLowHz: s.opt.BandLowHz, BandHighHz: s.opt.BandHighHz}
	band := [2]float64{s.opt.BandLowHz, s.opt.BandHighHz}
	inputs, outputs := []int{}, []int{}
	if s.nIn == 2 {
		inputs = []int{0, 1}
	}
	for k := range s.sensorCol {
		outputs = append(outputs, s.nIn+k)
	}
	if s.q > 1 {
		r.Reasons = append(r.Reasons, fmt.Sprintf("decimated by %d from %.6g Hz to %.6g Hz (anti-alias FIR) before the FFTs: the band ends at %g Hz",
			s.q, s.fsHz, s.fsHz/float64(s.q), s.opt.BandHighHz))
	}
	if bank != nil {
		r.Choice, r.Spectra, err = bank.Choose(inputs, outputs, spectral.ChoiceOptions{BandHz: band, MaxBias: s.opt.MaxResolutionBias,
			MinAverages: FitMinAverages, DampingErrorScale: fitDampingErrorScale})
		if err != nil {
			return nil, err
		}
		r.Reasons = append(r.Reasons, r.Choice.Reasons...)
		for _, w := range r.Choice.Warnings {
			r.Warnings = append(r.Warnings, w.Message)
		}
	} else {
		r.Spectra, err = s.acc.Spectra()
		if err != nil {
			return nil, err
		}
		r.Reasons = append(r.Reasons, fmt.Sprintf("segment length %d samples (%.4g Hz resolution) as given", s.opt.SegmentLen, r.Spectra.ResolutionHz()))
	}
	for _, p := range s.pairs {
		axle := [2]string{"front", "rear"}[p.axle]
		if c := p.correlation(); !(c >= sameDriveCorrelation) {
			r.Warnings = append(r.Warnings, fmt.Sprintf("the %s pans %s and %s were not driven together (correlation %.3f < %.2f); their mean is the %s input and the side-to-side difference (roll, warp) is not in the model",
				axle, p.nameA, p.nameB, c, sameDriveCorrelation, axle))
		} else {
			r.Reasons = append(r.Reasons, fmt.Sprintf("the %s pans %s and %s moved together (correlation %.3f): their mean is the %s input", axle, p.nameA, p.nameB, c, axle))
		}
	}
	if s.nIn == 2 {
		r.FRF, err = spectral.EstimateFRF(r.Spectra, inputs, outputs, spectral.FRFOptions{BandHz: band})
		if err != nil {
			return nil, err
		}
		for _, w := range r.FRF.Warnings {
			r.Warnings = append(r.Warnings, w.Message)
		}
		if why, ok := s.useLocalPolynomial(r); ok {
			stride := int(math.Ceil((band[1] - band[0]) * float64(s.spool.Samples()) / outHz / maxLocalBins))
			// The window: 2R+1 about a localWindowsPerBr-th of the
			// half-power bandwidth, at least lpm.DefaultHalfWidth.
			hw := max(lpm.DefaultHalfWidth, int((r.Choice.HalfPowerHz*r.Choice.RecordS/localWindowsPerBr-1)/2))
			r.Local, err = lpm.Estimate(s.spool, outHz, inputs, outputs, lpm.Options{BandHz: band, Stride: stride, HalfWidth: hw})
			if err != nil {
				return nil, err
			}
			r.localChosen = s.opt.Estimator == EstimatorAuto
			r.Reasons = append(r.Reasons, fmt.Sprintf("local polynomial FRFs for the fit (%s): one DFT of %d samples (%.4g Hz bins), FRFs and transient of degree %d over %d bins around each, kept at a stride of %d bins",
				why, r.Local.DFTLen, outHz/float64(r.Local.DFTLen), lpm.Degree, 2*r.Local.HalfWidth+1, max(stride, 1)))
		}
	}
	return r, nil
}

// minLocalBinsPerBr is the least number of DFT bins of the whole record per
// half-power bandwidth (Br T, T the record length) at which EstimatorAuto
// takes the local polynomial FRFs: twice the 2R+1 = 15 bins of a window.
// The local quadratic's error grows fast below that (noise-free, a
// resonance of 15 bins per Br is off by 6 % RMS, of 30 bins 0.8 %, of 60
// 0.08 %); at 33 bins per Br (damping 0.05, 5 minutes) it still beat Welch
// (TestRigRouteAccuracy's lightest cases, 5 % noise: frequency errors within
// 0.03 % against 0.15 %, no damping bias against +0.0005 to +0.0016).
const minLocalBinsPerBr = 30

// maxLocalBinsPerBr is the most bins per half-power bandwidth at which
// EstimatorAuto takes the local polynomial FRFs: above it (records of some
// 15-20 minutes and longer at the body modes' damping) Welch's long
// segments, chosen from the damping and the record, leave no bias worth the
// cost. Measured on the calibration sweep's hour-long logs (Br T about
// 1000-3000 bins, 240 logs): the local polynomial FRFs cut the frequencies'
// RMS errors by 0-25 %, but 12 of 2880 estimates lay beyond 3 stated sd
// (7.8 expected of a calibrated estimator) against 3 with Welch, and the
// whole run of an hour-long 512 Hz log took 0.38 s against 0.25 s. The
// value between the 5-minute logs' 100-400 bins, where the local
// polynomial wins clearly, and the hour-long logs' 1000 and more is our
// choice; records in between were not measured.
const maxLocalBinsPerBr = 600

// localWindowsPerBr sets the local polynomial window from the record: 2R+1
// bins about a 32nd of the half-power bandwidth's Br T bins, but not fewer
// than 2 lpm.DefaultHalfWidth + 1 = 15. A wider window spends fewer of its
// bins' degrees of freedom on the local polynomials' 9 parameters; the
// local quadratic's error stays negligible while the window is a small
// fraction of Br (noise-free, a resonance of 4 windows per Br is off by
// 0.08 % RMS, of 6.7 by 0.013 %). Measured on the calibration sweep's
// hour-long logs (120, 2 and 5 % noise, Br T about 1000-3000 bins): with
// R = 7 the frequencies' RMS errors were 0.94-1.24 times Welch's and the
// damping ratios' 0.97-1.41 times; with R = 30 (about Br T/32) 0.81-1.04
// and 0.74-0.97.
const localWindowsPerBr = 32

// maxLocalBins caps the bins of the band the local polynomial estimate
// gives the modal fit: longer records are estimated at every stride-th bin
// (the fit's time and memory grow with the bins, and bins within a window's
// width carry much the same information). Measured on the calibration
// sweep's hour-long logs (120 at R = 7, 240 with the window above): every
// bin and every 6th, and 2048 bins and 1024, gave the same errors (RMS
// within 3 %); the whole-run benchmark's hour-long log peaked at 40 MB of
// memory with 2048 bins, 34 MB with 1024.
const maxLocalBins = 1024

// useLocalPolynomial reports whether the modal fit takes the local
// polynomial FRFs of the whole record, and why: as asked, or
// (EstimatorAuto) when the record holds from minLocalBinsPerBr to
// maxLocalBinsPerBr bins per half-power bandwidth of the resolution choice's
// quick damping estimate.
// Either needs the spooled record and two pans the Welch estimate could
// tell apart over the whole band.
func (s *FRFStage) useLocalPolynomial(r *FRFResult) (string, bool) {
	if s.spool == nil || r.FRF.Method != spectral.MultipleInput {
		return "", false
	}
	switch s.opt.Estimator {
	case EstimatorLocalPolynomial:
		return "as asked", true
	case EstimatorWelch:
		return "", false
	}
	for _, w := range r.FRF.Warnings {
		if w.Code == spectral.WarnInseparableBins {
			return "", false
		}
	}
	if bins := r.Choice.HalfPowerHz * r.Choice.RecordS; bins >= minLocalBinsPerBr && bins <= maxLocalBinsPerBr {
		return fmt.Sprintf("%.0f bins of the record per half-power bandwidth, from %d to %d", bins, minLocalBinsPerBr, maxLocalBinsPerBr), true
	}
	return "", false
}

// minRigCycles is how many periods of the band's lower edge a rig record
// must span: enough for eight averages of segments that resolve the lower
// edge with Hann (common practice asks for more; the resolution choice warns
// when the record is short for the damping).
const minRigCycles = 30

// MinRigRecordS is the shortest rig record that FRFs over a band starting at
// bandLowHz can come from: minRigCycles periods of the lower edge (60 s at
// 0.5 Hz).
func MinRigRecordS(bandLowHz float64) float64 { return minRigCycles / bandLowHz }
