package modal

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/ridemodes/ridemodes/identify/body"
	"github.com/ridemodes/ridemodes/identify/spectral"
)

// TestWindowKernelHann checks the Hann kernel against its own moments
// [derived]: |W|^2 integrates to one after normalisation, is even, and its
// second moment is int w'^2/(4 pi^2 int w^2) in bins^2, which for
// w = sin^2(pi n/N) is (pi^2/2)/(4 pi^2 (3/8)) = 1/3 bin^2 (the sampled,
// truncated kernel within a few per mille).
func TestWindowKernelHann(t *testing.T) {
	const momentTol = 0.005
	w, err := spectral.Hann.Values(1024)
	if err != nil {
		t.Fatal(err)
	}
	taps := WindowKernel(w)
	var sum, m2 float64
	for i, k := range taps {
		sum += k.Weight
		m2 += k.Weight * k.OffsetBins * k.OffsetBins
		j := len(taps) - 1 - i
		if k.OffsetBins != -taps[j].OffsetBins || math.Abs(k.Weight-taps[j].Weight) > 1e-15 {
			t.Fatalf("kernel not even at tap %d: %+v vs %+v", i, k, taps[j])
		}
	}
	if math.Abs(sum-1) > 1e-12 || math.Abs(m2-1.0/3)/(1.0/3) > momentTol {
		t.Errorf("sum %.15g (want 1), second moment %.5f bin^2 (want 1/3)", sum, m2)
	}
}

// smoothedSet is an analytic set (truth: the round-trip car of the design
// notes) as a Welch H1 estimate sees it in expectation: the exact
// transmissibility smoothed by the Hann kernel of segments of segS
// seconds, with a uniform small error band and no noise.
func smoothedSet(segS float64) (*FRFSet, []float64) {
	v := roundTripCar()
	pos := []float64{0.9, -1.2}
	df := 1 / segS
	set := analyticSet(v, pos, df, 6, df, 0, rand.New(rand.NewPCG(1, 1)))
	w, _ := spectral.Hann.Values(256)
	set.Kernel = WindowKernel(w)
	for o, s := range pos {
		for k, f := range set.FreqHz {
			var hs [2]complex128
			for _, tap := range set.Kernel {
				hf, hr := v.Transmissibility(f+tap.OffsetBins*df, s)
				hs[0] += complex(tap.Weight, 0) * hf
				hs[1] += complex(tap.Weight, 0) * hr
			}
			for i := range 2 {
				set.H[o][i][k] = hs[i]
				set.SigmaAbs[o][i][k] = 1e-3
			}
		}
	}
	return set, pos
}

// TestResolutionBiasPredictsSmoothing: fitted to the expected Welch FRF at a
// coarse resolution (Be/Br = 0.11 for the lighter mode, where the
// smoothing lifts zeta by about 0.005), the fit's error against the
// truth is what its stated resolution bias predicts (a first-order
// estimate taken at the biased fit: within 15 %), and the stated standard
// deviations cover it.
func TestResolutionBiasPredictsSmoothing(t *testing.T) {
	const predictTol = 0.15
	truth, err := roundTripCar().DampedModes()
	if err != nil {
		t.Fatal(err)
	}
	set, _ := smoothedSet(20)
	res, err := Fit(set, Options{BandLowHz: 0.4, BandHighHz: 4})
	if err != nil {
		t.Fatal(err)
	}
	for i, m := range res.Modes {
		b := res.ResolutionBias[i]
		ez := m.DampingRatio - truth[i].DampingRatio
		ef := m.NaturalFrequencyHz - truth[i].NaturalFrequencyHz
		t.Logf("%s: zeta error %+.5f, stated bias %+.5f, sd %.5f; fn error %+.5f Hz, stated bias %+.5f Hz", m.Label, ez, b.DampingRatio, m.SD.DampingRatio, ef, b.NaturalFrequencyHz)
		if !(ez > 0) || math.Abs(b.DampingRatio-ez) > predictTol*math.Abs(ez) {
			t.Errorf("%s: zeta error %+.5f, stated resolution bias %+.5f", m.Label, ez, b.DampingRatio)
		}
		if math.Abs(ez) > 2*m.SD.DampingRatio || math.Abs(ef) > 2*m.SD.NaturalFrequencyHz {
			t.Errorf("%s: errors zeta %+.5f fn %+.5f Hz beyond 2 sd (%.5f, %.5f Hz)", m.Label, ez, ef, m.SD.DampingRatio, m.SD.NaturalFrequencyHz)
		}
	}
}

// TestLSCFShapes: at a low noise the shapes that the stabilisation check
// compares (from the LSCF numerators) match the model's mode shapes at the
// sensors (truth: compare's damped modes of the round-trip car; MAC above
// StabilityMAC), so the MAC criterion does not reject real modes.
func TestLSCFShapes(t *testing.T) {
	v := roundTripCar()
	truth, err := v.DampedModes()
	if err != nil {
		t.Fatal(err)
	}
	pos := []float64{0.9, -1.2, 0.1}
	set := analyticSet(v, pos, 0.2, 6, 0.025, 0.005, rand.New(rand.NewPCG(3, 4)))
	b, _ := newBand(set, 0.4, 4)
	pts, _, err := stabilise(b, 12)
	if err != nil {
		t.Fatal(err)
	}
	for _, tr := range truth {
		want := make([]complex128, len(pos))
		for k, s := range pos {
			want[k] = tr.ShapeAt(s)
		}
		found := 0
		for _, p := range pts {
			if p.Order >= 4 && relErr(p.NaturalFrequencyHz, tr.NaturalFrequencyHz) < 0.01 {
				found++
				if mac := body.MAC(p.Shape, want); !(mac > StabilityMAC) {
					t.Errorf("order %d pole at %.4f Hz: MAC %.4f with the true %s shape", p.Order, p.NaturalFrequencyHz, mac, tr.Label)
				}
			}
		}
		if found < 4 {
			t.Errorf("%s: found at only %d orders", tr.Label, found)
		}
	}
}

// TestShapeUnstablePoleNotChosen: a pole that holds its frequency and
// damping across orders but whose shape wanders (a noise pole) is not
// stable, and the two body modes are chosen even where that pole appears at
// more orders than they do (hand-made stabilisation data).
func TestShapeUnstablePoleNotChosen(t *testing.T) {
	bounce := []complex128{1, 0.9}
	pitch := []complex128{1, -1.4}
	point := func(order int, fHz, zeta float64, shape []complex128) StabilisationPoint {
		w := 2 * math.Pi * fHz
		return StabilisationPoint{Order: order, Pole: complex(-zeta*w, w*math.Sqrt(1-zeta*zeta)),
			NaturalFrequencyHz: fHz, DampingRatio: zeta, Physical: true, Shape: shape}
	}
	var pts, prev []StabilisationPoint
	for order := 2; order <= 12; order++ {
		cur := []StabilisationPoint{
			// The noise pole: same frequency and damping, shape turning by
			// 40 degrees of phase at the rear sensor from order to order.
			point(order, 2.2, 0.05, []complex128{1, cmplx.Rect(1, 0.7*float64(order))}),
		}
		if order >= 6 {
			cur = append(cur, point(order, 1.1, 0.3, bounce), point(order, 1.4, 0.32, pitch))
		}
		for i := range cur {
			cur[i].classify(prev)
		}
		pts = append(pts, cur...)
		prev = cur
	}
	for _, p := range pts {
		if p.NaturalFrequencyHz == 2.2 && (p.Status != PoleNew || p.MAC >= StabilityMAC) {
			t.Fatalf("order %d noise pole: status %v, MAC %.3f", p.Order, p.Status, p.MAC)
		}
	}
	for _, least := range []PoleStatus{PoleStable, PoleFrequencyStable} {
		cs := stableClusters(pts, least)
		if len(cs) != 2 {
			t.Fatalf("least %v: %d clusters, want the two body modes", least, len(cs))
		}
		for _, c := range cs {
			if f := c.representative().NaturalFrequencyHz; f != 1.1 && f != 1.4 {
				t.Errorf("least %v: chose a pole at %.3g Hz", least, f)
			}
		}
	}
}
