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
		return nil, fmt.Errorf("modal: window of the spectra: %w", err)
	}
	const maxLagBins = 8 // the Hann kernel's correlation ends at lag 2; others decay fast
	set := &FRFSet{
		FreqHz:           append([]float64(nil), fs.FreqsHz...),
		OutputPosM:       append([]float64(nil), outputPosM...),
		OutputNames:      append([]string(nil), fs.Outputs...),
		InputNames:       append([]string(nil), fs.Inputs...),
		ErrorCorrelation: BinCorrelation(w, min(maxLagBins, sp.SegmentLen/2-1)),
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
