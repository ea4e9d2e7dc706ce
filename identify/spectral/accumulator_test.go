package spectral

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestAccumulatorReproducible: the same lanes give bit-identical spectra
// run after run (deterministic summation order), and one or two lanes agree
// to round-off.
func TestAccumulatorReproducible(t *testing.T) {
	const laneTol = 1e-12 // relative to the largest spectral value
	rec := synthRig(testCar(), independentPans, 0, 20, 41*2048, 41, outputNoiseFrac, 0)
	cfg := Config{FsHz: 20, SegmentLen: 4096, Overlap: 2048, Window: Hann}
	run := func(workers int) *Spectra {
		c := cfg
		c.Workers = workers
		sp, err := spectraOf(rec, c, 1234)
		if err != nil {
			t.Fatal(err)
		}
		return sp
	}
	a, b, one := run(2), run(2), run(1)
	peak := 0.0
	for _, g := range one.G {
		peak = max(peak, cmplx.Abs(g[2][2]))
	}
	for f := range a.G {
		for i := range a.G[f] {
			for j := range a.G[f][i] {
				if a.G[f][i][j] != b.G[f][i][j] {
					t.Fatalf("bin %d (%d,%d): runs differ: %v vs %v", f, i, j, a.G[f][i][j], b.G[f][i][j])
				}
				if cmplx.Abs(a.G[f][i][j]-one.G[f][i][j]) > laneTol*peak {
					t.Fatalf("bin %d (%d,%d): 1 and 2 lanes differ: %v vs %v", f, i, j, one.G[f][i][j], a.G[f][i][j])
				}
			}
		}
	}
}

// TestSharedLaneExact: a single lane that shares its held segments with a
// second goroutine (Accumulator.flush) gives the sums bit for bit of the
// segments taken one at a time, which calling Spectra after every segment
// forces, at segment lengths with many and with two slots, and with a last
// batch not full.
func TestSharedLaneExact(t *testing.T) {
	rec := synthRig(testCar(), independentPans, 0, 20, 40*1024+300, 42, outputNoiseFrac, 0)
	for _, n := range []int{64, 1024, 2048} {
		cfg := Config{FsHz: 20, SegmentLen: n, Overlap: n / 2, Window: Hann, Workers: 1}
		shared, err := spectraOf(rec, cfg, 1000)
		if err != nil {
			t.Fatal(err)
		}
		one, err := NewAccumulator(cfg, rigChannels)
		if err != nil {
			t.Fatal(err)
		}
		var single *Spectra
		hop := n / 2
		for off := 0; off < len(rec.channels[0]); off += hop {
			block := make([][]float64, len(rec.channels))
			for c, x := range rec.channels {
				block[c] = x[off:min(off+hop, len(x))]
			}
			one.Write(block)
			if single, err = one.Spectra(); err != nil && off >= n {
				t.Fatal(err)
			}
		}
		if shared.Segments != single.Segments || shared.Segments < 2*one.slots {
			t.Fatalf("N=%d: %d and %d segments, %d slots", n, shared.Segments, single.Segments, one.slots)
		}
		for f := range shared.G {
			for i := range shared.G[f] {
				for j := range shared.G[f][i] {
					if shared.G[f][i][j] != single.G[f][i][j] {
						t.Fatalf("N=%d, bin %d (%d,%d): shared %v, one by one %v", n, f, i, j, shared.G[f][i][j], single.G[f][i][j])
					}
				}
			}
		}
	}
}

// TestEffectiveAveragesHann: Welch's overlap correlation for periodic Hann
// at 50 % overlap is rho(1) = 1/36 (Harris 1978, Table 1, overlap
// correlation 16.7 %), so nd = K/(1 + 2 (1 - 1/K)/36).
func TestEffectiveAveragesHann(t *testing.T) {
	const tol = 1e-12
	w, err := Hann.Values(1024)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []int{1, 2, 10, 40} {
		want := float64(k) / (1 + 2*(1-1/float64(k))/36)
		if got := effectiveAverages(w, 512, k); got-want > tol*want || want-got > tol*want {
			t.Errorf("K=%d: nd %g, want %g", k, got, want)
		}
	}
	if got := noiseBandwidthBins(w); got-1.5 > tol || 1.5-got > tol {
		t.Errorf("Hann noise bandwidth %g bins, want 1.5 (Harris 1978)", got)
	}
}

// TestSetRateEqualsTheFinalRate: an accumulator set up at one rate and given
// another before Spectra matches one set up at the other rate from the
// start, to round-off (the rate only labels the samples): bin frequencies,
// densities, noise bandwidth, and for a window set in seconds the window as
// applied.
func TestSetRateEqualsTheFinalRate(t *testing.T) {
	const tol = 1e-14
	const early, final = 100.0, 98.4 // the first steps' median 1.6 % off, say
	rng := rand.New(rand.NewPCG(7, 7))
	x := make([][]float64, 2)
	for ch := range x {
		x[ch] = make([]float64, 10000)
		for i := range x[ch] {
			x[ch][i] = rng.NormFloat64()
		}
	}
	for _, w := range []Window{Hann, Hamming} {
		cfg := Config{FsHz: early, SegmentLen: 1024, Overlap: 512, Window: w}
		a, err := NewAccumulator(cfg, []string{"a", "b"})
		if err != nil {
			t.Fatal(err)
		}
		a.Write(x)
		if err := a.SetRate(final); err != nil {
			t.Fatal(err)
		}
		got, err := a.Spectra()
		if err != nil {
			t.Fatal(err)
		}
		cfg.FsHz = final
		b, err := NewAccumulator(cfg, []string{"a", "b"})
		if err != nil {
			t.Fatal(err)
		}
		b.Write(x)
		want, err := b.Spectra()
		if err != nil {
			t.Fatal(err)
		}
		rel := func(p, q float64) bool { return math.Abs(p-q) <= tol*math.Abs(q) }
		if got.FsHz != final || !rel(got.NoiseBandwidthHz, want.NoiseBandwidthHz) {
			t.Errorf("%v: rate %g, Be %g vs %g", w, got.FsHz, got.NoiseBandwidthHz, want.NoiseBandwidthHz)
		}
		for f := range want.G {
			if !rel(got.FreqsHz[f], want.FreqsHz[f]) {
				t.Fatalf("%v: bin %d at %g Hz, want %g Hz", w, f, got.FreqsHz[f], want.FreqsHz[f])
			}
			for i := range want.G[f] {
				for j := range want.G[f][i] {
					scale := math.Sqrt(real(want.G[f][i][i]) * real(want.G[f][j][j]))
					if cmplx.Abs(got.G[f][i][j]-want.G[f][i][j]) > tol*scale {
						t.Fatalf("%v: bin %d (%d,%d): %v, want %v", w, f, i, j, got.G[f][i][j], want.G[f][i][j])
					}
				}
			}
		}
	}
	a, _ := NewAccumulator(Config{FsHz: early, SegmentLen: 64, Window: Hann}, []string{"a"})
	if a.SetRate(0) == nil || a.SetRate(math.Inf(1)) == nil {
		t.Error("a zero or infinite rate accepted")
	}
}

// TestInBandEdges: a bin on a band edge for a round rate stays in the band
// for the rate a least-squares fit of rounded time stamps gives.
func TestInBandEdges(t *testing.T) {
	for _, fs := range []float64{256, 255.99999999999778, 256.0000001} {
		f := 24 * fs / 12 / 1024 // bin 24 after decimation by 12: 0.5 Hz at 256 Hz
		if !InBand([2]float64{0.5, 4}, f) {
			t.Errorf("%.17g Hz: bin at %.17g Hz left out of 0.5-4 Hz", fs, f)
		}
	}
	if InBand([2]float64{0.5, 4}, 0.4999) || InBand([2]float64{0.5, 4}, 4.001) {
		t.Error("frequencies outside the band by more than rounding taken in")
	}
}
