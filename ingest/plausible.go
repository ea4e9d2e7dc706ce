package ingest

import (
	"fmt"
	"math"
)

// Plausibility of the [vehicle] table: a value far outside what any road
// car, van or light truck has is almost always a slip of the unit (41 for
// 41 kN/m, 1180 for 1180 mm, 1.52 for 1.52 t). Such a value is an error
// that says what the number probably meant, instead of a model that runs
// and gives nonsense. The bounds are our own, set wide on purpose (about
// ten times beyond common cars either way); the typical values beside them
// are common practice (Gillespie, Fundamentals of Vehicle Dynamics, 1992,
// chapter 5, recalled from memory for the body damping ratios).

// plausibleRange is the range of one kind of setup value and the slips of
// unit that put a value outside it.
type plausibleRange struct {
	lo, hi float64
	unit   string // the key's unit, for the message
	// whose completes "far below/above ...", e.g. "any car's ride rate".
	whose string
	slips []unitSlip
}

// unitSlip is a likely mistake: the value written in another unit. factor
// converts it to the key's unit; words says it, with the value as written
// for %[1]g, e.g. "%[1]g kN/m".
type unitSlip struct {
	factor float64
	words  string
}

var (
	plausibleMass = plausibleRange{100, 20000, "kg", "any car's sprung mass",
		[]unitSlip{{1000, "%[1]g t"}}}
	plausibleLength = plausibleRange{0.1, 6, "m", "any car's axle distance from the CG",
		[]unitSlip{{0.001, "%[1]g mm"}, {0.01, "%[1]g cm"}}}
	plausibleGyration = plausibleRange{0.2, 5, "m", "any car's pitch radius of gyration (about 1-1.5 m)",
		[]unitSlip{{0.001, "%[1]g mm"}, {0.01, "%[1]g cm"}}}
	plausibleRideRate = plausibleRange{3e3, 2e6, "N/m", "any car's ride rate (per axle, both wheels)",
		[]unitSlip{{1000, "%[1]g kN/m, or %[1]g N/mm"}}}
	plausibleSpringRate = plausibleRange{3e3, 5e6, "N/m", "any car's spring rate (per axle, both springs)",
		[]unitSlip{{1000, "%[1]g kN/m, or %[1]g N/mm"}}}
	plausibleTyreRate = plausibleRange{5e4, 2e7, "N/m", "any car's tyre rate (per axle, both tyres)",
		[]unitSlip{{1000, "%[1]g kN/m, or %[1]g N/mm"}}}
	plausibleMotionRatio = plausibleRange{0.1, 2, "", "any suspension's motion ratio (spring per wheel travel)",
		[]unitSlip{{0.01, "%[1]g %%"}}}
)

// Limits of an axle's own damping ratio c/(2 sqrt(k m_axle)), with m_axle
// its static share of the sprung mass: car bodies are damped about 0.2-0.4
// (common practice), sports cars up to about 0.7.
const (
	axleDampingRatioLow  = 0.01
	axleDampingRatioHigh = 1
)

// implausible returns a message when v lies outside r, else "": how far it
// lies, and the slip that would bring it nearest the middle of the range
// (geometric: 150 for cg_to_rear_axle_m is 1.5 m in cm rather than 0.15 m
// in mm).
func (r plausibleRange) implausible(v float64) string {
	if v >= r.lo && v <= r.hi {
		return ""
	}
	side := "below"
	if v > r.hi {
		side = "above"
	}
	unit := ""
	if r.unit != "" {
		unit = " " + r.unit
	}
	msg := fmt.Sprintf("%s%s is far %s %s", fmtPlain(v), unit, side, r.whose)
	// of the slips that bring v into the range, the one nearest its middle
	mid, best, bestDist := math.Sqrt(r.lo*r.hi), -1, math.Inf(1)
	for i, s := range r.slips {
		if x := v * s.factor; x >= r.lo && x <= r.hi && math.Abs(math.Log(x/mid)) < bestDist {
			best, bestDist = i, math.Abs(math.Log(x/mid))
		}
	}
	if best < 0 {
		return msg + "; check the value and its unit"
	}
	s := r.slips[best]
	return msg + fmt.Sprintf("; did you mean %s (%s)?", fmtPlain(v*s.factor), fmt.Sprintf(s.words, v))
}

// fmtPlain formats a value without an exponent where it is a whole number.
func fmtPlain(x float64) string {
	if x == math.Trunc(x) && math.Abs(x) < 1e15 {
		return fmt.Sprintf("%.0f", x)
	}
	return fmt.Sprintf("%.6g", x)
}

// plausibleVehicle checks the values of a [vehicle] table that decoded and
// validated (rv is the file's table, vs what it gives): each against its
// plausible range, and the dampers together.
func (v *validator) plausibleVehicle(rv *rawVehicle, vs *VehicleSpec) {
	check := func(key string, r plausibleRange, x float64) {
		if msg := r.implausible(x); msg != "" {
			v.fail("vehicle."+key, "vehicle."+key, "%s", msg)
		}
	}
	check("mass_kg", plausibleMass, vs.MassKg)
	check("cg_to_front_axle_m", plausibleLength, vs.CGToFrontM)
	check("cg_to_rear_axle_m", plausibleLength, vs.CGToRearM)
	if rv.RadiusOfGyrationM != nil {
		check("radius_of_gyration_m", plausibleGyration, *rv.RadiusOfGyrationM)
	} else if v.err == nil {
		// J = m k^2: the radius of gyration's range, and t m^2 for a slip
		m, g := vs.MassKg, plausibleGyration
		check("pitch_inertia_kgm2", plausibleRange{m * g.lo * g.lo, m * g.hi * g.hi, "kg m^2",
			fmt.Sprintf("any car's pitch inertia for %g kg (a radius of gyration sqrt(J/m) of %.3g m; cars have about 1-1.5 m)",
				m, math.Sqrt(vs.PitchInertiaKgm2/m)), []unitSlip{{1000, "%[1]g t m^2"}}}, vs.PitchInertiaKgm2)
	}
	for _, ax := range []struct {
		name    string
		rate    float64
		buildUp *RideRateBuildUp
		tyre    bool
	}{
		{"front", vs.FrontRateNPerM, vs.FrontBuildUp, rv.FrontTyreRateNPerM != nil},
		{"rear", vs.RearRateNPerM, vs.RearBuildUp, rv.RearTyreRateNPerM != nil},
	} {
		if ax.buildUp == nil {
			check(ax.name+"_rate_n_per_m", plausibleRideRate, ax.rate)
			continue
		}
		check(ax.name+"_spring_rate_n_per_m", plausibleSpringRate, ax.buildUp.SpringRateNPerM)
		check(ax.name+"_motion_ratio_spring_per_wheel", plausibleMotionRatio, ax.buildUp.MotionRatioSpringPerWheel)
		if ax.tyre {
			check(ax.name+"_tyre_rate_n_per_m", plausibleTyreRate, ax.buildUp.TyreRateNPerM)
		}
		if msg := plausibleRideRate.implausible(ax.rate); msg != "" {
			key := "vehicle." + ax.name + "_spring_rate_n_per_m"
			v.fail(key, key, "the %s axle's spring, motion ratio and tyre give a ride rate of %s", ax.name, msg)
		}
	}
	v.plausibleDamping(vs)
}

// plausibleDamping asks for both dampers or neither (one alone would leave
// the other axle undamped without a word) and checks each axle's own
// damping ratio.
func (v *validator) plausibleDamping(vs *VehicleSpec) {
	front, rear := vs.FrontDampingNsPerM > 0, vs.RearDampingNsPerM > 0
	if front != rear {
		given, missing := "front_damping_ns_per_m", "rear_damping_ns_per_m"
		if rear {
			given, missing = missing, given
		}
		v.fail("vehicle."+missing, "vehicle."+given, "%s is given but %s is not (or is 0): one axle without damping "+
			"is no car; give both axles' damping in N s/m, or neither for an undamped model", given, missing)
		return
	}
	if !front || v.err != nil {
		return
	}
	L := vs.CGToFrontM + vs.CGToRearM
	for _, ax := range []struct {
		key     string
		c, k, m float64
	}{
		{"front_damping_ns_per_m", vs.FrontDampingNsPerM, vs.FrontRateNPerM, vs.MassKg * vs.CGToRearM / L},
		{"rear_damping_ns_per_m", vs.RearDampingNsPerM, vs.RearRateNPerM, vs.MassKg * vs.CGToFrontM / L},
	} {
		critical := 2 * math.Sqrt(ax.k*ax.m)
		r := plausibleRange{axleDampingRatioLow * critical, axleDampingRatioHigh * critical, "N s/m",
			fmt.Sprintf("any car's damping for this axle's rate and load: it gives a damping ratio c/(2 sqrt(k m_axle)) "+
				"of %.3g, where car bodies have about 0.2-0.4", ax.c/critical),
			[]unitSlip{{1000, "%[1]g kN s/m, or %[1]g N s/mm"}}}
		if msg := r.implausible(ax.c); msg != "" {
			v.fail("vehicle."+ax.key, "vehicle."+ax.key, "%s", msg)
		}
	}
}
