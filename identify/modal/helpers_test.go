package modal

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"github.com/ridemodes/ridemodes/compare"
)

// analyticSet returns the model's transmissibility at the sensors on a
// uniform grid with circular complex Gaussian noise of standard deviation
// relNoise*|H| per real component (the shape of a spectral error band), and
// SigmaAbs set to that standard deviation. Synthetic data with known truth.
func analyticSet(v compare.Vehicle, posM []float64, loHz, hiHz, dfHz, relNoise float64, rng *rand.Rand) *FRFSet {
	set := &FRFSet{OutputPosM: posM, InputNames: []string{"pan_front", "pan_rear"}}
	for f := loHz; f <= hiHz+1e-9; f += dfHz {
		set.FreqHz = append(set.FreqHz, f)
	}
	for o, s := range posM {
		set.OutputNames = append(set.OutputNames, "body"+string(rune('A'+o)))
		h := [][]complex128{make([]complex128, len(set.FreqHz)), make([]complex128, len(set.FreqHz))}
		sd := [][]float64{make([]float64, len(set.FreqHz)), make([]float64, len(set.FreqHz))}
		coh := make([]float64, len(set.FreqHz))
		for k, f := range set.FreqHz {
			hf, hr := v.Transmissibility(f, s)
			for i, x := range []complex128{hf, hr} {
				sig := relNoise * cmplx.Abs(x)
				sd[i][k] = sig
				h[i][k] = x + complex(sig*rng.NormFloat64(), sig*rng.NormFloat64())
			}
			coh[k] = 1
		}
		set.H = append(set.H, h)
		set.SigmaAbs = append(set.SigmaAbs, sd)
		set.Coherence = append(set.Coherence, coh)
	}
	return set
}

// roundTripCar is the damped round trip of the design notes (domain.md
// [derived]): poles 1.1385 Hz, zeta 0.3055 and 1.3678 Hz, zeta 0.3300.
func roundTripCar() compare.Vehicle {
	return compare.Vehicle{MassKg: 1500, PitchInertiaKgm2: 2160, CGToFrontM: 1.2, CGToRearM: 1.5,
		FrontRateNPerM: 40000, RearRateNPerM: 42000, FrontDampingNsPerM: 3464, RearDampingNsPerM: 3175}
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }
