package spectral

import (
	"fmt"
	"math/rand/v2"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/dsp/fourier"
)

// fftBenchLens are the segment lengths we use (powers of two) and a few
// others (odd, and with factors 3 and 5).
var fftBenchLens = []int{256, 1000, 1024, 2187, 4095, 4096, 5120, 16384}

func benchSignal(n int) []float64 {
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	return x
}

// BenchmarkFFT compares gonum's dsp/fourier (plan and output reused) with
// go-dsp's FFTReal (allocates its output, complex transform of real data)
// for one real transform.
func BenchmarkFFT(b *testing.B) {
	for _, n := range fftBenchLens {
		x := benchSignal(n)
		b.Run(fmt.Sprintf("gonum/N=%d", n), func(b *testing.B) {
			fft := fourier.NewFFT(n)
			dst := make([]complex128, n/2+1)
			b.ReportAllocs()
			for b.Loop() {
				fft.Coefficients(dst, x)
			}
		})
		b.Run(fmt.Sprintf("godsp/N=%d", n), func(b *testing.B) {
			dspfft.FFTReal(x) // build the factor tables outside the timing
			b.ReportAllocs()
			for b.Loop() {
				dspfft.FFTReal(x)
			}
		})
	}
}

// benchRecord is 4 channels of white noise, 2^18 samples each.
func benchRecord() [][]float64 {
	rng := rand.New(rand.NewPCG(3, 4))
	ch := newMatrix(4, 1<<18)
	for _, x := range ch {
		for i := range x {
			x[i] = rng.NormFloat64()
		}
	}
	return ch
}

// BenchmarkAccumulate measures Welch accumulation of 4 channels in 4096-
// sample blocks: throughput in samples per second per channel, for segment
// lengths and 1 or 2 worker lanes, Hann, 50 % overlap.
func BenchmarkAccumulate(b *testing.B) {
	rec := benchRecord()
	for _, n := range []int{256, 1024, 4096, 16384} {
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("N=%d/workers=%d", n, workers), func(b *testing.B) {
				acc, err := NewAccumulator(Config{FsHz: 1000, SegmentLen: n, Overlap: n / 2, Window: Hann, Workers: workers}, rigChannels)
				if err != nil {
					b.Fatal(err)
				}
				benchWrites(b, acc, rec)
			})
		}
	}
}

// BenchmarkDecimatedAccumulate compares the same resolution (0.061 Hz at a
// 1000 Hz log) reached directly (N = 16384) and after decimation by 40 to
// 25 Hz (N = 410 is not a power of two, so N = 512 at 0.049 Hz).
func BenchmarkDecimatedAccumulate(b *testing.B) {
	rec := benchRecord()
	b.Run("direct/N=16384", func(b *testing.B) {
		acc, err := NewAccumulator(Config{FsHz: 1000, SegmentLen: 16384, Overlap: 8192, Window: Hann}, rigChannels)
		if err != nil {
			b.Fatal(err)
		}
		benchWrites(b, acc, rec)
	})
	b.Run("decimated-40/N=512", func(b *testing.B) {
		acc, err := NewAccumulator(Config{FsHz: 25, SegmentLen: 512, Overlap: 256, Window: Hann}, rigChannels)
		if err != nil {
			b.Fatal(err)
		}
		dec, err := NewDecimator(40, len(rigChannels), 1000, acc)
		if err != nil {
			b.Fatal(err)
		}
		benchWrites(b, dec, rec)
	})
}

// discard is a BlockWriter that drops what it is given.
type discard struct{}

func (discard) Write([][]float64) {}

// BenchmarkDecimate measures the anti-alias decimator alone on 4 channels
// in 4096-sample blocks at the rig route's usual setting: a 512 Hz log
// decimated by 25 (a 653-tap filter).
func BenchmarkDecimate(b *testing.B) {
	rec := benchRecord()
	dec, err := NewDecimator(25, len(rigChannels), 512, discard{})
	if err != nil {
		b.Fatal(err)
	}
	benchWrites(b, dec, rec)
}

// benchWrites times writing rec to w in 4096-sample blocks and reports the
// throughput in samples per second per channel.
func benchWrites(b *testing.B, w BlockWriter, rec [][]float64) {
	b.ReportAllocs()
	for b.Loop() {
		writeBlocks(w, rec, 4096)
	}
	b.ReportMetric(float64(b.N)*float64(len(rec[0]))/b.Elapsed().Seconds(), "samples/s/ch")
}
