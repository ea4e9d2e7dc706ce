package compare

import (
	"fmt"
	"math"

	"github.com/ridemodes/ridemodes/ingest"
)

// AxleRideRate says how the model's ride rate of one axle was obtained, for
// the command to print: given directly in the setup, or built up from the
// spring rate, the motion ratio (spring travel per wheel travel) and the tyre
// rate (ingest.RideRateBuildUp, which holds the formulas and their source).
type AxleRideRate struct {
	Axle          string // "front" or "rear"
	RideRateNPerM float64
	// BuildUp is nil when the setup gives the ride rate directly.
	BuildUp *ingest.RideRateBuildUp
}

// RideRates returns the front and rear AxleRideRate of a setup's vehicle.
func RideRates(spec ingest.VehicleSpec) []AxleRideRate {
	return []AxleRideRate{
		{Axle: "front", RideRateNPerM: spec.FrontRateNPerM, BuildUp: spec.FrontBuildUp},
		{Axle: "rear", RideRateNPerM: spec.RearRateNPerM, BuildUp: spec.RearBuildUp},
	}
}

// String describes the ride rate in one line, e.g. "front: spring 80000 N/m
// x 0.700^2 = wheel 39200 N/m, in series with tyre 400000 N/m = ride 35701 N/m".
func (r AxleRideRate) String() string {
	b := r.BuildUp
	if b == nil {
		return fmt.Sprintf("%s: ride rate %.0f N/m (given)", r.Axle, r.RideRateNPerM)
	}
	tyre := "rigid tyre (no tyre rate given)"
	if !math.IsInf(b.TyreRateNPerM, 1) {
		tyre = fmt.Sprintf("in series with tyre %.0f N/m", b.TyreRateNPerM)
	}
	return fmt.Sprintf("%s: spring %.0f N/m x %.3f^2 (spring per wheel travel) = wheel %.0f N/m, %s = ride %.0f N/m",
		r.Axle, b.SpringRateNPerM, b.MotionRatioSpringPerWheel, b.WheelRateNPerM(), tyre, r.RideRateNPerM)
}

// JSON returns the ride rate and its build-up in the result's form.
func (r AxleRideRate) JSON() RideRateJSON {
	j := RideRateJSON{Axle: r.Axle, RideRateNPerM: r.RideRateNPerM, Source: "given"}
	if b := r.BuildUp; b != nil {
		j.Source = "built_up"
		j.SpringRateNPerM, j.MotionRatioSpringPerWheel = Finite(b.SpringRateNPerM), Finite(b.MotionRatioSpringPerWheel)
		j.WheelRateNPerM, j.TyreRateNPerM = Finite(b.WheelRateNPerM()), Finite(b.TyreRateNPerM)
	}
	return j
}

// SpringRateFor returns the axle spring rate (N/m, both springs) that gives
// the ride rate rideNPerM with the motion ratio and tyre rate of b: the
// inverse of RideRateNPerM, ks = kw / ratio^2 with 1/kw = 1/kride - 1/kt.
// It fails when the ride rate is not below the tyre rate (no spring can
// reach it).
func SpringRateFor(b ingest.RideRateBuildUp, rideNPerM float64) (float64, error) {
	if !(rideNPerM > 0) || math.IsInf(rideNPerM, 0) {
		return 0, fmt.Errorf("a ride rate of %g N/m has no spring rate; it must be positive and finite", rideNPerM)
	}
	kw := rideNPerM
	if !math.IsInf(b.TyreRateNPerM, 1) {
		if rideNPerM >= b.TyreRateNPerM {
			return 0, fmt.Errorf("a ride rate of %.0f N/m is not below the tyre rate of %.0f N/m, "+
				"so no spring gives it; check the tyre rate in the setup", rideNPerM, b.TyreRateNPerM)
		}
		kw = 1 / (1/rideNPerM - 1/b.TyreRateNPerM)
	}
	return kw / (b.MotionRatioSpringPerWheel * b.MotionRatioSpringPerWheel), nil
}
