// Package lpm estimates the FRFs of a two-input rig test by the local
// polynomial method: from one DFT of the whole record per channel, the FRFs
// and the leakage (transient) term are fitted together at every bin over
// its neighbouring bins, so the estimate carries no leakage and no window's
// smoothing, and the noise level comes from the fit's residuals.
//
// At bin k, over the 2R+1 bins j = k+r (r = -R..R, shifted at the edges of
// the spectrum), every output Y is modelled as
//
//	Y_j = sum_i G_i(r) U_{i,j} + T(r) + V_j,
//	G_i(r) = sum_{s=0}^{Degree} g_{i,s} (r/R)^s,  T(r) = sum_s t_s (r/R)^s,
//
// with U_i the inputs' DFTs and V the noise, circular and white across the
// window with variance sigma^2. The (inputs+1)(Degree+1) complex
// coefficients are the linear least-squares solution theta = (K^H K)^-1 K^H Y;
// the FRF estimate is G_i(k) = g_{i,0}; the noise variance is the residual
// sum of squares over its q = 2R+1 - (inputs+1)(Degree+1) complex degrees of
// freedom, and the FRF's variance sigma^2 [(K^H K)^-1]_{ii}. The noise
// variance is smoothed over neighbouring bins (it varies slowly with
// frequency), so that each bin's error band is well determined.
//
// Estimates at bins less than 2R+1 apart share data, so their errors
// correlate: Estimate reports the mean correlation per lag, computed from the
// estimator's own weights (FRFs.ErrorCorrelation).
//
// Conventions: the DFT X_k = sum_n x_n e^{-2 pi i k n/N} (gonum's
// dsp/fourier), bin k at k fs/N Hz, the e^{+i omega t} convention of package
// spectral; the FRFs are dimensionless (acceleration per acceleration).
//
// Reference: R. Pintelon, J. Schoukens, G. Vandersteen and K. Barbé,
// "Estimation of nonparametric noise and FRF models for multivariable
// systems - Part I: Theory", Mechanical Systems and Signal Processing
// 24(3):573-595, 2010.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer; it imports spectral (the Recording it reads) and gonum.
package lpm

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"

	"github.com/ridemodes/ridemodes/identify/spectral"
)

const (
	// Degree is the degree of the local polynomials in the bin offset: 2,
	// as Pintelon et al. (2010) advise for the FRF and the transient.
	Degree = 2
	// DefaultHalfWidth is R: with two inputs, 2R+1 = 15 bins leave 6
	// complex degrees of freedom for the noise.
	DefaultHalfWidth = 7
	// noiseSmoothing is how many window widths (2R+1 bins) each side of a
	// bin the noise variance is averaged over.
	noiseSmoothing = 2
)

// Options configure Estimate.
type Options struct {
	BandHz    [2]float64 // the bins estimated [Hz]; required
	HalfWidth int        // R; 0 means DefaultHalfWidth
	// Stride estimates every Stride-th bin of the band (0 or 1: every
	// bin): a long record's bins lie so close that neighbours add little.
	// The noise is then smoothed over the estimated bins alone.
	Stride int
}

// FRFs are the local polynomial estimates over the band.
type FRFs struct {
	FreqHz []float64 // bin frequencies [Hz]
	// H is the FRF [output][input][bin]; SigmaAbs the 1-sigma error of each
	// of its real and imaginary parts.
	H        [][][]complex128
	SigmaAbs [][][]float64
	// Coherence is 1 - sigma^2/P per output and bin, P the mean |Y|^2 over
	// the bin's window: the share of the output the inputs explain.
	Coherence [][]float64
	// ErrorCorrelation[l-1] is the mean correlation of the errors of H at
	// bins k and k+l of FreqHz (real and imaginary parts alike), while the
	// bins' windows overlap.
	ErrorCorrelation []float64
	// OutputCorrelation[o][o2][bin] is the complex correlation coefficient
	// of the errors of outputs o and o2 on the same input at one bin, from
	// the residuals' cross products: the inputs' own noise (and any noise
	// the outputs share) reaches every output.
	OutputCorrelation [][][]complex128
	HalfWidth         int // R
	DFTLen            int // samples of the record transformed
	DOF               int // q, complex degrees of freedom of each noise estimate
}

// Estimate reads the channels of rec (sampled at fsHz) and estimates the
// FRFs of each output channel on the input channels (indices into rec's
// blocks) at every DFT bin of the band. The record is cut to the longest
// length whose only prime factors are 2, 3 and 5 (a fast DFT; the transient
// term absorbs the cut).
func Estimate(rec spectral.Recording, fsHz float64, inputs, outputs []int, opt Options) (*FRFs, error) {
	R := opt.HalfWidth
	if R == 0 {
		R = DefaultHalfWidth
	}
	ni := len(inputs)
	np := (ni + 1) * (Degree + 1)
	q := 2*R + 1 - np
	if ni < 1 || len(outputs) < 1 {
		return nil, errors.New("lpm: need at least one input and one output")
	}
	if q < 1 {
		return nil, fmt.Errorf("lpm: %d bins per window leave no degrees of freedom for %d parameters; widen the window", 2*R+1, np)
	}
	n := smoothLength(rec.Samples())
	half := n / 2 // highest bin kept is half-1 (below Nyquist)
	kLo := int(math.Ceil(opt.BandHz[0] * float64(n) / fsHz))
	kHi := int(math.Floor(opt.BandHz[1] * float64(n) / fsHz))
	kLo, kHi = max(kLo, 1), min(kHi, half-1)
	if kHi-kLo+1 < 2*R+1 || half-1 < 2*R+1 {
		return nil, fmt.Errorf("lpm: the record of %d samples holds %d bins in %g-%g Hz, fewer than the %d of one window; record longer",
			rec.Samples(), max(kHi-kLo+1, 0), opt.BandHz[0], opt.BandHz[1], 2*R+1)
	}
	// The DFT bins the windows reach, per channel.
	jLo, jHi := max(kLo-R, 1), min(kHi+R, half-1)
	fft := fourier.NewFFT(n)
	x := make([]float64, 0, rec.Samples())
	coef := make([]complex128, n/2+1)
	dft := func(ch int) ([]complex128, error) {
		x = x[:0]
		if err := rec.Replay(func(b [][]float64) { x = append(x, b[ch]...) }); err != nil {
			return nil, err
		}
		fft.Coefficients(coef, x[:n])
		return append([]complex128(nil), coef[jLo:jHi+1]...), nil
	}
	U := make([][]complex128, ni)
	scale := make([]float64, ni) // RMS of |U_i| over the bins: conditions K
	for i, ch := range inputs {
		var err error
		if U[i], err = dft(ch); err != nil {
			return nil, err
		}
		for _, u := range U[i] {
			scale[i] += real(u)*real(u) + imag(u)*imag(u)
		}
		scale[i] = math.Sqrt(scale[i] / float64(len(U[i])))
		if !(scale[i] > 0) {
			return nil, fmt.Errorf("lpm: input channel %d has no content in %g-%g Hz", ch, opt.BandHz[0], opt.BandHz[1])
		}
		for j := range U[i] {
			U[i][j] /= complex(scale[i], 0)
		}
	}
	Y := make([][]complex128, len(outputs))
	for o, ch := range outputs {
		var err error
		if Y[o], err = dft(ch); err != nil {
			return nil, err
		}
	}
	x, coef = nil, nil

	// The estimated bins: k = kLo + b stride, b = 0..nb-1; lags below are
	// counted in them.
	stride := max(opt.Stride, 1)
	nb := (kHi-kLo)/stride + 1
	w := 2*R + 1
	lags := 2 * R / stride // the windows of bins this many apart still overlap
	res := &FRFs{FreqHz: make([]float64, nb), HalfWidth: R, DFTLen: n, DOF: q}
	for b := range nb {
		res.FreqHz[b] = float64(kLo+b*stride) * fsHz / float64(n)
	}
	no := len(outputs)
	noise := make([][]float64, no)      // raw sigma^2 per output and bin
	cross := make([][][]complex128, no) // raw residual cross products [o][o2 > o][bin]
	for o := range cross {
		cross[o] = make([][]complex128, no)
		for o2 := o + 1; o2 < no; o2++ {
			cross[o][o2] = make([]complex128, nb)
		}
	}
	resid := make([][]complex128, no)
	for o := range resid {
		resid[o] = make([]complex128, w)
	}
	power := make([][]float64, len(outputs)) // mean |Y|^2 over the window
	for o := range outputs {
		res.H = append(res.H, make([][]complex128, ni))
		res.SigmaAbs = append(res.SigmaAbs, make([][]float64, ni))
		for i := range ni {
			res.H[o][i] = make([]complex128, nb)
			res.SigmaAbs[o][i] = make([]float64, nb)
		}
		noise[o], power[o] = make([]float64, nb), make([]float64, nb)
	}
	varFactor := make([][]float64, ni) // [(K^H K)^-1]_ii / scale_i^2 per bin
	for i := range varFactor {
		varFactor[i] = make([]float64, nb)
	}

	K := make([]complex128, w*np) // row-major, w x np
	real2 := mat.NewSymDense(2*np, nil)
	var chol mat.Cholesky
	var inv mat.SymDense
	minv := make([]complex128, np*np)
	A := make([]complex128, np*w) // (K^H K)^-1 K^H
	theta := make([]complex128, np)
	// The rows of A that give g_{i,0}, for the last lags+1 bins, with the
	// first DFT bin of their window: for the error correlation.
	type weights struct {
		j0 int
		a  [][]complex128 // [input][window bin]
	}
	ring := make([]weights, lags+1)
	for r := range ring {
		ring[r].a = make([][]complex128, ni)
		for i := range ni {
			ring[r].a[i] = make([]complex128, w)
		}
	}
	corrSum := make([]float64, lags)
	corrN := make([]float64, lags)

	for b := range nb {
		k := kLo + b*stride
		j0 := min(max(k-R, 1), half-1-2*R) // first bin of the window
		for r := range w {
			x := float64(j0+r-k) / float64(R)
			p := 1.0
			for s := 0; s <= Degree; s++ {
				for i := range ni {
					K[r*np+i*(Degree+1)+s] = U[i][j0+r-jLo] * complex(p, 0)
				}
				K[r*np+ni*(Degree+1)+s] = complex(p, 0)
				p *= x
			}
		}
		// (K^H K)^-1 through the real symmetric form [[Re, -Im], [Im, Re]].
		for a := range np {
			for c := a; c < np; c++ {
				var m complex128
				for r := range w {
					m += cmplx.Conj(K[r*np+a]) * K[r*np+c]
				}
				real2.SetSym(a, c, real(m))
				real2.SetSym(np+a, np+c, real(m))
				real2.SetSym(a, np+c, -imag(m))
				real2.SetSym(c, np+a, imag(m))
			}
		}
		if !chol.Factorize(real2) {
			return nil, fmt.Errorf("lpm: the inputs cannot be told apart near %.4g Hz (the local regression is singular); were the pans driven independently?", res.FreqHz[b])
		}
		if err := chol.InverseTo(&inv); err != nil {
			return nil, fmt.Errorf("lpm: near %.4g Hz: %w", res.FreqHz[b], err)
		}
		for a := range np {
			for c := range np {
				minv[a*np+c] = complex(inv.At(a, c), inv.At(np+a, c))
			}
		}
		for a := range np {
			for r := range w {
				var s complex128
				for c := range np {
					s += minv[a*np+c] * cmplx.Conj(K[r*np+c])
				}
				A[a*w+r] = s
			}
		}
		slot := &ring[b%(lags+1)]
		slot.j0 = j0
		for i := range ni {
			row := i * (Degree + 1)
			varFactor[i][b] = real(minv[row*np+row]) / (scale[i] * scale[i])
			for r := range w {
				slot.a[i][r] = A[row*w+r] / complex(scale[i], 0)
			}
		}
		// Correlation with the estimates at the previous bins whose windows
		// overlap this one's.
		for l := 1; l <= lags && l <= b; l++ {
			prev := &ring[(b-l)%(lags+1)]
			for i := range ni {
				var c complex128
				for r := range w {
					if rp := slot.j0 + r - prev.j0; rp >= 0 && rp < w {
						c += prev.a[i][rp] * cmplx.Conj(slot.a[i][r])
					}
				}
				corrSum[l-1] += real(c) / math.Sqrt(varFactor[i][b]*varFactor[i][b-l])
				corrN[l-1]++
			}
		}
		for o := range outputs {
			y := Y[o][j0-jLo : j0-jLo+w]
			for a := range np {
				var s complex128
				for r := range w {
					s += A[a*w+r] * y[r]
				}
				theta[a] = s
			}
			var ssr, pw float64
			for r := range w {
				e := y[r]
				for c := range np {
					e -= K[r*np+c] * theta[c]
				}
				resid[o][r] = e
				ssr += real(e)*real(e) + imag(e)*imag(e)
				pw += real(y[r])*real(y[r]) + imag(y[r])*imag(y[r])
			}
			noise[o][b], power[o][b] = ssr/float64(q), pw/float64(w)
			for i := range ni {
				res.H[o][i][b] = theta[i*(Degree+1)] / complex(scale[i], 0)
			}
		}
		for o := range no {
			for o2 := o + 1; o2 < no; o2++ {
				var c complex128
				for r := range w {
					c += resid[o][r] * cmplx.Conj(resid[o2][r])
				}
				cross[o][o2][b] = c / complex(float64(q), 0)
			}
		}
	}
	for l := range corrSum {
		if corrN[l] > 0 {
			res.ErrorCorrelation = append(res.ErrorCorrelation, corrSum[l]/corrN[l])
		}
	}
	smooth := (noiseSmoothing*w + stride - 1) / stride
	sm := make([][]float64, no)
	for o := range no {
		sm[o] = movingMean(noise[o], smooth)
		coh := make([]float64, nb)
		for b := range nb {
			for i := range ni {
				res.SigmaAbs[o][i][b] = math.Sqrt(sm[o][b] * varFactor[i][b] / 2)
			}
			coh[b] = math.Max(0, 1-sm[o][b]/power[o][b])
		}
		res.Coherence = append(res.Coherence, coh)
	}
	res.OutputCorrelation = make([][][]complex128, no)
	for o := range no {
		res.OutputCorrelation[o] = make([][]complex128, no)
		one := make([]complex128, nb)
		for b := range one {
			one[b] = 1
		}
		res.OutputCorrelation[o][o] = one
	}
	re, im := make([]float64, nb), make([]float64, nb)
	for o := range no {
		for o2 := o + 1; o2 < no; o2++ {
			for b, c := range cross[o][o2] {
				re[b], im[b] = real(c), imag(c)
			}
			sre, sim := movingMean(re, smooth), movingMean(im, smooth)
			c, cc := make([]complex128, nb), make([]complex128, nb)
			for b := range nb {
				c[b] = complex(sre[b], sim[b]) / complex(math.Sqrt(sm[o][b]*sm[o2][b]), 0)
				cc[b] = cmplx.Conj(c[b])
			}
			res.OutputCorrelation[o][o2], res.OutputCorrelation[o2][o] = c, cc
		}
	}
	return res, nil
}

// movingMean returns the mean of x over x[b-h..b+h], cut at the ends.
func movingMean(x []float64, h int) []float64 {
	cum := make([]float64, len(x)+1)
	for i, v := range x {
		cum[i+1] = cum[i] + v
	}
	out := make([]float64, len(x))
	for b := range x {
		lo, hi := max(b-h, 0), min(b+h+1, len(x))
		out[b] = (cum[hi] - cum[lo]) / float64(hi-lo)
	}
	return out
}

// smoothLength returns the largest n <= m whose only prime factors are 2, 3
// and 5 (m >= 1).
func smoothLength(m int) int {
	best := 1
	for p2 := 1; p2 <= m; p2 *= 2 {
		for p3 := p2; p3 <= m; p3 *= 3 {
			for p5 := p3; p5 <= m; p5 *= 5 {
				best = max(best, p5)
			}
		}
	}
	return best
}
