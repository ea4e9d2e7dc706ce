package lpm

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/ridemodes/ridemodes/identify/spectral"
	"github.com/ridemodes/ridemodes/identify/spool"
)

// resonator is a second-order digital filter
// (b0 + b1 z^-1 + b2 z^-2)/(1 + a1 z^-1 + a2 z^-2) with poles r e^{+-i w0},
// whose FRF at w rad/sample is its transfer function at z = e^{iw}: the
// exact answer for its sampled input and output [textbook z-transform].
type resonator struct{ b0, b1, b2, a1, a2 float64 }

func newResonator(r, w0, gain float64) resonator {
	return resonator{b0: gain, b1: gain * 0.3, a1: -2 * r * math.Cos(w0), a2: r * r}
}

func (f resonator) frf(w float64) complex128 {
	z1 := cmplx.Exp(complex(0, -w))
	z2 := z1 * z1
	return (complex(f.b0, 0) + complex(f.b1, 0)*z1 + complex(f.b2, 0)*z2) /
		(1 + complex(f.a1, 0)*z1 + complex(f.a2, 0)*z2)
}

func (f resonator) filter(u []float64) []float64 {
	y := make([]float64, len(u))
	var u1, u2, y1, y2 float64
	for n, x := range u {
		v := f.b0*x + f.b1*u1 + f.b2*u2 - f.a1*y1 - f.a2*y2
		y[n] = v
		u2, u1, y2, y1 = u1, x, y1, v
	}
	return y
}

// twoInputCase simulates y = G1 u1 + G2 u2 + noise for independent white
// inputs started at rest (so the record holds the transient a DFT leaks),
// and spools [u1, u2, y].
func twoInputCase(t *testing.T, seed uint64, n int, noiseSD float64) (*spool.Spool, [2]resonator) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 77))
	g := [2]resonator{newResonator(0.985, 2*math.Pi*0.06, 0.02), newResonator(0.98, 2*math.Pi*0.08, -0.015)}
	u := [2][]float64{make([]float64, n), make([]float64, n)}
	for i := range u {
		for k := range u[i] {
			u[i][k] = rng.NormFloat64()
		}
	}
	y1, y2 := g[0].filter(u[0]), g[1].filter(u[1])
	y := make([]float64, n)
	for k := range y {
		y[k] = y1[k] + y2[k] + noiseSD*rng.NormFloat64()
	}
	s := spool.New(3)
	for off := 0; off < n; off += 1000 {
		end := min(off+1000, n)
		s.Write([][]float64{u[0][off:end], u[1][off:end], y[off:end]})
	}
	t.Cleanup(func() { s.Close() })
	return s, g
}

// Without noise the estimate is the true FRF but for the local polynomials'
// approximation of the FRF and the transient: leakage-free. A Hann-windowed
// Welch estimate (package spectral, 8 segments of 8192 at 50 % overlap) of
// the same record errs far more, through its window's smoothing and the
// transient's leakage (the resolution bias of Bendat & Piersol, Random Data,
// 4th ed., 2010, Sec. 8.5, from memory).
func TestNoiseFreeIsLeakageFree(t *testing.T) {
	const n = 1 << 15
	band := [2]float64{0.03, 0.11}
	s, g := twoInputCase(t, 1, n, 0)
	est, err := Estimate(s, 1, []int{0, 1}, []int{2}, Options{BandHz: band})
	if err != nil {
		t.Fatal(err)
	}
	worst := func(freqHz []float64, h func(i, b int) complex128) float64 {
		w := 0.0
		for i := range 2 {
			for b, f := range freqHz {
				want := g[i].frf(2 * math.Pi * f)
				w = math.Max(w, cmplx.Abs(h(i, b)-want)/cmplx.Abs(want))
			}
		}
		return w
	}
	local := worst(est.FreqHz, func(i, b int) complex128 { return est.H[0][i][b] })
	acc, err := spectral.NewAccumulator(spectral.Config{FsHz: 1, SegmentLen: 8192, Overlap: 4096, Window: spectral.Hann}, []string{"u1", "u2", "y"})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Replay(acc.Write); err != nil {
		t.Fatal(err)
	}
	sp, err := acc.Spectra()
	if err != nil {
		t.Fatal(err)
	}
	w, err := spectral.EstimateFRF(sp, []int{0, 1}, []int{2}, spectral.FRFOptions{BandHz: band})
	if err != nil {
		t.Fatal(err)
	}
	var inBand []float64
	var first int
	for b, f := range w.FreqsHz {
		if f >= band[0] && f <= band[1] {
			if inBand == nil {
				first = b
			}
			inBand = append(inBand, f)
		}
	}
	welch := worst(inBand, func(i, b int) complex128 { return w.Pairs[0][i].H[first+b] })
	t.Logf("worst relative error: local polynomial %.2e over %d bins, Welch %.2e over %d bins", local, len(est.FreqHz), welch, len(inBand))
	if local > 5e-3 || local > welch/5 {
		t.Errorf("noise-free worst relative error %.2e, want <= 5e-3 and a fifth of Welch's %.2e", local, welch)
	}
}

// With output noise the errors match their stated sd (RMS of error/sd about
// one, 95 % within 2 sd for normal errors: the noise variance from the
// residuals with the right degrees of freedom) and the errors of
// neighbouring bins correlate as stated (ErrorCorrelation, checked against
// the sample correlation of the standardised errors over the band).
func TestErrorBandsAndCorrelation(t *testing.T) {
	const n = 1 << 16
	var sumZ2, count, within float64
	var lagSum [4]float64
	var lagN float64
	var stated []float64
	for seed := range uint64(4) {
		s, g := twoInputCase(t, 10+seed, n, 0.05)
		est, err := Estimate(s, 1, []int{0, 1}, []int{2}, Options{BandHz: [2]float64{0.03, 0.11}})
		if err != nil {
			t.Fatal(err)
		}
		stated = est.ErrorCorrelation
		for i := range 2 {
			z := make([]float64, 0, 2*len(est.FreqHz))
			for b, f := range est.FreqHz {
				e := est.H[0][i][b] - g[i].frf(2*math.Pi*f)
				sd := est.SigmaAbs[0][i][b]
				for _, c := range []float64{real(e) / sd, imag(e) / sd} {
					sumZ2 += c * c
					count++
					if math.Abs(c) <= 2 {
						within++
					}
				}
				z = append(z, real(e)/sd)
			}
			for l := range lagSum {
				for b := 0; b+l+1 < len(z); b++ {
					lagSum[l] += z[b] * z[b+l+1]
				}
			}
			lagN += float64(len(z))
		}
	}
	rmsZ := math.Sqrt(sumZ2 / count)
	t.Logf("RMS z %.3f, %.1f %% within 2 sd", rmsZ, 100*within/count)
	if rmsZ < 0.9 || rmsZ > 1.1 || within/count < 0.93 {
		t.Errorf("RMS z %.3f (want 0.9-1.1), %.1f %% within 2 sd (want >= 93 %%)", rmsZ, 100*within/count)
	}
	for l := range lagSum {
		got := lagSum[l] / lagN / (sumZ2 / count)
		t.Logf("lag %d: stated correlation %.3f, sample %.3f", l+1, stated[l], got)
		if math.Abs(got-stated[l]) > 0.05 {
			t.Errorf("lag %d: stated correlation %.3f, sample %.3f", l+1, stated[l], got)
		}
	}
}

func TestSmoothLength(t *testing.T) {
	for _, c := range [][2]int{{1, 1}, {7, 6}, {100, 100}, {72001, 72000}, {65537, 65536}, {3601, 3600}} {
		if got := smoothLength(c[0]); got != c[1] {
			t.Errorf("smoothLength(%d) = %d, want %d", c[0], got, c[1])
		}
	}
}

// A record too short for one window is refused with what to do.
func TestShortRecord(t *testing.T) {
	s, _ := twoInputCase(t, 3, 200, 0)
	if _, err := Estimate(s, 1, []int{0, 1}, []int{2}, Options{BandHz: [2]float64{0.03, 0.06}}); err == nil {
		t.Error("no error for a 200-sample record")
	}
}

// Noise that reaches both outputs (here a common term, as the pans' own
// noise does through the FRFs) makes their errors correlate: the stated
// OutputCorrelation agrees with the sample correlation of the errors, and
// with its design value var_common/(var_common + var_own) = 0.6. A stride
// (Options.Stride) estimates every stride-th bin alike, with the bins'
// correlation at multiples of the stride.
func TestOutputCorrelationAndStride(t *testing.T) {
	const (
		n        = 1 << 16
		common   = 0.06
		own      = 0.04898979 // sqrt(0.6^-1 - 1) * common
		wantCorr = 0.6
		corrTol  = 0.05
		stride   = 3
		bandLoHz = 0.03
		bandHiHz = 0.11
	)
	rng := rand.New(rand.NewPCG(21, 5))
	g := [2]resonator{newResonator(0.985, 2*math.Pi*0.06, 0.02), newResonator(0.98, 2*math.Pi*0.08, -0.015)}
	u := [2][]float64{make([]float64, n), make([]float64, n)}
	for i := range u {
		for k := range u[i] {
			u[i][k] = rng.NormFloat64()
		}
	}
	y1, y2 := g[0].filter(u[0]), g[1].filter(u[1])
	ya, yb := make([]float64, n), make([]float64, n)
	for k := range ya {
		c := common * rng.NormFloat64()
		ya[k] = y1[k] + y2[k] + c + own*rng.NormFloat64()
		yb[k] = y1[k] + y2[k] + c + own*rng.NormFloat64()
	}
	s := spool.New(4)
	s.Write([][]float64{u[0], u[1], ya, yb})
	defer s.Close()
	opt := Options{BandHz: [2]float64{bandLoHz, bandHiHz}}
	est, err := Estimate(s, 1, []int{0, 1}, []int{2, 3}, opt)
	if err != nil {
		t.Fatal(err)
	}
	var stated, sample complex128
	var norm float64
	for b, f := range est.FreqHz {
		stated += est.OutputCorrelation[0][1][b]
		want := g[0].frf(2 * math.Pi * f)
		ea, eb := est.H[0][0][b]-want, est.H[1][0][b]-want
		sample += ea * cmplx.Conj(eb) / complex(2*est.SigmaAbs[0][0][b]*est.SigmaAbs[1][0][b], 0)
		norm += (real(ea)*real(ea) + imag(ea)*imag(ea)) / (2 * est.SigmaAbs[0][0][b] * est.SigmaAbs[0][0][b])
	}
	nb := complex(float64(len(est.FreqHz)), 0)
	stated /= nb
	sample /= complex(norm, 0)
	t.Logf("output correlation: stated %.3f, sample %.3f, design %.2f", stated, sample, wantCorr)
	if cmplx.Abs(stated-wantCorr) > corrTol || cmplx.Abs(sample-stated) > corrTol {
		t.Errorf("output correlation: stated %.3f, sample %.3f, want %.2f", stated, sample, wantCorr)
	}
	opt.Stride = stride
	thin, err := Estimate(s, 1, []int{0, 1}, []int{2, 3}, opt)
	if err != nil {
		t.Fatal(err)
	}
	if len(thin.FreqHz) != (len(est.FreqHz)+stride-1)/stride {
		t.Fatalf("stride %d kept %d of %d bins", stride, len(thin.FreqHz), len(est.FreqHz))
	}
	for b, f := range thin.FreqHz {
		if f != est.FreqHz[b*stride] || thin.H[1][1][b] != est.H[1][1][b*stride] {
			t.Fatalf("stride %d: bin %d differs from bin %d of every bin", stride, b, b*stride)
		}
		// The noise is smoothed over the estimated bins alone.
		if r := thin.SigmaAbs[0][1][b] / est.SigmaAbs[0][1][b*stride]; math.Abs(r-1) > 0.1 {
			t.Errorf("stride %d, bin %d: sd %.4g, every bin's %.4g", stride, b, thin.SigmaAbs[0][1][b], est.SigmaAbs[0][1][b*stride])
		}
	}
	for l, r := range thin.ErrorCorrelation {
		// Averaged over the estimated bins alone: close, not equal.
		if math.Abs(r-est.ErrorCorrelation[(l+1)*stride-1]) > 0.01 {
			t.Errorf("stride %d, lag %d: correlation %.4f, every bin's lag %d: %.4f", stride, l+1, r, (l+1)*stride, est.ErrorCorrelation[(l+1)*stride-1])
		}
	}
}
