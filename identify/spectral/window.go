package spectral

import (
	"fmt"

	"gonum.org/v1/gonum/dsp/window"
)

// Window names a data window.
//
// Hann, Hamming and FlatTop are periodic (DFT-even): the first n samples of
// gonum's symmetric window of length n+1, which is what scipy.signal's
// get_window returns by default.
//
// References:
//   - F. J. Harris, "On the use of windows for harmonic analysis with the
//     discrete Fourier transform", Proc. IEEE 66(1):51-83, 1978,
//     doi:10.1109/PROC.1978.10837.
//   - ISO 18431-2:2004, Mechanical vibration and shock - Signal processing -
//     Part 2: Time domain windows for Fourier Transform analysis.
type Window int

const (
	// Hann is the periodic Hann window 0.5 - 0.5 cos(2 pi n/N), the default
	// for random drive.
	Hann Window = iota
	// Hamming is the periodic Hamming window 0.54 - 0.46 cos(2 pi n/N).
	Hamming
	// FlatTop is the periodic five-term flat-top window (amplitude-accurate,
	// coarse resolution).
	FlatTop
	// Rectangular applies no weighting (periodic or fully captured transient
	// records).
	Rectangular
)

// String returns the window's name.
func (w Window) String() string {
	switch w {
	case Hann:
		return "hann"
	case Hamming:
		return "hamming"
	case FlatTop:
		return "flattop"
	case Rectangular:
		return "rectangular"
	}
	return fmt.Sprintf("Window(%d)", int(w))
}

// Values returns the n window weights.
func (w Window) Values(n int) ([]float64, error) {
	if n < 1 {
		return nil, fmt.Errorf("window length %d, need at least 1", n)
	}
	switch w {
	case Hann:
		return periodic(window.Hann, n), nil
	case Hamming:
		return periodic(window.Hamming, n), nil
	case FlatTop:
		return periodic(window.FlatTop, n), nil
	case Rectangular:
		return periodic(window.Rectangular, n), nil
	}
	return nil, fmt.Errorf("unknown window %d", int(w))
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
