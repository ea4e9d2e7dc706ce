package spectral

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestExpectedMatchesAccumulator: Expected describes the estimate an
// Accumulator makes of a record of the same length, segment and window:
// the same bins, whole segments, effective averages and noise bandwidth;
// and for white noise of variance s2 at fs, whose one-sided density is
// 2 s2/fs, the accumulator's estimate averages to Expected's within its
// random error 1/sqrt(nd) per bin over the bins (a round trip of the
// density scaling; Bendat and Piersol, Random Data, 4th ed., Sec. 8.5).
func TestExpectedMatchesAccumulator(t *testing.T) {
	const (
		fs      = 20.0
		samples = 6000
		s2      = 0.25
	)
	cfg := Config{FsHz: fs, SegmentLen: 256, Overlap: 128, Window: Hann}
	acc, err := NewAccumulator(cfg, []string{"x"})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 5))
	x := make([]float64, samples)
	for i := range x {
		x[i] = math.Sqrt(s2) * rng.NormFloat64()
	}
	acc.Write([][]float64{x})
	got, err := acc.Spectra()
	if err != nil {
		t.Fatal(err)
	}
	density := 2 * s2 / fs
	want, err := Expected(cfg, []string{"x"}, samples, func(float64) [][]complex128 {
		return [][]complex128{{complex(density, 0)}}
	})
	if err != nil {
		t.Fatal(err)
	}
	if got.Segments != want.Segments || got.EffectiveAverages != want.EffectiveAverages ||
		got.NoiseBandwidthHz != want.NoiseBandwidthHz || len(got.FreqsHz) != len(want.FreqsHz) {
		t.Fatalf("accumulator: %d segments, nd %g, Be %g Hz, %d bins; expected: %d, %g, %g Hz, %d bins",
			got.Segments, got.EffectiveAverages, got.NoiseBandwidthHz, len(got.FreqsHz),
			want.Segments, want.EffectiveAverages, want.NoiseBandwidthHz, len(want.FreqsHz))
	}
	var sum float64
	inner := got.FreqsHz[1 : len(got.FreqsHz)-1] // DC and Nyquist are scaled once
	for f := range inner {
		sum += real(got.G[f+1][0][0]) / real(want.G[f+1][0][0])
	}
	mean := sum / float64(len(inner))
	// The mean over bins of independent-ish ratios: the spread of one is
	// 1/sqrt(nd), of the mean about 1/sqrt(nd * bins); 4 of those.
	if tol := 4 / math.Sqrt(want.EffectiveAverages*float64(len(inner))); math.Abs(mean-1) > tol {
		t.Errorf("white noise: mean estimated/expected density %.4f, want 1 within %.3f", mean, tol)
	}
	if _, err := Expected(cfg, []string{"x"}, 100, nil); err == nil {
		t.Error("a record shorter than a segment: no error")
	}
}
