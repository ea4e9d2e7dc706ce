package main

import (
	"fmt"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
)

// car is one invented car of the sweep: its body model (the truth every
// simulated log comes from) and where its body accelerometers sit.
type car struct {
	name, what string
	vehicle    compare.Vehicle
	// sensorsXM are the accelerometer positions in m from the CG, positive
	// forward, each at least 0.25 m from both modes' nodes.
	sensorsXM []float64
}

// cars are invented for the sweep (every number is made up): plausible
// bodies with modes of 1.2-2.1 Hz, 17-34 % apart, damping ratios 0.15-0.39.
// Their modes: hatch 1.22/1.49 Hz, zeta 0.24/0.29; suv 1.29/1.66 Hz, 0.30/0.32;
// coupe 1.78/2.09 Hz, 0.25/0.28; tourer 1.26/1.68 Hz, 0.15/0.20; van
// 1.28/1.50 Hz, 0.37/0.39 (bounce/pitch; -list prints them).
var cars = []car{
	{name: "hatch", what: "compact hatchback",
		vehicle: compare.Vehicle{MassKg: 1180, PitchInertiaKgm2: 1500, CGToFrontM: 0.98, CGToRearM: 1.52,
			FrontRateNPerM: 40000, RearRateNPerM: 36000, FrontDampingNsPerM: 2500, RearDampingNsPerM: 2200},
		sensorsXM: []float64{1.25, -0.45, -1.55}},
	{name: "suv", what: "heavy SUV, sensors left and right",
		vehicle: compare.Vehicle{MassKg: 2250, PitchInertiaKgm2: 3500, CGToFrontM: 1.30, CGToRearM: 1.60,
			FrontRateNPerM: 74000, RearRateNPerM: 90000, FrontDampingNsPerM: 5600, RearDampingNsPerM: 5400},
		sensorsXM: []float64{1.45, 1.45, -1.70, -1.70}},
	{name: "coupe", what: "sports coupe",
		vehicle: compare.Vehicle{MassKg: 1420, PitchInertiaKgm2: 1800, CGToFrontM: 1.20, CGToRearM: 1.35,
			FrontRateNPerM: 88000, RearRateNPerM: 96000, FrontDampingNsPerM: 3900, RearDampingNsPerM: 4100},
		sensorsXM: []float64{1.30, -1.40}},
	{name: "tourer", what: "light-damping estate, modes 34 % apart",
		vehicle: compare.Vehicle{MassKg: 1500, PitchInertiaKgm2: 1750, CGToFrontM: 1.15, CGToRearM: 1.60,
			FrontRateNPerM: 50000, RearRateNPerM: 48000, FrontDampingNsPerM: 1900, RearDampingNsPerM: 1800},
		sensorsXM: []float64{1.25, -0.60, -1.70}},
	{name: "van", what: "heavy-damping city van, modes 17 % apart",
		vehicle: compare.Vehicle{MassKg: 1300, PitchInertiaKgm2: 1700, CGToFrontM: 1.10, CGToRearM: 1.45,
			FrontRateNPerM: 45000, RearRateNPerM: 43000, FrontDampingNsPerM: 4250, RearDampingNsPerM: 3500},
		sensorsXM: []float64{1.20, -0.50, -1.55}},
}

// endSensors returns the indices of the front-most and rear-most sensors,
// the pair an hour-long log keeps.
func (c car) endSensors() []int {
	front, rear := 0, 0
	for i, x := range c.sensorsXM {
		if x > c.sensorsXM[front] {
			front = i
		}
		if x < c.sensorsXM[rear] {
			rear = i
		}
	}
	return []int{front, rear}
}

// setupTOML returns the car's setup file with the sensors of index keep:
// the true body as the design model, so that the back-calculated rates
// have the car's own rates as their truth, and one pan per axle.
func (c car) setupTOML(keep []int) string {
	v := c.vehicle
	var b strings.Builder
	fmt.Fprintf(&b, "# Calibration sweep: %s (%s); an invented car.\n\n[vehicle]\nname = %q\n", c.name, c.what, c.name)
	fmt.Fprintf(&b, "mass_kg = %g\npitch_inertia_kgm2 = %g\ncg_to_front_axle_m = %g\ncg_to_rear_axle_m = %g\n",
		v.MassKg, v.PitchInertiaKgm2, v.CGToFrontM, v.CGToRearM)
	fmt.Fprintf(&b, "front_rate_n_per_m = %g\nrear_rate_n_per_m = %g\nfront_damping_ns_per_m = %g\nrear_damping_ns_per_m = %g\n",
		v.FrontRateNPerM, v.RearRateNPerM, v.FrontDampingNsPerM, v.RearDampingNsPerM)
	for _, i := range keep {
		fmt.Fprintf(&b, "\n[[sensor]]\nchannel = \"body_%d\"\nx_m = %g\n", i+1, c.sensorsXM[i])
	}
	b.WriteString("\n[[input]]\nchannel = \"pan_front\"\naxle = \"front\"\n\n[[input]]\nchannel = \"pan_rear\"\naxle = \"rear\"\n")
	return b.String()
}

// allSensors returns the indices of every sensor of c.
func (c car) allSensors() []int {
	idx := make([]int, len(c.sensorsXM))
	for i := range idx {
		idx[i] = i
	}
	return idx
}
