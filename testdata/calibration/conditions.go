package main

import (
	"fmt"
	"path"
	"strings"
)

// Routes of the sweep (identify's test names).
const (
	routeRig  = "rig"
	routeDrop = "drop"
)

// condition is one set of test conditions, applied to every car and seed.
type condition struct {
	name  string
	route string
	// durationS and rateHz are the log's length and sample rate.
	durationS, rateHz float64
	// decimals is how many decimals the time column is written with (0:
	// full precision, exact stamps).
	decimals int
	noise    float64 // noise sd / channel RMS (rig) or peak (drop)
	// rearDelayS: drop only, the rear axle lands this long after the front
	// (rolled off the blocks); 0 drops both at once.
	rearDelayS float64
	// endPair keeps only the front-most and rear-most sensors (hour-long
	// logs, to keep the sweep's run time sane).
	endPair bool
}

// long reports whether c is an hour-long rig log (judged within 3 sd).
func (c condition) long() bool { return c.durationS >= 3600 }

// fiveMinute reports whether c is a 5-minute rig log (judged on its worst
// errors).
func (c condition) fiveMinute() bool { return c.route == routeRig && c.durationS == 300 }

// conditionsFor returns the sweep's conditions, hour-long rig logs at
// longRateHz. 5-minute rig logs run at 256 Hz, a common acquisition rate
// whose step 1/256 s has no exact 4- or 5-decimal form.
func conditionsFor(longRateHz float64) []condition {
	var cs []condition
	for _, noise := range []float64{0.02, 0.05} {
		pct := int(noise*100 + 0.5)
		for _, dec := range []int{0, 5, 4} {
			cs = append(cs, condition{name: fmt.Sprintf("rig-5min-%s-%dpct", stampName(dec), pct), route: routeRig,
				durationS: 300, rateHz: 256, decimals: dec, noise: noise})
		}
	}
	for _, noise := range []float64{0.02, 0.05} {
		pct := int(noise*100 + 0.5)
		for _, dec := range []int{0, 5} {
			cs = append(cs, condition{name: fmt.Sprintf("rig-1h-%s-%dpct", stampName(dec), pct), route: routeRig,
				durationS: 3600, rateHz: longRateHz, decimals: dec, noise: noise, endPair: true})
		}
	}
	for _, noise := range []float64{0.02, 0.05} {
		pct := int(noise*100 + 0.5)
		cs = append(cs,
			condition{name: fmt.Sprintf("drop-both-%dpct", pct), route: routeDrop, durationS: 12, rateHz: 200, noise: noise},
			condition{name: fmt.Sprintf("drop-rolled-%dpct", pct), route: routeDrop, durationS: 12, rateHz: 200, noise: noise,
				rearDelayS: 0.3})
	}
	return cs
}

func stampName(decimals int) string {
	if decimals == 0 {
		return "exact"
	}
	return fmt.Sprintf("%ddec", decimals)
}

// describe says in a few words what c is, for the table.
func (c condition) describe() string {
	var parts []string
	switch {
	case c.route == routeDrop && c.rearDelayS > 0:
		parts = append(parts, fmt.Sprintf("drop rolled off (rear %g s later)", c.rearDelayS))
	case c.route == routeDrop:
		parts = append(parts, "drop, both axles at once")
	case c.long():
		parts = append(parts, "rig, 1 h, 2 sensors")
	default:
		parts = append(parts, "rig, 5 min")
	}
	parts = append(parts, fmt.Sprintf("%g s at %g Hz", c.durationS, c.rateHz))
	if c.decimals > 0 {
		parts = append(parts, fmt.Sprintf("time with %d decimals", c.decimals))
	}
	parts = append(parts, fmt.Sprintf("%g %% noise", 100*c.noise))
	return strings.Join(parts, ", ")
}

// selectNames keeps, in their order, the items whose name matches one of
// the comma-separated shell patterns of sel (path.Match); an empty sel
// keeps all. A pattern that matches nothing is an error naming the choices.
func selectNames[T any](sel string, items []T, name func(T) string) ([]T, error) {
	if sel == "" {
		return items, nil
	}
	pats := strings.Split(sel, ",")
	used := make([]bool, len(pats))
	var out []T
	for _, it := range items {
		keep := false
		for i, pat := range pats {
			ok, err := path.Match(strings.TrimSpace(pat), name(it))
			if err != nil {
				return nil, fmt.Errorf("bad pattern %q: %w", pat, err)
			}
			used[i] = used[i] || ok
			keep = keep || ok
		}
		if keep {
			out = append(out, it)
		}
	}
	for i, pat := range pats {
		if !used[i] {
			var names []string
			for _, it := range items {
				names = append(names, name(it))
			}
			return nil, fmt.Errorf("%q matches none of: %s", pat, strings.Join(names, ", "))
		}
	}
	return out, nil
}
