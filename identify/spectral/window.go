package spectral

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/dsp/window"
)

// WindowKind names a data window.
type WindowKind int

const (
	// Hann is the periodic Hann window 0.5 - 0.5 cos(2 pi n/N), the default
	// for random drive.
	Hann WindowKind = iota
	// Hamming is the periodic Hamming window 0.54 - 0.46 cos(2 pi n/N).
	Hamming
	// FlatTop is the periodic five-term flat-top window (amplitude-accurate,
	// coarse resolution).
	FlatTop
	// Rectangular applies no weighting (periodic or fully captured transient
	// records).
	Rectangular
	// Exponential is exp(-t/DecayS) from the first sample of the segment, for
	// decaying responses to a transient.
	Exponential
	// Force is one over the first WidthS seconds, then a half-cosine taper to
	// zero over TaperS seconds, then zero: it keeps the pulse of a transient
	// input and discards the noise after it.
	Force
)

// Window is a data window with the parameters of the transient windows.
//
// Hann, Hamming and FlatTop are periodic (DFT-even): the first n samples of
// gonum's symmetric window of length n+1, which is what scipy.signal's
// get_window returns by default. The exponential window is
// scipy.signal.windows.exponential(n, center=0, tau=DecayS*fsHz, sym=False).
//
// References:
//   - F. J. Harris, "On the use of windows for harmonic analysis with the
//     discrete Fourier transform", Proc. IEEE 66(1):51-83, 1978,
//     doi:10.1109/PROC.1978.10837.
//   - ISO 18431-2:2004, Mechanical vibration and shock - Signal processing -
//     Part 2: Time domain windows for Fourier Transform analysis.
type Window struct {
	Kind   WindowKind
	DecayS float64 // Exponential: time constant [s]
	WidthS float64 // Force: length of the flat part [s]
	TaperS float64 // Force: length of the half-cosine taper [s]
}

// String returns the window's name.
func (w Window) String() string {
	switch w.Kind {
	case Hann:
		return "hann"
	case Hamming:
		return "hamming"
	case FlatTop:
		return "flattop"
	case Rectangular:
		return "rectangular"
	case Exponential:
		return fmt.Sprintf("exponential(decay %g s)", w.DecayS)
	case Force:
		return fmt.Sprintf("force(width %g s, taper %g s)", w.WidthS, w.TaperS)
	}
	return fmt.Sprintf("WindowKind(%d)", int(w.Kind))
}

// Values returns the n window weights for a segment sampled at fsHz.
func (w Window) Values(n int, fsHz float64) ([]float64, error) {
	if n < 1 {
		return nil, fmt.Errorf("spectral: window length %d, need at least 1", n)
	}
	switch w.Kind {
	case Hann:
		return periodic(window.Hann, n), nil
	case Hamming:
		return periodic(window.Hamming, n), nil
	case FlatTop:
		return periodic(window.FlatTop, n), nil
	case Rectangular:
		return periodic(window.Rectangular, n), nil
	case Exponential:
		if !(w.DecayS > 0) || !(fsHz > 0) {
			return nil, fmt.Errorf("spectral: exponential window needs a positive decay time and sample rate, got %g s at %g Hz", w.DecayS, fsHz)
		}
		tau := w.DecayS * fsHz
		v := make([]float64, n)
		for i := range v {
			v[i] = math.Exp(-float64(i) / tau)
		}
		return v, nil
	case Force:
		if !(w.WidthS > 0) || w.TaperS < 0 || !(fsHz > 0) {
			return nil, fmt.Errorf("spectral: force window needs a positive width, a non-negative taper and a positive sample rate, got %g s, %g s at %g Hz", w.WidthS, w.TaperS, fsHz)
		}
		v := make([]float64, n)
		for i := range v {
			tS := float64(i) / fsHz
			switch {
			case tS < w.WidthS:
				v[i] = 1
			case tS < w.WidthS+w.TaperS:
				v[i] = 0.5 * (1 + math.Cos(math.Pi*(tS-w.WidthS)/w.TaperS))
			}
		}
		return v, nil
	}
	return nil, fmt.Errorf("spectral: unknown window kind %d", int(w.Kind))
}

// periodic returns the DFT-even form of one of gonum's symmetric windows:
// the first n weights of the symmetric window of length n+1.
func periodic(sym func([]float64) []float64, n int) []float64 {
	v := make([]float64, n+1)
	for i := range v {
		v[i] = 1
	}
	return sym(v)[:n]
}

// noiseBandwidthBins returns the window's equivalent noise bandwidth in
// bins, N sum(w^2)/(sum w)^2 (1.5 for Hann, Harris 1978, Table 1).
func noiseBandwidthBins(w []float64) float64 {
	var s, s2 float64
	for _, v := range w {
		s += v
		s2 += v * v
	}
	return float64(len(w)) * s2 / (s * s)
}

// effectiveAverages returns the equivalent number of independent averages
// of k segments of window w advanced by hop samples:
//
//	nd = k / (1 + 2 sum_{j=1}^{k-1} (1 - j/k) rho(j)),
//	rho(j) = (sum_n w[n] w[n + j hop])^2 / (sum_n w[n]^2)^2,
//
// the variance of Welch's estimate of a Gaussian process whose spectrum is
// smooth over the window's bandwidth. For Hann at 50 % overlap rho(1) = 1/36
// and nd -> k/1.056 for large k.
//
// References:
//   - P. D. Welch, "The use of fast Fourier transform for the estimation of
//     power spectra", IEEE Trans. Audio Electroacoust. AU-15(2):70-73, 1967,
//     Eq. (12), doi:10.1109/TAU.1967.1161901.
func effectiveAverages(w []float64, hop, k int) float64 {
	if k <= 1 {
		return float64(k)
	}
	var e float64
	for _, v := range w {
		e += v * v
	}
	var sum float64
	for j := 1; j < k && j*hop < len(w); j++ {
		var c float64
		for n := 0; n+j*hop < len(w); n++ {
			c += w[n] * w[n+j*hop]
		}
		rho := (c / e) * (c / e)
		sum += (1 - float64(j)/float64(k)) * rho
	}
	return float64(k) / (1 + 2*sum)
}
