package cli

import (
	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// vehicleOf returns the design model of a setup file's [vehicle] table.
func vehicleOf(s ingest.VehicleSpec) compare.Vehicle {
	return compare.Vehicle{
		MassKg: s.MassKg, PitchInertiaKgm2: s.PitchInertiaKgm2,
		CGToFrontM: s.CGToFrontM, CGToRearM: s.CGToRearM,
		FrontRateNPerM: s.FrontRateNPerM, RearRateNPerM: s.RearRateNPerM,
		FrontDampingNsPerM: s.FrontDampingNsPerM, RearDampingNsPerM: s.RearDampingNsPerM,
	}
}
