package modal

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// analyticNoise is the relative noise of the analytic FRFs: 2 % per real
// component, the size of a spectral error band at coherence 0.99 with about
// 12 averages [derived from sqrt((1-coh)/(2 coh nd))].
const analyticNoise = 0.02

// TestFitAnalyticRoundTripCar fits the model's exact transmissibility with
// noise of known size (synthetic data, truth from compare.DampedModes) and
// checks the errors against the reported standard deviations.
func TestFitAnalyticRoundTripCar(t *testing.T) {
	v := roundTripCar()
	truth, err := v.DampedModes()
	if err != nil {
		t.Fatal(err)
	}
	set := analyticSet(v, []float64{0.9, -1.2}, 0.2, 6, 0.025, analyticNoise, rand.New(rand.NewPCG(1, 2)))
	res, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4})
	if err != nil {
		t.Fatal(err)
	}
	const maxSigmas = 4 // a seeded draw; 4 sd is a failure by any standard
	for i, m := range res.Modes {
		tr := truth[i]
		if m.Label != tr.Label {
			t.Errorf("mode %d: label %s, want %s", i, m.Label, tr.Label)
		}
		for _, c := range []struct {
			name          string
			got, want, sd float64
		}{
			{"fn", m.NaturalFrequencyHz, tr.NaturalFrequencyHz, m.SD.NaturalFrequencyHz},
			{"zeta", m.DampingRatio, tr.DampingRatio, m.SD.DampingRatio},
			{"pitch per bounce", m.PitchPerBounceRadPerM, tr.PitchPerBounceRadPerM, m.SD.PitchPerBounceRadPerM},
			{"node", m.NodeM, tr.NodeM, m.SD.NodeM},
		} {
			if !(c.sd > 0) || math.Abs(c.got-c.want) > maxSigmas*c.sd {
				t.Errorf("%s %s: %.5g ± %.2g, want %.5g", m.Label, c.name, c.got, c.sd, c.want)
			}
		}
	}
	if res.ChiSquarePerDOF < 0.7 || res.ChiSquarePerDOF > 1.3 {
		t.Errorf("chi-square per dof %.3f with correct error bands, want about 1", res.ChiSquarePerDOF)
	}
	// The naive estimate sees one merged hump and warns about it.
	if !hasWarning(res.Warnings, WarnOverlap) || !hasWarning(res.Warnings, WarnHeavyDamping) {
		t.Errorf("quick estimate on two close heavily damped modes: want overlap and heavy-damping warnings, got %v", res.Warnings)
	}
}

func hasWarning(ws []Warning, code WarningCode) bool {
	for _, w := range ws {
		if w.Code == code {
			return true
		}
	}
	return false
}

// TestHalfPowerExact checks the exact half-power relations on a
// single-mode receptance 1/(wn^2 - w^2 + 2 i zeta wn w), whose half-power
// frequencies are found here by bisection on |H| = |H_peak|/sqrt(2)
// (synthetic data with known truth; the peak of a receptance lies at
// wn sqrt(1 - 2 zeta^2)).
func TestHalfPowerExact(t *testing.T) {
	const halfPowerTol = 1e-9
	for _, zeta := range []float64{0.02, 0.1, 0.2, 0.3, 0.38} {
		fn := 1.3
		h := func(f float64) float64 {
			r := f / fn
			return 1 / cmplx.Abs(complex(1-r*r, 2*zeta*r))
		}
		fp := fn * math.Sqrt(1-2*zeta*zeta)
		level := h(fp) / math.Sqrt2
		f1 := bisect(func(f float64) float64 { return h(f) - level }, 1e-6, fp)
		f2 := bisect(func(f float64) float64 { return h(f) - level }, fp, 10*fn)
		gz, gf := halfPower(f1, f2)
		if math.Abs(gz-zeta) > halfPowerTol || math.Abs(gf-fn) > halfPowerTol*fn {
			t.Errorf("zeta %g: half-power gives zeta %.12g, fn %.12g; want %g, %g", zeta, gz, gf, zeta, fn)
		}
	}
}

func bisect(f func(float64) float64, a, b float64) float64 {
	fa := f(a)
	for range 200 {
		m := (a + b) / 2
		if fm := f(m); (fm > 0) == (fa > 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return (a + b) / 2
}

// TestThreeSensors: three sensors along the body (heave and pitch by least
// squares) and a left/right pair at one position both go through Fit.
func TestThreeSensors(t *testing.T) {
	v := roundTripCar()
	truth, _ := v.DampedModes()
	for _, pos := range [][]float64{{1.0, 0.1, -1.3}, {0.9, 0.9, -1.2}} {
		set := analyticSet(v, pos, 0.2, 6, 0.025, analyticNoise, rand.New(rand.NewPCG(3, 4)))
		res, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4})
		if err != nil {
			t.Fatal(err)
		}
		for i, m := range res.Modes {
			if e := relErr(m.NodeM, truth[i].NodeM); e > targetNodeRel || len(m.Shape) != len(pos) {
				t.Errorf("sensors %v: %s node %.3f, want %.3f", pos, m.Label, m.NodeM, truth[i].NodeM)
			}
		}
	}
}

// TestNoModesError: FRFs with no modes in the band (a constant
// transmissibility of one plus noise) return ErrTooFewModes with advice.
func TestNoModesError(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	set := analyticSet(roundTripCar(), []float64{1, -1}, 0.2, 6, 0.025, analyticNoise, rng)
	for o := range set.H {
		for i := range set.H[o] {
			for k := range set.H[o][i] {
				set.H[o][i][k] = complex(1+analyticNoise*rng.NormFloat64(), analyticNoise*rng.NormFloat64())
				set.SigmaAbs[o][i][k] = analyticNoise
			}
		}
	}
	_, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4})
	if !errors.Is(err, ErrTooFewModes) {
		t.Fatalf("got %v, want ErrTooFewModes", err)
	}
}

// TestBinCorrelationHann: the periodic Hann window's bin correlation is
// 4/9 at lag 1 and 1/36 at lag 2 [derived in BinCorrelation's comment].
func TestBinCorrelationHann(t *testing.T) {
	const n = 256
	w := make([]float64, n)
	for i := range w {
		w[i] = 0.5 - 0.5*math.Cos(2*math.Pi*float64(i)/n)
	}
	rho := BinCorrelation(w, 8)
	const tol = 1e-12
	if len(rho) != 2 || math.Abs(rho[0]-4.0/9) > tol || math.Abs(rho[1]-1.0/36) > tol {
		t.Errorf("Hann bin correlation %v, want [4/9 1/36]", rho)
	}
}

// BenchmarkFit measures the fit of the round-trip car's FRFs (2 sensors x 2
// pans, 145 bins in the band).
func BenchmarkFit(b *testing.B) {
	set := analyticSet(roundTripCar(), []float64{0.9, -1.2}, 0.2, 6, 0.025, analyticNoise, rand.New(rand.NewPCG(1, 2)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestOutputCorrelationCovariance: when the errors of the two sensors' FRFs
// correlate (as the pans' own noise makes them), the fit's stated standard
// deviations follow the scatter over seeded draws once the set carries the
// correlation (FRFSet.OutputCorrelation), and understate it without
// (synthetic data with known truth; a Monte Carlo check of the sandwich
// covariance).
func TestOutputCorrelationCovariance(t *testing.T) {
	const (
		draws = 40
		corr  = 0.9
	)
	c := complex(corr*math.Cos(0.4), corr*math.Sin(0.4))
	v := roundTripCar()
	truth, _ := v.DampedModes()
	var sumSq, sumSDWith, sumSDWithout [2]float64
	for d := range draws {
		rng := rand.New(rand.NewPCG(7, uint64(d)))
		set := analyticSet(v, []float64{0.9, -1.2}, 0.2, 6, 0.025, 0, rng)
		nf := len(set.FreqHz)
		for i := range 2 {
			for k := range nf {
				z1 := complex(rng.NormFloat64(), rng.NormFloat64())
				z2 := complex(rng.NormFloat64(), rng.NormFloat64())
				for o, z := range []complex128{z1, cmplx.Conj(c)*z1 + complex(math.Sqrt(1-corr*corr), 0)*z2} {
					sd := analyticNoise * cmplx.Abs(set.H[o][i][k])
					set.SigmaAbs[o][i][k] = sd
					set.H[o][i][k] += complex(sd, 0) * z
				}
			}
		}
		without, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4})
		if err != nil {
			t.Fatal(err)
		}
		cc := make([]complex128, nf)
		ccConj := make([]complex128, nf)
		ones := make([]complex128, nf)
		for k := range nf {
			cc[k], ccConj[k], ones[k] = c, cmplx.Conj(c), 1
		}
		set.OutputCorrelation = [][][]complex128{{ones, cc}, {ccConj, ones}}
		with, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4})
		if err != nil {
			t.Fatal(err)
		}
		for m := range 2 {
			e := with.Modes[m].NaturalFrequencyHz - truth[m].NaturalFrequencyHz
			sumSq[m] += e * e
			sumSDWith[m] += with.Modes[m].SD.NaturalFrequencyHz
			sumSDWithout[m] += without.Modes[m].SD.NaturalFrequencyHz
		}
	}
	for m := range 2 {
		rms := math.Sqrt(sumSq[m] / draws)
		with, without := sumSDWith[m]/draws, sumSDWithout[m]/draws
		t.Logf("%s: RMS error %.2e Hz, mean stated sd %.2e with the correlation, %.2e without", truth[m].Label, rms, with, without)
		// 40 draws: the RMS error itself scatters by about 11 %.
		if r := rms / with; r < 0.75 || r > 1.3 {
			t.Errorf("%s: RMS error / stated sd %.2f with the output correlation, want 0.75-1.3", truth[m].Label, r)
		}
	}
}
