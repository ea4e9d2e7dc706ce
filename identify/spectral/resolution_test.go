package spectral

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/ridemodes/ridemodes/identify/spool"
	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/floats"
)

// receptance is the single-mode receptance 1/(1 - r^2 + 2 i zeta r),
// r = f/fn (e^{+i omega t}).
func receptance(fHz, fnHz, zeta float64) complex128 {
	r := fHz / fnHz
	return 1 / complex(1-r*r, 2*zeta*r)
}

// TestHalfPowerExact: the exact half-power relations recover zeta and fn of
// an analytic receptance peak sampled on a fine grid (truth: the
// parameters; relations derived, domain notes).
func TestHalfPowerExact(t *testing.T) {
	const (
		gridHz  = 0.001
		zetaTol = 2e-3 // linear interpolation between grid points
		fnTol   = 2e-3
	)
	for _, zeta := range []float64{0.2, 0.3, 0.35} {
		for _, fnHz := range []float64{1.1, 1.8} {
			var freqs, mag []float64
			for f := gridHz; f < 6; f += gridHz {
				freqs = append(freqs, f)
				mag = append(mag, cmplx.Abs(receptance(f, fnHz, zeta)))
			}
			gotFn, gotZeta, ok := halfPower(freqs, mag, [2]float64{0.01, 6})
			if !ok || math.Abs(gotZeta-zeta) > zetaTol || math.Abs(gotFn-fnHz)/fnHz > fnTol {
				t.Errorf("zeta %g fn %g: got zeta %g fn %g ok %v", zeta, fnHz, gotZeta, gotFn, ok)
			}
		}
	}
}

// synthMode is white noise through one receptance-type mode, exact in the
// frequency domain, plus 5 % white noise; one channel "body".
func synthMode(fsHz float64, n int, fnHz, zeta float64, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	fft := fourier.NewFFT(n)
	c := fft.Coefficients(nil, x)
	for k := range c {
		c[k] *= receptance(fft.Freq(k)*fsHz, fnHz, zeta)
	}
	y := fft.Sequence(nil, c)
	floats.Scale(1/float64(n), y)
	rms := math.Sqrt(floats.Dot(y, y) / float64(n))
	for i := range y {
		y[i] += outputNoiseFrac * rms * rng.NormFloat64()
	}
	return [][]float64{y}
}

// TestChooseResolution: on output-only records of one mode with known
// damping the bank's quick estimate recovers zeta, the chosen length meets
// the bias bound with enough averages, and it is the shortest that does.
func TestChooseResolution(t *testing.T) {
	const (
		fsHz = 20.0
		// zetaRelTol: the half-power estimate on Hann-smoothed, noisy
		// spectra at the chosen resolution (bias ~2 % plus random error).
		zetaRelTol = 0.12
	)
	for _, zeta := range []float64{0.2, 0.3} {
		for _, seed := range []uint64{21, 22} {
			ch := synthMode(fsHz, 1<<16, 1.3, zeta, seed)
			bank := spooledBank(t, BankConfig{FsHz: fsHz}, []string{"body"}, ch, 1500)
			c, sp, err := bank.Choose(nil, []int{0}, ChoiceOptions{BandHz: [2]float64{0.3, 5}})
			if err != nil {
				t.Fatal(err)
			}
			if c.DampingAssumed || math.Abs(c.DampingRatio-zeta)/zeta > zetaRelTol {
				t.Errorf("zeta %g seed %d: estimated %g (assumed %v)", zeta, seed, c.DampingRatio, c.DampingAssumed)
			}
			if -c.ResolutionBias > DefaultMaxBias || c.EffectiveAverages < DefaultMinAverages || len(c.Warnings) != 0 {
				t.Errorf("zeta %g seed %d: bias %g, nd %g, warnings %v", zeta, seed, c.ResolutionBias, c.EffectiveAverages, c.Warnings)
			}
			if sp.SegmentLen != c.SegmentLen {
				t.Fatalf("spectra N=%d, choice N=%d", sp.SegmentLen, c.SegmentLen)
			}
			// The next shorter candidate would miss the bias bound.
			half := resolutionBias(2*c.NoiseBandwidthHz, c.HalfPowerHz)
			if c.SegmentLen > 64 && half <= DefaultMaxBias {
				t.Errorf("zeta %g: N=%d chosen but N/2 would give bias %g", zeta, c.SegmentLen, half)
			}
			t.Logf("zeta %g seed %d: %v", zeta, seed, c.Reasons)
		}
	}
}

// TestChooseWarnsOnShortRecord: 90 s at zeta 0.2 cannot give both the
// resolution and 20 averages.
func TestChooseWarnsOnShortRecord(t *testing.T) {
	const fsHz = 20.0
	ch := synthMode(fsHz, 1800, 1.3, 0.2, 23)
	bank := spooledBank(t, BankConfig{FsHz: fsHz}, []string{"body"}, ch, 999)
	c, _, err := bank.Choose(nil, []int{0}, ChoiceOptions{BandHz: [2]float64{0.3, 5}})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, w := range c.Warnings {
		found = found || w.Code == WarnShortRecord
	}
	if !found || c.EffectiveAverages < DefaultMinAverages {
		t.Fatalf("warnings %v, nd %g: want a short-record warning at >= %d averages", c.Warnings, c.EffectiveAverages, DefaultMinAverages)
	}
	t.Log(c.Warnings)
}

// TestChooseOnRig: with both pans driven the choice uses the summed |H| of
// all pairs; the merged bounce/pitch peak gives a damping in the body range.
func TestChooseOnRig(t *testing.T) {
	rec := synthRig(testCar(), independentPans, 0, 20, 1<<15, 24, outputNoiseFrac, 0)
	bank := spooledBank(t, BankConfig{FsHz: 20, MaxSegmentLen: 4096}, rigChannels, rec.channels, 4000)
	c, _, err := bank.Choose([]int{0, 1}, []int{2, 3}, ChoiceOptions{BandHz: frfBandHz})
	if err != nil {
		t.Fatal(err)
	}
	// Modal damping 0.32 and 0.36 (testCar); the merged peak reads wider.
	if c.DampingAssumed || c.DampingRatio < 0.25 || c.DampingRatio > 0.6 {
		t.Errorf("rig damping estimate %g (assumed %v)", c.DampingRatio, c.DampingAssumed)
	}
	t.Log(c.Reasons, c.Warnings)
}

// TestChooseTradesBiasForRecord: with the fit's bias-variance rule
// (DampingErrorScale) a longer record buys a longer segment, and a lighter
// damping needs one; every choice keeps the least averages. Output-only
// records of one mode (synthetic, known damping), 5 minutes and an hour at
// 20 Hz.
func TestChooseTradesBiasForRecord(t *testing.T) {
	const (
		fsHz        = 20.0
		minAverages = 8
		errorScale  = 0.05
	)
	chosen := map[[2]float64]int{}
	for _, recordS := range []float64{300, 3600} {
		for _, zeta := range []float64{0.08, 0.3} {
			ch := synthMode(fsHz, int(recordS*fsHz), 1.3, zeta, 31)
			bank := spooledBank(t, BankConfig{FsHz: fsHz}, []string{"body"}, ch, 1500)
			c, _, err := bank.Choose(nil, []int{0}, ChoiceOptions{BandHz: [2]float64{0.3, 5},
				MinAverages: minAverages, MaxBias: 0.003, DampingErrorScale: errorScale})
			if err != nil {
				t.Fatal(err)
			}
			if c.EffectiveAverages < minAverages || c.RecordS != recordS {
				t.Errorf("%g s, zeta %g: %.1f averages, record %g s", recordS, zeta, c.EffectiveAverages, c.RecordS)
			}
			chosen[[2]float64{recordS, zeta}] = c.SegmentLen
			t.Logf("%g s, zeta %g: N=%d; %v", recordS, zeta, c.SegmentLen, c.Reasons[len(c.Reasons)-1])
		}
	}
	for _, zeta := range []float64{0.08, 0.3} {
		if short, long := chosen[[2]float64{300, zeta}], chosen[[2]float64{3600, zeta}]; long <= short {
			t.Errorf("zeta %g: N=%d for an hour, N=%d for 5 minutes; want longer for the longer record", zeta, long, short)
		}
	}
	for _, recordS := range []float64{300, 3600} {
		light, heavy := chosen[[2]float64{recordS, 0.08}], chosen[[2]float64{recordS, 0.3}]
		if light < heavy || (recordS == 3600 && light == heavy) {
			t.Errorf("%g s: N=%d at zeta 0.08, N=%d at zeta 0.3; want longer for the lighter damping", recordS, light, heavy)
		}
	}
}

// spooledBank records the channels in blocks of blockLen samples, as the
// FRF stage does, and returns a Bank over the recording.
func spooledBank(t *testing.T, cfg BankConfig, names []string, channels [][]float64, blockLen int) *Bank {
	t.Helper()
	sp := spool.New(len(channels))
	t.Cleanup(func() { sp.Close() })
	writeBlocks(sp, channels, blockLen)
	bank, err := NewBank(cfg, names, sp)
	if err != nil {
		t.Fatal(err)
	}
	return bank
}

// TestBankEstimateIsAccumulator: a Bank's spectra of a candidate, replayed
// from the spool, are bit for bit those of an Accumulator fed the stream
// directly in other blocks (segments are counted in samples), for a
// one-lane and a two-lane length; the adequacy figures the Bank computes
// from the record length alone are those the spectra carry.
func TestBankEstimateIsAccumulator(t *testing.T) {
	rec := synthRig(testCar(), independentPans, 0, 20, 1<<15, 25, outputNoiseFrac, 0)
	bank := spooledBank(t, BankConfig{FsHz: 20, MinSegmentLen: 1024, MaxSegmentLen: 4096}, rigChannels, rec.channels, 333)
	for k, cd := range bank.cands {
		got, err := bank.estimate(k)
		if err != nil {
			t.Fatal(err)
		}
		acc, err := NewAccumulator(cd.cfg, rigChannels)
		if err != nil {
			t.Fatal(err)
		}
		writeBlocks(acc, rec.channels, 4000)
		want, err := acc.Spectra()
		if err != nil {
			t.Fatal(err)
		}
		if got.Segments != want.Segments || got.EffectiveAverages != cd.nd || got.EffectiveAverages != want.EffectiveAverages ||
			got.NoiseBandwidthHz != cd.beHz || got.NoiseBandwidthHz != want.NoiseBandwidthHz || cd.segments != want.Segments {
			t.Fatalf("N=%d: bank segments %d (%d), nd %v (%v), Be %v (%v); accumulator %d, %v, %v", cd.cfg.SegmentLen,
				got.Segments, cd.segments, got.EffectiveAverages, cd.nd, got.NoiseBandwidthHz, cd.beHz,
				want.Segments, want.EffectiveAverages, want.NoiseBandwidthHz)
		}
		for f := range want.G {
			for i := range want.G[f] {
				for j := range want.G[f][i] {
					if got.G[f][i][j] != want.G[f][i][j] {
						t.Fatalf("N=%d: G[%d][%d][%d] = %v from the bank, %v from the accumulator", cd.cfg.SegmentLen, f, i, j, got.G[f][i][j], want.G[f][i][j])
					}
				}
			}
		}
	}
}
