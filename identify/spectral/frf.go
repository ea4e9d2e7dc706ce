package spectral

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
)

// Defaults for FRFOptions.
const (
	// DefaultMaxCondition is the condition number of Gxx above which the
	// inputs count as inseparable at a frequency. For two inputs of equal
	// level, cond = (1+|g|)/(1-|g|) with |g| the magnitude of their coherence
	// function, so 100 is an input coherence above 0.96 [derived].
	DefaultMaxCondition = 100
	// DefaultMaxInseparableFraction is the share of bins in the band with
	// inseparable inputs above which the multiple-input estimate is given up
	// for the reference-input fallback.
	DefaultMaxInseparableFraction = 0.25
)

// FRFOptions tune EstimateFRF. The zero value selects the defaults.
type FRFOptions struct {
	// BandHz is the analysis band [lo, hi] in which conditioning is judged;
	// zero means every bin above DC.
	BandHz                 [2]float64
	MaxCondition           float64
	MaxInseparableFraction float64
	// bandOnly leaves every bin outside BandHz NaN (Condition too): the
	// resolution choice's quick estimates look at the band alone.
	bandOnly bool
}

// Method says how an FRFSet was estimated.
type Method int

const (
	// MultipleInput is the multiple-input H1 on all inputs.
	MultipleInput Method = iota
	// ReferenceInput is the single-input H1 on the first (reference) input,
	// the fallback when the inputs are too correlated to separate.
	ReferenceInput
)

func (m Method) String() string {
	if m == ReferenceInput {
		return "reference-input H1"
	}
	return "multiple-input H1"
}

// WarningCode classifies a Warning.
type WarningCode string

// Warning codes.
const (
	WarnInseparableBins   WarningCode = "inseparable-bins"   // some bins set to NaN
	WarnReferenceFallback WarningCode = "reference-fallback" // inputs correlated over much of the band
	WarnFewAverages       WarningCode = "few-averages"       // below MinAverages
	WarnShortRecord       WarningCode = "short-record"       // resolution and averages cannot both be met
	WarnNoHalfPower       WarningCode = "no-half-power"      // damping estimate not available
)

// Warning is a condition the user should know about, returned as data.
type Warning struct {
	Code    WarningCode
	Message string
}

// Pair is the FRF of one output on one input with its coherence and 1-sd
// random errors.
type Pair struct {
	Output, Input string
	H             []complex128 // FRF, output per input
	// Coherence is the ordinary coherence for one input, the partial
	// coherence of the output with this input given the others otherwise.
	Coherence    []float64
	CoherenceErr []float64 // 1-sd random error of Coherence (absolute)
	MagRelErr    []float64 // normalised random error of |H| (1 sd, relative)
	PhaseErrRad  []float64 // 1-sd random error of the phase of H [rad]
}

// FRFSet holds the FRFs of every output on every input.
type FRFSet struct {
	FreqsHz []float64
	Inputs  []string
	Outputs []string
	Method  Method
	Pairs   [][]Pair // [output][input]
	// MultipleCoherence[o] is the multiple coherence of output o on all the
	// inputs used (equal to the ordinary coherence for one input), with its
	// 1-sd absolute random error.
	MultipleCoherence    [][]float64
	MultipleCoherenceErr [][]float64
	// Condition is the 2-norm condition number of the input spectral matrix
	// per bin (1 for one input, +Inf where singular).
	Condition []float64
	Averages  float64 // effective number of averages nd
	Warnings  []Warning
}

// EstimateFRF estimates the FRFs of the output channels on one or two
// input channels (indices into s.Channels; a rig's front and rear pans)
// from the spectral matrix: the multiple-input H1 (H1 = Gxy/Gxx for one
// input), multiple and partial coherence, the condition number of Gxx and
// random-error bands. More than two inputs panic.
//
// Bins where Gxx is singular (such as DC after a mean detrend) get NaN.
// Correlated inputs: at bins in the band where cond(Gxx) exceeds MaxCondition the paths
// cannot be told apart; their FRFs and coherences are set to NaN and a
// WarnInseparableBins warning names the bands. If more than
// MaxInseparableFraction of the band is affected (a road-like drive, rear =
// front delayed), the set falls back to the single-input H1 on inputs[0]
// (Method ReferenceInput): the response per unit reference-pan motion with
// the other pan moving as it did in this test, which is what such data can
// support, and a WarnReferenceFallback warning says so.
//
// Random errors with q inputs and nd effective averages, with coh the pair's
// (ordinary or partial) coherence and nq = nd - q + 1:
//
//	eps|H| = sqrt(1-coh)/(sqrt(coh) sqrt(2 nq)),  sd(phase) = eps|H| rad,
//	sd(coh) = coh sqrt(2)(1-coh)/(sqrt(coh) sqrt(nq)),
//
// Bendat & Piersol's single-input results with the partial coherence and
// the degrees of freedom nd - q + 1 for the conditioned estimates (their
// Sec. 9.3, from memory). With output noise spectrum Gnn this equals the
// asymptotic variance Gnn (Gxx^-1)_ii/nd of the least-squares estimate H_i
// split evenly between magnitude and phase [derived]; TestErrorBandCoverage
// checks the coverage by Monte Carlo. The bands are first-order: they hold
// where eps|H| is below about 0.2 (Bendat & Piersol, from memory); where the
// coherence is low, near a zero of H, |H| is biased up and the bands are too
// narrow.
//
// References:
//   - J. S. Bendat and A. G. Piersol, Random Data: Analysis and Measurement
//     Procedures, 4th ed., Wiley, 2010, Ch. 6-7 (multiple-input models) and
//     Ch. 9 (statistical errors in frequency response estimates).
//   - J. S. Bendat and A. G. Piersol, Engineering Applications of
//     Correlation and Spectral Analysis, 2nd ed., Wiley, 1993, Ch. 7.
func EstimateFRF(s *Spectra, inputs, outputs []int, opt FRFOptions) (*FRFSet, error) {
	if len(inputs) == 0 || len(outputs) == 0 {
		panic("spectral: EstimateFRF needs at least one input and one output")
	}
	for _, c := range append(append([]int(nil), inputs...), outputs...) {
		s.checkChannel(c)
	}
	if opt.MaxCondition == 0 {
		opt.MaxCondition = DefaultMaxCondition
	}
	if opt.MaxInseparableFraction == 0 {
		opt.MaxInseparableFraction = DefaultMaxInseparableFraction
	}
	q := len(inputs)
	if nq := s.EffectiveAverages - float64(q) + 1; nq < 1 {
		return nil, &ShortRecordError{SegmentLen: s.SegmentLen, Segments: s.Segments, Need: q + 1,
			Samples: s.SegmentLen + (s.Segments-1)*(s.SegmentLen-s.Overlap)}
	}
	set := newFRFSet(s, inputs, outputs)
	herm := newHermitian(q)
	var bad []bool
	inBand, nBad := 0, 0
	for f, g := range s.G {
		if opt.bandOnly && !bandContains(opt.BandHz, s.FreqsHz[f]) {
			set.Condition[f] = math.NaN()
			set.fillNaN(f)
			continue
		}
		herm.load(g, inputs)
		set.Condition[f] = herm.condition()
		sep := set.Condition[f] <= opt.MaxCondition && herm.invert()
		if bandContains(opt.BandHz, s.FreqsHz[f]) {
			inBand++
			if !sep {
				if bad == nil {
					bad = make([]bool, len(s.G))
				}
				bad[f] = true
				nBad++
			}
		}
		if !sep {
			set.fillNaN(f)
			continue
		}
		set.fillBin(f, g, herm, inputs, outputs)
	}
	if nBad == 0 {
		return set, nil
	}
	if q > 1 && float64(nBad) > opt.MaxInseparableFraction*float64(inBand) {
		ref, err := EstimateFRF(s, inputs[:1], outputs, opt)
		if err != nil {
			return nil, err
		}
		ref.Method = ReferenceInput
		ref.Warnings = append(ref.Warnings, Warning{Code: WarnReferenceFallback, Message: fmt.Sprintf(
			"inputs %s are too correlated to separate at %d of %d bins in the band (condition number of Gxx above %g): "+
				"FRFs are given on the reference input %s alone, which includes the effect of the other inputs as driven in this test; "+
				"drive the inputs with independent signals to separate the paths",
			strings.Join(set.Inputs, ", "), nBad, inBand, opt.MaxCondition, set.Inputs[0])})
		return ref, nil
	}
	set.Warnings = append(set.Warnings, Warning{Code: WarnInseparableBins, Message: fmt.Sprintf(
		"the input spectral matrix is ill-conditioned (condition number above %g) at %s; FRFs there are NaN",
		opt.MaxCondition, describeBins(s.FreqsHz, bad))})
	return set, nil
}

func newFRFSet(s *Spectra, inputs, outputs []int) *FRFSet {
	nf := len(s.G)
	set := &FRFSet{
		FreqsHz:              append([]float64(nil), s.FreqsHz...),
		Pairs:                make([][]Pair, len(outputs)),
		MultipleCoherence:    make([][]float64, len(outputs)),
		MultipleCoherenceErr: make([][]float64, len(outputs)),
		Condition:            make([]float64, nf),
		Averages:             s.EffectiveAverages,
	}
	for _, i := range inputs {
		set.Inputs = append(set.Inputs, s.Channels[i])
	}
	for o, c := range outputs {
		set.Outputs = append(set.Outputs, s.Channels[c])
		set.MultipleCoherence[o] = make([]float64, nf)
		set.MultipleCoherenceErr[o] = make([]float64, nf)
		set.Pairs[o] = make([]Pair, len(inputs))
		for i := range inputs {
			set.Pairs[o][i] = Pair{
				Output: s.Channels[c], Input: set.Inputs[i],
				H:            make([]complex128, nf),
				Coherence:    make([]float64, nf),
				CoherenceErr: make([]float64, nf),
				MagRelErr:    make([]float64, nf),
				PhaseErrRad:  make([]float64, nf),
			}
		}
	}
	return set
}

// bandContains is InBand, with the zero band standing for every frequency
// above 0.
func bandContains(bandHz [2]float64, fHz float64) bool {
	if bandHz == [2]float64{} {
		return fHz > 0
	}
	return InBand(bandHz, fHz)
}

// InBand reports whether fHz lies in the band [lo, hi], edges included with
// a relative slack of RateSlack: a bin that falls on an edge for a round
// rate (bin 24 of 1024 at 21.33 Hz is 0.5 Hz) stays in the band when the
// rate comes out a rounding lower or higher (255.99999999999778 Hz fitted to
// the time stamps of a 256 Hz log).
func InBand(bandHz [2]float64, fHz float64) bool {
	return fHz >= bandHz[0]*(1-RateSlack) && fHz <= bandHz[1]*(1+RateSlack)
}

// RateSlack is the relative error of a sample rate that the choices made
// from it (DecimationFactor, InBand) treat as rounding, 1e-6, so that
// rounding never changes them. It covers the rates that reach them: float64
// arithmetic on decimal time stamps (1e-15), a rate written to seven
// significant digits (5e-8 for 199.99999 Hz), a rate fitted to time stamps
// rounded to 4 or 5 decimals (1e-8 or less for a few minutes of log, at worst
// 1.5 u/(N dt) for N stamps of step dt rounded to u). Against that, 1e-6 of
// a frequency is nothing an analysis can see: 0.5 µHz at the default band's
// 0.5 Hz edge.
const RateSlack = 1e-6

func (set *FRFSet) fillNaN(f int) {
	nan := math.NaN()
	for o := range set.Pairs {
		set.MultipleCoherence[o][f] = nan
		set.MultipleCoherenceErr[o][f] = nan
		for i := range set.Pairs[o] {
			p := &set.Pairs[o][i]
			p.H[f] = cmplx.NaN()
			p.Coherence[f], p.CoherenceErr[f], p.MagRelErr[f], p.PhaseErrRad[f] = nan, nan, nan, nan
		}
	}
}

// fillBin solves the normal equations at bin f with the inverse of Gxx held
// by herm and fills coherences and errors.
func (set *FRFSet) fillBin(f int, g [][]complex128, herm *hermitian, inputs, outputs []int) {
	q := len(inputs)
	nq := set.Averages - float64(q) + 1
	for o, y := range outputs {
		gyy := real(g[y][y])
		explained := 0.0
		for i := range inputs {
			var h complex128
			for k, xk := range inputs {
				h += herm.invAt(i, k) * g[xk][y]
			}
			set.Pairs[o][i].H[f] = h
			explained += real(cmplx.Conj(g[inputs[i]][y]) * h)
		}
		residual := math.Max(gyy-explained, 0) // G_yy.x
		multiple := 1.0
		if gyy > 0 {
			multiple = 1 - residual/gyy
		}
		set.MultipleCoherence[o][f] = multiple
		set.MultipleCoherenceErr[o][f] = coherenceErr(multiple, nq)
		for i := range inputs {
			p := &set.Pairs[o][i]
			a := cmplx.Abs(p.H[f])
			cond := a * a / real(herm.invAt(i, i)) // |H_i|^2 G_ii.r
			coh := 1.0
			if cond+residual > 0 {
				coh = cond / (cond + residual)
			}
			p.Coherence[f] = coh
			p.CoherenceErr[f] = coherenceErr(coh, nq)
			e := math.Sqrt(1-coh) / math.Sqrt(coh*2*nq)
			p.MagRelErr[f], p.PhaseErrRad[f] = e, e
		}
	}
}

// coherenceErr is the 1-sd random error of a coherence estimate, coh times
// sqrt(2)(1-coh)/(sqrt(coh) sqrt(n)) (Bendat & Piersol, 4th ed., 2010,
// Sec. 9.2.3, from memory).
func coherenceErr(coh, n float64) float64 {
	return coh * math.Sqrt2 * (1 - coh) / math.Sqrt(coh*n)
}

// describeBins lists the runs of flagged bins as frequency ranges.
func describeBins(freqsHz []float64, bad []bool) string {
	var parts []string
	for f := 0; f < len(bad); f++ {
		if !bad[f] {
			continue
		}
		start := f
		for f+1 < len(bad) && bad[f+1] {
			f++
		}
		if start == f {
			parts = append(parts, fmt.Sprintf("%.3g Hz", freqsHz[f]))
		} else {
			parts = append(parts, fmt.Sprintf("%.3g-%.3g Hz", freqsHz[start], freqsHz[f]))
		}
	}
	return strings.Join(parts, ", ")
}
