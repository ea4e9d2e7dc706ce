package spectral

import (
	"math"
	"math/cmplx"
	"testing"
)

const (
	// z95 is the two-sided 95 % point of the standard normal distribution.
	z95 = 1.9600
	// coverageTol is how far the pooled Monte Carlo coverage of the nominal
	// 95 % bands may stray: the binomial sd of the pooled share is about
	// 0.005 for the ~2000 effectively independent trials, and the error
	// formulas are first-order approximations (Bendat & Piersol) whose
	// skewness is noticeable at nd ~ 40.
	coverageTol = 0.025
	mcSeeds     = 30
	// mcNoiseFrac is the output noise for the Monte Carlo, 20 % of RMS, so
	// that random error dominates the small resolution bias.
	mcNoiseFrac = 0.2
	// maxValidErr is the normalised random error up to which the first-order
	// error formulas are claimed (Bendat & Piersol suggest about 0.2, from
	// memory); bins with a larger estimated error are left out of the count.
	maxValidErr = 0.2
)

// TestErrorBandCoverage runs seeded Monte Carlo trials of the two-input rig
// and checks that the nominal 95 % bands (1.96 sd) on |H|, phase and
// multiple coherence and the 1/sqrt(nd) band of the input PSD (white pans,
// true one-sided density 2/fs for unit variance) cover the truth at
// 95 % +- coverageTol of the band bins where the estimated normalised
// error is at most maxValidErr (beyond it |H| is biased up, Rician, and the
// first-order bands are too narrow: documented on EstimateFRF). The true multiple coherence follows
// from the model: Gyy.x/Gyy with Gyy.x the noise density.
func TestErrorBandCoverage(t *testing.T) {
	cfg := Config{FsHz: 20, SegmentLen: 512, Overlap: 256, Window: Hann}
	const nSamples = 41 * 256 // 40 segments
	sys := testCar()
	var n, nCoh, okMag, okPhase, okPSD, okCoh int
	for seed := uint64(100); seed < 100+mcSeeds; seed++ {
		rec := synthRig(sys, independentPans, 0, cfg.FsHz, nSamples, seed, mcNoiseFrac, 0)
		sp, err := spectraOf(rec, cfg, 2048)
		if err != nil {
			t.Fatal(err)
		}
		set, err := EstimateFRF(sp, []int{0, 1}, []int{2, 3}, FRFOptions{BandHz: frfBandHz})
		if err != nil {
			t.Fatal(err)
		}
		psdTrue := 2 / cfg.FsHz
		psdErr := sp.PSDRandomError()
		for o := range set.Outputs {
			// Noise density: the noise was mcNoiseFrac times the output RMS,
			// white, so its density is (mcNoiseFrac rms)^2 * 2/fs.
			var ms float64
			for _, v := range rec.channels[2+o] {
				ms += v * v
			}
			ms /= float64(len(rec.channels[2+o])) * (1 + mcNoiseFrac*mcNoiseFrac)
			gnn := mcNoiseFrac * mcNoiseFrac * ms * 2 / cfg.FsHz
			for f, fHz := range set.FreqsHz {
				if !bandContains(frfBandHz, fHz) {
					continue
				}
				h := sys.frf(fHz)[o]
				gyy := gnn + psdTrue*(real(h[0])*real(h[0])+imag(h[0])*imag(h[0])+real(h[1])*real(h[1])+imag(h[1])*imag(h[1]))
				cohTrue := 1 - gnn/gyy
				if c := set.MultipleCoherence[o][f]; set.MultipleCoherenceErr[o][f] <= maxValidErr*c {
					nCoh++
					if math.Abs(c-cohTrue) <= z95*set.MultipleCoherenceErr[o][f] {
						okCoh++
					}
				}
				for i := range set.Inputs {
					p := set.Pairs[o][i]
					if p.MagRelErr[f] > maxValidErr {
						continue
					}
					n++
					if math.Abs(cmplx.Abs(p.H[f])-cmplx.Abs(h[i])) <= z95*p.MagRelErr[f]*cmplx.Abs(h[i]) {
						okMag++
					}
					if math.Abs(cmplx.Phase(p.H[f]/h[i])) <= z95*p.PhaseErrRad[f] {
						okPhase++
					}
					if math.Abs(real(sp.G[f][i][i])-psdTrue) <= z95*psdErr*psdTrue {
						okPSD++
					}
				}
			}
		}
	}
	for _, c := range []struct {
		name string
		ok   int
		of   int
	}{{"|H|", okMag, n}, {"phase", okPhase, n}, {"input PSD", okPSD, n}, {"multiple coherence", okCoh, nCoh}} {
		share := float64(c.ok) / float64(c.of)
		t.Logf("%s: %.4f of %d band bins inside the nominal 95 %% band", c.name, share, c.of)
		if math.Abs(share-0.95) > coverageTol {
			t.Errorf("%s: coverage %.4f, want 0.95 +- %.3f", c.name, share, coverageTol)
		}
	}
}
