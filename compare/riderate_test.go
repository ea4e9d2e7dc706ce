package compare

import (
	"math"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/ingest"
)

func TestSpringRateForInvertsRideRate(t *testing.T) {
	// Round trip of Gillespie's series relation (Fundamentals of Vehicle
	// Dynamics, 1992): spring -> ride -> spring.
	const tol = 1e-12
	for _, b := range []ingest.RideRateBuildUp{
		{SpringRateNPerM: 80000, MotionRatioSpringPerWheel: 0.7, TyreRateNPerM: 400000},
		{SpringRateNPerM: 60000, MotionRatioSpringPerWheel: 0.95, TyreRateNPerM: math.Inf(1)},
	} {
		ks, err := SpringRateFor(b, b.RideRateNPerM())
		if err != nil {
			t.Fatal(err)
		}
		if rel(ks, b.SpringRateNPerM) > tol {
			t.Errorf("spring %g, want %g", ks, b.SpringRateNPerM)
		}
		r := AxleRideRate{Axle: "front", RideRateNPerM: b.RideRateNPerM(), BuildUp: &b}
		if !strings.Contains(r.String(), "spring per wheel travel") {
			t.Errorf("description %q", r.String())
		}
	}
	// Limit: a ride rate at or above the tyre rate has no spring.
	if _, err := SpringRateFor(ingest.RideRateBuildUp{SpringRateNPerM: 1, MotionRatioSpringPerWheel: 1, TyreRateNPerM: 1000}, 1000); err == nil {
		t.Error("ride rate = tyre rate should be an error")
	}
}
