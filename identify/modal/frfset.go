package modal

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"

	"github.com/ridemodes/ridemodes/identify/spectral"
)

// FRFSet holds the FRFs of every body sensor (output) on every wheel pan
// (input) with their error bands: the data the quick estimate and the fit
// work on.
type FRFSet struct {
	FreqHz []float64 // bin frequencies [Hz], increasing
	// H is the FRF (transmissibility) [output][input][freq], dimensionless.
	H [][][]complex128
	// SigmaAbs is the 1-sigma error of each of Re H and Im H [output][input][freq]
	// (absolute, dimensionless). Bins where H or SigmaAbs is not finite, or
	// SigmaAbs is not positive, are left out of the fit.
	SigmaAbs [][][]float64
	// Coherence is the multiple coherence of each output on all inputs
	// [output][freq]; it enters only the fit-quality report.
	Coherence [][]float64
	// OutputPosM is the longitudinal position s of each sensor [m], positive
	// forward of the CG.
	OutputPosM  []float64
	OutputNames []string
	InputNames  []string
	// ErrorCorrelation[l-1] is the correlation of the errors of H at bins k
	// and k+l (the same for Re and Im parts); nil treats bins as independent.
	// BinCorrelation gives it for a Welch estimate's window.
	ErrorCorrelation []float64
	// OutputCorrelation[o][o2][freq] is the complex correlation coefficient
	// E[e_o conj(e_o2)] / sqrt(E|e_o|^2 E|e_o2|^2) of the errors e of H at
	// one bin between outputs o and o2 on the same input (the same for every
	// input), as when the inputs' own noise reaches every output; the lags
	// follow ErrorCorrelation. nil treats the outputs' errors as independent.
	OutputCorrelation [][][]complex128
	// Kernel is the spectral window through which the FRFs were estimated
	// (WindowKernel); nil when unknown, and then the fit states no
	// resolution bias.
	Kernel []KernelTap
}

// check panics on a malformed set (a caller mistake).
func (s *FRFSet) check() {
	nf := len(s.FreqHz)
	no := len(s.H)
	if no == 0 || len(s.H[0]) == 0 {
		panic("modal: FRFSet needs at least one output and one input")
	}
	ni := len(s.H[0])
	if len(s.SigmaAbs) != no || len(s.OutputPosM) != no {
		panic(fmt.Sprintf("modal: FRFSet has %d outputs in H, %d in SigmaAbs, %d positions", no, len(s.SigmaAbs), len(s.OutputPosM)))
	}
	if s.Coherence != nil && len(s.Coherence) != no {
		panic(fmt.Sprintf("modal: FRFSet has %d outputs in H and %d in Coherence", no, len(s.Coherence)))
	}
	for o := range no {
		if len(s.H[o]) != ni || len(s.SigmaAbs[o]) != ni {
			panic(fmt.Sprintf("modal: FRFSet output %d has %d inputs in H and %d in SigmaAbs, want %d", o, len(s.H[o]), len(s.SigmaAbs[o]), ni))
		}
		for i := range ni {
			if len(s.H[o][i]) != nf || len(s.SigmaAbs[o][i]) != nf {
				panic(fmt.Sprintf("modal: FRFSet H[%d][%d] has %d bins and SigmaAbs %d, want %d", o, i, len(s.H[o][i]), len(s.SigmaAbs[o][i]), nf))
			}
		}
		if s.Coherence != nil && len(s.Coherence[o]) != nf {
			panic(fmt.Sprintf("modal: FRFSet Coherence[%d] has %d bins, want %d", o, len(s.Coherence[o]), nf))
		}
	}
	if s.OutputCorrelation != nil {
		if len(s.OutputCorrelation) != no {
			panic(fmt.Sprintf("modal: FRFSet has %d outputs in H and %d in OutputCorrelation", no, len(s.OutputCorrelation)))
		}
		for o, row := range s.OutputCorrelation {
			if len(row) != no {
				panic(fmt.Sprintf("modal: FRFSet OutputCorrelation[%d] has %d outputs, want %d", o, len(row), no))
			}
			for o2, c := range row {
				if len(c) != nf {
					panic(fmt.Sprintf("modal: FRFSet OutputCorrelation[%d][%d] has %d bins, want %d", o, o2, len(c), nf))
				}
			}
		}
	}
	for k := 1; k < nf; k++ {
		if !(s.FreqHz[k] > s.FreqHz[k-1]) {
			panic(fmt.Sprintf("modal: FRFSet frequencies must increase (bin %d: %g Hz after %g Hz)", k, s.FreqHz[k], s.FreqHz[k-1]))
		}
	}
}

func (s *FRFSet) outputs() int { return len(s.H) }
func (s *FRFSet) inputs() int  { return len(s.H[0]) }

// usable reports whether bin k of every FRF has a finite H and a positive
// finite SigmaAbs.
func (s *FRFSet) usable(k int) bool {
	for o := range s.H {
		for i := range s.H[o] {
			h, sd := s.H[o][i][k], s.SigmaAbs[o][i][k]
			if cmplx.IsNaN(h) || cmplx.IsInf(h) || !(sd > 0) || math.IsInf(sd, 0) {
				return false
			}
		}
	}
	return true
}

// BinCorrelation returns the correlation of the random errors of a Welch H1
// estimate at bins k and k+l, l = 1..maxLag, for segments weighted by the
// window w (one segment's weights):
//
//	rho(l) = |c_l|^2 / c_0^2,  c_l = sum_n w_n^2 e^{-2 pi i l n/N}
//
// [derived: with output noise N and input X independent and white across
// the window's kernel, the error of H1 at bin k is a sum of N_k conj(X_k)
// terms, and E[N_k conj(N_{k+l})] E[conj(X_k) X_{k+l}] is proportional to
// |c_l|^2]. The periodic Hann window gives rho(1) = 4/9, rho(2) = 1/36 and
// zero beyond. The c_l are computed with gonum's FFT of w^2.
func BinCorrelation(w []float64, maxLag int) []float64 {
	n := len(w)
	if n < 2 || maxLag < 1 || maxLag >= n/2 {
		panic(fmt.Sprintf("modal: BinCorrelation needs a window of 2 or more samples and 1 <= maxLag < %d (got %d, %d)", n/2, n, maxLag))
	}
	w2 := make([]float64, n)
	for i, v := range w {
		w2[i] = v * v
	}
	c := fourier.NewFFT(n).Coefficients(nil, w2)
	c0 := real(c[0])
	rho := make([]float64, maxLag)
	for l := range rho {
		a := cmplx.Abs(c[l+1]) / c0
		rho[l] = a * a
	}
	// Drop trailing lags that are negligible (zero for Hann beyond lag 2).
	const negligibleCorrelation = 1e-9
	for len(rho) > 0 && rho[len(rho)-1] < negligibleCorrelation {
		rho = rho[:len(rho)-1]
	}
	return rho
}

// KernelTap is one sample of a spectral window's kernel: the weight of the
// true FRF at OffsetBins bins (a fraction of the bin spacing fs/N) from a bin.
type KernelTap struct {
	OffsetBins, Weight float64
}

// Kernel extent and sampling: the Hann kernel's main lobe spans two bins
// each side and its side lobes fall below -31 dB; flat-top windows reach
// five bins. Eight sub-samples per bin integrate a mode whose half-power
// bandwidth spans a few bins to well under 0.1 %.
const (
	kernelHalfWidthBins = 8
	kernelStepsPerBin   = 8
)

// WindowKernel returns the kernel of a Welch estimate with segments weighted
// by w: the expected H1 of a linear system driven by an input whose
// spectrum is flat across the kernel is the true FRF smoothed by it,
//
//	E[H1](f_k) = sum_t Weight_t H(f_k + OffsetBins_t fs/N),
//
// with weights proportional to |W(b)|^2, W(b) = sum_n w_n e^{-2 pi i b n/N},
// sampled every 1/kernelStepsPerBin bin out to kernelHalfWidthBins and
// normalised to sum to one [derived: E[conj X Y] of a windowed segment is
// the cross spectrum convolved with |W|^2, and the input spectrum cancels
// in the ratio when it is flat; Bendat & Piersol, Random Data, 4th ed.,
// 2010, Sec. 8.5 treat the same smoothing as the resolution bias of a
// spectral estimate]. |W|^2 comes from gonum's FFT of w zero-padded to
// kernelStepsPerBin times its length.
func WindowKernel(w []float64) []KernelTap {
	n := len(w)
	if n < 2*kernelHalfWidthBins {
		panic(fmt.Sprintf("modal: WindowKernel needs a window of at least %d samples (got %d)", 2*kernelHalfWidthBins, n))
	}
	padded := make([]float64, n*kernelStepsPerBin)
	copy(padded, w)
	c := fourier.NewFFT(len(padded)).Coefficients(nil, padded)
	m := kernelHalfWidthBins * kernelStepsPerBin
	taps := make([]KernelTap, 0, 2*m+1)
	sum := 0.0
	for j := -m; j <= m; j++ {
		a := cmplx.Abs(c[abs(j)]) // |W(-b)| = |W(b)| for a real window
		taps = append(taps, KernelTap{OffsetBins: float64(j) / kernelStepsPerBin, Weight: a * a})
		sum += a * a
	}
	for i := range taps {
		taps[i].Weight /= sum
	}
	return taps
}

func abs(j int) int {
	if j < 0 {
		return -j
	}
	return j
}

// FromSpectral builds an FRFSet from the FRFs of package spectral and the
// spectra they came from (for the window's bin correlation), with the
// sensor positions in the order of fs.Outputs. The error bands become
// SigmaAbs = |H| * MagRelErr (the phase error in rad equals MagRelErr, so
// the tangential and radial errors agree). Bins with NaN FRFs (inseparable
// inputs, DC) stay NaN and are skipped by the fit.
func FromSpectral(fs *spectral.FRFSet, sp *spectral.Spectra, outputPosM []float64) (*FRFSet, error) {
	if len(outputPosM) != len(fs.Outputs) {
		panic(fmt.Sprintf("modal: FromSpectral got %d positions for %d outputs", len(outputPosM), len(fs.Outputs)))
	}
	w, err := sp.Window.Values(sp.SegmentLen)
	if err != nil {
		return nil, fmt.Errorf("window of the spectra: %w", err)
	}
	const maxLagBins = 8 // the Hann kernel's correlation ends at lag 2; others decay fast
	set := &FRFSet{
		FreqHz:           append([]float64(nil), fs.FreqsHz...),
		OutputPosM:       append([]float64(nil), outputPosM...),
		OutputNames:      append([]string(nil), fs.Outputs...),
		InputNames:       append([]string(nil), fs.Inputs...),
		ErrorCorrelation: BinCorrelation(w, min(maxLagBins, sp.SegmentLen/2-1)),
	}
	if sp.SegmentLen >= 2*kernelHalfWidthBins {
		set.Kernel = WindowKernel(w)
	}
	for o := range fs.Pairs {
		set.Coherence = append(set.Coherence, append([]float64(nil), fs.MultipleCoherence[o]...))
		var hs [][]complex128
		var ss [][]float64
		for _, p := range fs.Pairs[o] {
			sd := make([]float64, len(p.H))
			for k, h := range p.H {
				sd[k] = cmplx.Abs(h) * p.MagRelErr[k]
			}
			hs = append(hs, append([]complex128(nil), p.H...))
			ss = append(ss, sd)
		}
		set.H = append(set.H, hs)
		set.SigmaAbs = append(set.SigmaAbs, ss)
	}
	return set, nil
}
