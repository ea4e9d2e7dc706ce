package spectral

import (
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"
)

// parallelSegmentLen is the shortest segment for which two worker lanes
// paid on the two-core build machine (BenchmarkAccumulate: 1.35x at N = 4096,
// 1.5x at 16384; below 4096 the goroutine hand-off per segment costs more
// than it saves).
const parallelSegmentLen = 4096

// defaultWorkers is the number of lanes used when Config.Workers is zero:
// 2 from parallelSegmentLen up, else 1. It depends on the segment length
// only, never on the machine, so results stay bit-reproducible.
func defaultWorkers(segmentLen int) int {
	if segmentLen >= parallelSegmentLen {
		return 2
	}
	return 1
}

// Config sets up a Welch estimate.
type Config struct {
	FsHz       float64 // sample rate [Hz]
	SegmentLen int     // samples per segment N (the FFT length)
	Overlap    int     // samples shared by consecutive segments; SegmentLen/2 is scipy's default
	Window     Window
	// Workers is the number of lanes that transform segments concurrently;
	// segment k always goes to lane k mod Workers and the lanes' sums are
	// added in lane order, so the result is bit-reproducible for a given
	// Workers whatever the scheduling. Zero chooses by segment length (two
	// lanes from 4096 samples up, where it was measured to pay).
	Workers int
}

func (c Config) validate() error {
	switch {
	case !(c.FsHz > 0) || math.IsInf(c.FsHz, 0):
		return fmt.Errorf("sample rate %g Hz, need a positive finite rate", c.FsHz)
	case c.SegmentLen < 2:
		return fmt.Errorf("segment length %d, need at least 2 samples", c.SegmentLen)
	case c.Overlap < 0 || c.Overlap >= c.SegmentLen:
		return fmt.Errorf("overlap %d samples, need 0 <= overlap < segment length %d", c.Overlap, c.SegmentLen)
	case c.Workers < 0:
		return fmt.Errorf("%d workers, need zero (default) or more", c.Workers)
	}
	return nil
}

// Accumulator builds Welch-averaged auto and cross spectra of several
// channels from a stream of sample blocks in constant memory: it keeps one
// segment per channel and the running sums of the spectral matrix.
//
// References:
//   - P. D. Welch, "The use of fast Fourier transform for the estimation of
//     power spectra: a method based on time averaging over short, modified
//     periodograms", IEEE Trans. Audio Electroacoust. AU-15(2):70-73, 1967,
//     doi:10.1109/TAU.1967.1161901.
//   - J. S. Bendat and A. G. Piersol, Random Data, 4th ed., Wiley, 2010,
//     Sec. 11.5 (spectral density estimates by segment averaging).
type Accumulator struct {
	cfg      Config
	channels []string
	win      []float64
	hop      int
	nFreq    int

	buf  [][]float64 // [channel][N]: the segment being filled
	fill int

	lanes    []*lane
	slots    int // segments a lane holds before they are transformed
	helper   *fourier.FFT
	wg       sync.WaitGroup
	pending  int // segments held, not yet transformed
	segments int
	samples  int
	err      error
}

// lane transforms segments and sums their cross products; each worker owns
// one, so no buffer is shared between goroutines. The FFT is gonum's
// dsp/fourier with its plan and output reused: BenchmarkFFT measured it 2-4x
// faster than go-dsp's FFTReal at powers of two (256..16384) and 10-30x at
// other lengths, with no allocations.
type lane struct {
	fft  *fourier.FFT
	seg  [][][]float64    // [slot][channel][N]
	coef [][][]complex128 // [slot][channel][nFreq]
	sum  []complex128     // [f][i][j] flat, upper triangle i <= j
}

// sharedLaneSamples sets the slots of a single lane: it holds segments up to
// this many samples per channel (at least two segments), which two
// goroutines then share (see Accumulator.flush). Waking the second
// goroutine costs tens of microseconds on the development machine, so the
// batches must be long: at 4096 samples the sharing gained nothing
// measurable (BenchmarkAccumulate, N=1024, one lane), at 16384 it gained
// 1.3x, at 32768 1.45x. The slots take 32768 samples per channel in memory
// and as many complex coefficients over two, 2 MiB at four channels.
const sharedLaneSamples = 32768

// NewAccumulator returns an Accumulator for the named channels; the order of
// channels is the order of the slices given to Write.
func NewAccumulator(cfg Config, channels []string) (*Accumulator, error) {
	if err := cfg.validate(); err != nil {
		return nil, err
	}
	if len(channels) == 0 {
		return nil, fmt.Errorf("no channels")
	}
	if cfg.Workers == 0 {
		cfg.Workers = defaultWorkers(cfg.SegmentLen)
	}
	win, err := cfg.Window.Values(cfg.SegmentLen)
	if err != nil {
		return nil, err
	}
	if floats.Dot(win, win) == 0 {
		return nil, fmt.Errorf("window %v is zero over the %d-sample segment", cfg.Window, cfg.SegmentLen)
	}
	n, nch := cfg.SegmentLen, len(channels)
	a := &Accumulator{
		cfg:      cfg,
		channels: append([]string(nil), channels...),
		win:      win,
		hop:      n - cfg.Overlap,
		nFreq:    n/2 + 1,
		buf:      newMatrix(nch, n),
		lanes:    make([]*lane, cfg.Workers),
		slots:    1,
	}
	if cfg.Workers == 1 {
		a.slots = max(2, sharedLaneSamples/n)
		a.helper = fourier.NewFFT(n)
	}
	for i := range a.lanes {
		l := &lane{
			fft:  fourier.NewFFT(n),
			seg:  make([][][]float64, a.slots),
			coef: make([][][]complex128, a.slots),
			sum:  make([]complex128, a.nFreq*nch*nch),
		}
		for s := range a.slots {
			l.seg[s] = newMatrix(nch, n)
			l.coef[s] = make([][]complex128, nch)
			for ch := range nch {
				l.coef[s][ch] = make([]complex128, a.nFreq)
			}
		}
		a.lanes[i] = l
	}
	return a, nil
}

func newMatrix(rows, cols int) [][]float64 {
	m := make([][]float64, rows)
	for i := range m {
		m[i] = make([]float64, cols)
	}
	return m
}

// Write adds a block of samples, one slice per channel in SI units, all of
// the same (arbitrary) length. It panics if the block does not match the
// channels. A NaN or infinite sample is remembered and reported by Spectra.
func (a *Accumulator) Write(block [][]float64) {
	if len(block) != len(a.buf) {
		panic(fmt.Sprintf("spectral: block has %d channels, accumulator has %d", len(block), len(a.buf)))
	}
	m := len(block[0])
	for ch, x := range block {
		if len(x) != m {
			panic(fmt.Sprintf("spectral: channel %d of the block has %d samples, channel 0 has %d", ch, len(x), m))
		}
		if a.err == nil {
			a.checkFinite(ch, x)
		}
	}
	n := a.cfg.SegmentLen
	for off := 0; off < m; {
		k := min(n-a.fill, m-off)
		for ch, x := range block {
			copy(a.buf[ch][a.fill:], x[off:off+k])
		}
		a.fill += k
		off += k
		if a.fill == n {
			a.takeSegment()
		}
	}
	a.samples += m
}

func (a *Accumulator) checkFinite(ch int, x []float64) {
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			a.err = &NonFiniteError{Channel: ch, Sample: a.samples + i, Value: v}
			return
		}
	}
}

// takeSegment hands the full segment to its lane (segment k to lane k mod
// Workers) and keeps the overlap.
func (a *Accumulator) takeSegment() {
	l := a.lanes[a.pending%len(a.lanes)]
	slot := a.pending / len(a.lanes)
	for ch, x := range a.buf {
		copy(l.seg[slot][ch], x)
		copy(x, x[a.hop:])
	}
	a.fill = a.cfg.SegmentLen - a.hop
	a.pending++
	a.segments++
	if a.pending == len(a.lanes)*a.slots {
		a.flush()
	}
}

// flush transforms the pending segments and adds their cross products to
// the sums. Several lanes each take their segment on a goroutine of their
// own. A single lane holds up to its slots of segments and shares them with
// a second goroutine: each transforms half of them, then each adds the
// products of all of them to half of the frequency bins, every bin's sums
// in segment order. So the sums are bit for bit those of one goroutine
// taking the segments one by one (TestSharedLaneExact), and a one-lane
// estimate, such as the resolution choice runs after the read, uses both
// cores. Measured on the development machine (BenchmarkAccumulate, N=1024,
// one lane): 9.3-10.1 million samples per second per channel against
// 6.2-6.7 million taken one by one; in the whole run of the hour-long bench
// log the N=2048 estimate after the read took 9 ms instead of 12.
func (a *Accumulator) flush() {
	if a.pending == 0 {
		return
	}
	if len(a.lanes) == 1 {
		a.lanes[0].processShared(a, a.pending)
	} else {
		for _, l := range a.lanes[1:a.pending] {
			a.wg.Go(func() { l.process(a) })
		}
		a.lanes[0].process(a)
		a.wg.Wait()
	}
	a.pending = 0
}

// process transforms the lane's segment and adds its cross products to the
// lane's sums.
func (l *lane) process(a *Accumulator) {
	l.transform(a, l.fft, 0)
	l.addProducts(1, 0, a.nFreq)
}

// processShared transforms the n segments a single lane holds and adds
// their cross products to its sums, sharing the work with a second
// goroutine (see Accumulator.flush).
func (l *lane) processShared(a *Accumulator, n int) {
	if n == 1 {
		l.process(a)
		return
	}
	half := (n + 1) / 2
	a.wg.Go(func() {
		for s := half; s < n; s++ {
			l.transform(a, a.helper, s)
		}
	})
	for s := range half {
		l.transform(a, l.fft, s)
	}
	a.wg.Wait()
	mid := a.nFreq / 2
	a.wg.Go(func() { l.addProducts(n, mid, a.nFreq) })
	l.addProducts(n, 0, mid)
	a.wg.Wait()
}

// transform removes each channel's mean from the segment in slot s,
// windows it and transforms it with fft (a plan of the calling goroutine).
func (l *lane) transform(a *Accumulator, fft *fourier.FFT, s int) {
	for ch, x := range l.seg[s] {
		floats.AddConst(-stat.Mean(x, nil), x)
		floats.Mul(x, a.win)
		fft.Coefficients(l.coef[s][ch], x)
	}
}

// addProducts adds the cross products conj(X_i) X_j of the segments in
// slots 0..n-1, in that order, to the lane's sums of bins f0..f1-1.
func (l *lane) addProducts(n, f0, f1 int) {
	nch := len(l.seg[0])
	for f := f0; f < f1; f++ {
		row := l.sum[f*nch*nch:]
		for _, coef := range l.coef[:n] {
			for i := 0; i < nch; i++ {
				xi := coef[i][f]
				ci := complex(real(xi), -imag(xi))
				for j := i; j < nch; j++ {
					row[i*nch+j] += ci * coef[j][f]
				}
			}
		}
	}
}

// SetRate replaces the sample rate, for a stream whose rate is known
// precisely only at its end (package ingest fits it to every time stamp of
// a log). Segments are counted in samples, so what was accumulated stands and
// only what Spectra derives from the rate follows it, exactly: the bin
// frequencies k fs/N, the density scale 1/fs and the noise bandwidth.
func (a *Accumulator) SetRate(fsHz float64) error {
	if !(fsHz > 0) || math.IsInf(fsHz, 0) {
		return fmt.Errorf("sample rate %g Hz, need a positive finite rate", fsHz)
	}
	a.cfg.FsHz = fsHz
	return nil
}

// Spectra returns the estimate from the whole segments written so far
// (writing may continue afterwards). It fails with a NonFiniteError if a bad
// sample was written and with a ShortRecordError before the first whole
// segment.
func (a *Accumulator) Spectra() (*Spectra, error) {
	if a.err != nil {
		return nil, a.err
	}
	a.flush()
	if a.segments == 0 {
		return nil, &ShortRecordError{Samples: a.samples, SegmentLen: a.cfg.SegmentLen, Need: 1}
	}
	n, nch := a.cfg.SegmentLen, len(a.buf)
	fs := a.cfg.FsHz
	scale := 1 / (fs * floats.Dot(a.win, a.win) * float64(a.segments))
	s := &Spectra{
		Channels:          append([]string(nil), a.channels...),
		FsHz:              fs,
		SegmentLen:        n,
		Overlap:           a.cfg.Overlap,
		Window:            a.cfg.Window,
		Segments:          a.segments,
		EffectiveAverages: effectiveAverages(a.win, a.hop, a.segments),
		NoiseBandwidthHz:  noiseBandwidthBins(a.win) * fs / float64(n),
		FreqsHz:           make([]float64, a.nFreq),
		G:                 make([][][]complex128, a.nFreq),
	}
	for f := range s.G {
		s.FreqsHz[f] = float64(f) * fs / float64(n)
		c := 2 * scale
		if f == 0 || (n%2 == 0 && f == n/2) {
			c = scale
		}
		g := make([][]complex128, nch)
		for i := range g {
			g[i] = make([]complex128, nch)
		}
		for i := 0; i < nch; i++ {
			for j := i; j < nch; j++ {
				var v complex128
				for _, l := range a.lanes {
					v += l.sum[f*nch*nch+i*nch+j]
				}
				v *= complex(c, 0)
				if i == j {
					v = complex(real(v), 0)
				}
				g[i][j] = v
				g[j][i] = complex(real(v), -imag(v))
			}
		}
		s.G[f] = g
	}
	return s, nil
}
