package spectral

import (
	"math/cmplx"
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
