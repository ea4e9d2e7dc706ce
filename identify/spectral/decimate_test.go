package spectral

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats"
)

// TestAntiAliasFilterMeetsSpec evaluates the designed filter's frequency
// response directly (DTFT sum of the taps) and checks it against the design
// targets of Kaiser's formulas: passband ripple and stopband attenuation
// within the specification (Oppenheim & Schafer, 3rd ed., 2010, Sec. 7.6:
// the formulas meet the attenuation to within a fraction of a dB).
func TestAntiAliasFilterMeetsSpec(t *testing.T) {
	const (
		// ripple allowed in the passband: delta = 10^(-A/20) = 1e-4 for
		// 80 dB, with a factor 3 for the formula's approximation.
		passRippleTol = 3e-4
		stopMarginDB  = 1.0 // attenuation may fall short of A by this much
		gridPoints    = 2000
	)
	for _, q := range []int{2, 5, 10, 25} {
		taps := antiAliasTaps(q)
		if len(taps)%2 != 1 {
			t.Fatalf("q=%d: even length %d", q, len(taps))
		}
		nyqOut := 0.5 / float64(q)
		resp := func(f float64) float64 { return tapResponse(taps, f) }
		worstPass, worstStop := 0.0, 0.0
		for i := 0; i <= gridPoints; i++ {
			f := PassbandFraction * nyqOut * float64(i) / gridPoints
			worstPass = math.Max(worstPass, math.Abs(resp(f)-1))
			fs := (2-PassbandFraction)*nyqOut + (0.5-(2-PassbandFraction)*nyqOut)*float64(i)/gridPoints
			worstStop = math.Max(worstStop, resp(fs))
		}
		if worstPass > passRippleTol {
			t.Errorf("q=%d (%d taps): passband deviation %.2g", q, len(taps), worstPass)
		}
		if db := -20 * math.Log10(worstStop); db < StopbandAttenuationDB-stopMarginDB {
			t.Errorf("q=%d (%d taps): stopband attenuation %.1f dB", q, len(taps), db)
		}
	}
}

// TestDecimationKeepsFRF synthesises the rig at 200 Hz and estimates the
// two-input FRFs at the same resolution twice: directly (N = 5120) and after
// decimation by 10 (N = 512). The decimated FRFs lie within the 99 % error
// bands of the direct ones at >= 95 % of band bins, and both recover the
// analytic transmissibility likewise.
func TestDecimationKeepsFRF(t *testing.T) {
	const (
		fsHz   = 200.0
		factor = 10
	)
	sys := testCar()
	rec := synthRig(sys, independentPans, 0, fsHz, 83*2560, 11, outputNoiseFrac, 0)
	direct, err := spectraOf(rec, Config{FsHz: fsHz, SegmentLen: 5120, Overlap: 2560, Window: Hann}, 3000)
	if err != nil {
		t.Fatal(err)
	}
	acc, err := NewAccumulator(Config{FsHz: fsHz / factor, SegmentLen: 512, Overlap: 256, Window: Hann}, rigChannels)
	if err != nil {
		t.Fatal(err)
	}
	dec, err := NewDecimator(factor, len(rigChannels), fsHz, acc)
	if err != nil {
		t.Fatal(err)
	}
	writeBlocks(dec, rec.channels, 3001)
	decimated, err := acc.Spectra()
	if err != nil {
		t.Fatal(err)
	}
	if decimated.ResolutionHz() != direct.ResolutionHz() {
		t.Fatalf("resolutions %g and %g differ", decimated.ResolutionHz(), direct.ResolutionHz())
	}
	setD, err := EstimateFRF(direct, []int{0, 1}, []int{2, 3}, FRFOptions{BandHz: frfBandHz})
	if err != nil {
		t.Fatal(err)
	}
	setQ, err := EstimateFRF(decimated, []int{0, 1}, []int{2, 3}, FRFOptions{BandHz: frfBandHz})
	if err != nil {
		t.Fatal(err)
	}
	for o := range setD.Outputs {
		for i := range setD.Inputs {
			pd, pq := setD.Pairs[o][i], setQ.Pairs[o][i]
			n, ok := 0, 0
			for f, fHz := range setD.FreqsHz {
				if !bandContains(frfBandHz, fHz) || f >= len(setQ.FreqsHz) {
					continue
				}
				n++
				if cmplx.Abs(pq.H[f]-pd.H[f]) <= z99*pd.MagRelErr[f]*cmplx.Abs(pd.H[f]) {
					ok++
				}
			}
			if share := float64(ok) / float64(n); share < minInBandFraction {
				t.Errorf("%s/%s: decimated FRF within the direct FRF's band at %.0f %% of bins", pd.Output, pd.Input, 100*share)
			}
			mag, ph := coverage(t, setQ.FreqsHz, pq, func(fHz float64) complex128 { return sys.frf(fHz)[o][i] }, z99)
			if mag < minInBandFraction || ph < minInBandFraction {
				t.Errorf("%s/%s decimated: %.0f %% / %.0f %% of bins within the bands", pd.Output, pd.Input, 100*mag, 100*ph)
			}
		}
	}
}

// tapResponse is the magnitude of a filter's frequency response at f
// cycles/sample (the DTFT sum of its taps).
func tapResponse(taps []float64, f float64) float64 {
	var s complex128
	for n, h := range taps {
		s += complex(h, 0) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(n)))
	}
	return cmplx.Abs(s)
}

func TestDecimationFactor(t *testing.T) {
	// 0.8 * 1000/(2 q) >= 5 Hz gives q <= 80 [derived from the definition].
	if q := DecimationFactor(1000, 5); q != 80 {
		t.Errorf("DecimationFactor(1000, 5) = %d, want 80", q)
	}
	if q := DecimationFactor(8, 5); q != 1 {
		t.Errorf("DecimationFactor(8, 5) = %d, want 1", q)
	}
	// a rate rounded low picks the factor of the round rate (0.8*200/16 = 10
	// exactly); a rate really lower does not
	for _, c := range []struct {
		fsHz float64
		want int
	}{{200, 10}, {199.99999999999983, 10}, {199.99999, 10}, {200 * (1 - 0.9e-6), 10}, {200 * (1 - 2e-6), 9}, {199.9, 9}} {
		if q := DecimationFactor(c.fsHz, 8); q != c.want {
			t.Errorf("DecimationFactor(%.17g, 8) = %d, want %d", c.fsHz, q, c.want)
		}
	}
	// what the slack grants costs nothing: at RateSlack past the passband
	// edge the filter still meets the passband ripple (1e-4 for 80 dB, the
	// factor 3 of TestAntiAliasFilterMeetsSpec)
	for _, q := range []int{5, 10, 25} {
		edge := PassbandFraction * 0.5 / float64(q) // cycles/sample
		if dev := math.Abs(tapResponse(antiAliasTaps(q), edge*(1+RateSlack)) - 1); dev > 3e-4 {
			t.Errorf("q=%d: response %.2g off unity just past the passband edge", q, dev)
		}
	}
}

// TestDot4MatchesDot: the four-channel dot product gives floats.Dot's bits
// for every length (the steps of four and the one to three left over) and
// for the length of a real anti-alias filter, on seeded random data whose
// magnitudes span several decades (so that the order of the additions
// shows in the last bits); dot4 as dispatched, and each of its paths this
// machine can run (dot4Paths).
func TestDot4MatchesDot(t *testing.T) {
	paths := map[string]func(h, x0, x1, x2, x3 []float64) (d0, d1, d2, d3 float64){"dot4": dot4}
	for name, f := range dot4Paths() {
		paths[name] = f
	}
	for name, dot := range paths {
		t.Run(name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(5, 6))
			lengths := []int{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 13, 64, 65, 66, 67, len(antiAliasTaps(25))}
			for _, n := range lengths {
				h := make([]float64, n)
				x := newMatrix(4, n+3)
				for i := range h {
					h[i] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(7)-3))
				}
				for _, v := range x {
					for i := range v {
						v[i] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(7)-3))
					}
				}
				got := [4]float64{}
				got[0], got[1], got[2], got[3] = dot(h, x[0], x[1], x[2][1:], x[3][3:])
				want := [4]float64{floats.Dot(h, x[0][:n]), floats.Dot(h, x[1][:n]), floats.Dot(h, x[2][1:n+1]), floats.Dot(h, x[3][3:n+3])}
				for k := range got {
					if math.Float64bits(got[k]) != math.Float64bits(want[k]) {
						t.Errorf("length %d, operand %d: %v, floats.Dot %v", n, k, got[k], want[k])
					}
				}
			}
		})
	}
}
