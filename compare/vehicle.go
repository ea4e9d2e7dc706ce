package compare

import "github.com/ridemodes/ridemodes/ingest"

// FromSpec returns the design model of a setup file's [vehicle] table.
func FromSpec(s ingest.VehicleSpec) Vehicle {
	return Vehicle{
		MassKg: s.MassKg, PitchInertiaKgm2: s.PitchInertiaKgm2,
		CGToFrontM: s.CGToFrontM, CGToRearM: s.CGToRearM,
		FrontRateNPerM: s.FrontRateNPerM, RearRateNPerM: s.RearRateNPerM,
		FrontDampingNsPerM: s.FrontDampingNsPerM, RearDampingNsPerM: s.RearDampingNsPerM,
	}
}
