package modal

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestModelFRFReproducesFit checks the fitted model against the FRFs it was
// fitted to: on analytic FRFs of the design-notes car with 1e-4 relative
// noise the model must reproduce every FRF in the band to within
// modelFRFTol of its peak.
func TestModelFRFReproducesFit(t *testing.T) {
	const modelFRFTol = 1e-3
	set := analyticSet(roundTripCar(), []float64{0.9, -1.2}, 0.2, 4, 0.02, 1e-4, rand.New(rand.NewPCG(4, 4)))
	res, err := Fit(set, Options{BandLowHz: 0.5, BandHighHz: 3})
	if err != nil {
		t.Fatal(err)
	}
	for o := range set.H {
		for i := range set.H[o] {
			var peak, worst float64
			for k, f := range set.FreqHz {
				if f < 0.5 || f > 3 {
					continue
				}
				peak = math.Max(peak, cmplx.Abs(set.H[o][i][k]))
				worst = math.Max(worst, cmplx.Abs(res.ModelFRF(o, i, f)-set.H[o][i][k]))
			}
			if worst > modelFRFTol*peak {
				t.Errorf("FRF %d/%d: model misses by %.2e of peak %.3f", o, i, worst/peak, peak)
			}
		}
	}
}
