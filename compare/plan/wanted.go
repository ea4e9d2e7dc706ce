package plan

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// Wanted holds the wanted one-sd uncertainties; NaN where none is wanted
// (null in JSON).
type Wanted struct {
	// FrequencySDPct: each mode's natural frequency, in % of the value.
	FrequencySDPct float64
	// DampingSD: each mode's damping ratio, absolute.
	DampingSD float64
	// NodeSDM: each mode's node, in m, for modes whose node lies within
	// nodeReachWheelbases wheelbases of the CG.
	NodeSDM float64
	// RateSDPct: the back-calculated front and rear ride rates, in % of the
	// value.
	RateSDPct float64
}

// MarshalJSON writes w with the flags' names in snake case, null where
// nothing is wanted.
func (w Wanted) MarshalJSON() ([]byte, error) {
	return json.Marshal(struct {
		FrequencySDPct *float64 `json:"frequency_sd_pct"`
		DampingSD      *float64 `json:"damping_sd"`
		NodeSDM        *float64 `json:"node_sd_m"`
		RateSDPct      *float64 `json:"rate_sd_pct"`
	}{compare.Finite(w.FrequencySDPct), compare.Finite(w.DampingSD), compare.Finite(w.NodeSDM), compare.Finite(w.RateSDPct)})
}

// toleranceRatio is the test uncertainty ratio the wanted sd takes from a
// tolerance: the expanded uncertainty U = 2 sd at most a quarter of the
// tolerance, sd = tolerance/8 [common practice in calibration, a 4:1
// ratio; from memory]. With it the JCGM 106 decision is conclusive unless
// the value lies within a quarter of the tolerance of a limit.
const toleranceRatio = 8

// WantedFrom returns the wanted sd: the values given in flags (zero or
// NaN: not given), the others from the setup's [targets] tolerances
// divided by toleranceRatio (the frequency from the tighter of the bounce
// and pitch tolerances, the damping from damping_ratio_tolerance, the
// rates from ride_rate_tolerance_pct; a node has no tolerance), NaN where
// nothing is wanted. It says where each came from, and fails when nothing
// is wanted or a flag is negative or infinite.
func WantedFrom(t ingest.Targets, flags Wanted) (Wanted, []string, error) {
	w := flags
	var from []string
	for _, f := range []struct {
		v    *float64
		name string
	}{{&w.FrequencySDPct, "--frequency-sd-pct"}, {&w.DampingSD, "--damping-sd"},
		{&w.NodeSDM, "--node-sd-m"}, {&w.RateSDPct, "--rate-sd-pct"}} {
		switch {
		case *f.v == 0 || math.IsNaN(*f.v):
			*f.v = math.NaN()
		case *f.v < 0 || math.IsInf(*f.v, 0):
			return w, nil, fmt.Errorf("%s must be a positive number (got %g)", f.name, *f.v)
		default:
			from = append(from, fmt.Sprintf("%s %g", f.name, *f.v))
		}
	}
	fromTol := func(dst *float64, tol float64, key string) {
		if math.IsNaN(*dst) && !math.IsNaN(tol) {
			*dst = tol / toleranceRatio
			from = append(from, fmt.Sprintf("[targets] %s %g / %d", key, tol, toleranceRatio))
		}
	}
	freqTol, freqKey := t.BounceFrequencyTolerancePct, "bounce_frequency_tolerance_pct"
	if math.IsNaN(freqTol) || t.PitchFrequencyTolerancePct < freqTol {
		freqTol, freqKey = t.PitchFrequencyTolerancePct, "pitch_frequency_tolerance_pct"
	}
	fromTol(&w.FrequencySDPct, freqTol, freqKey)
	fromTol(&w.DampingSD, t.DampingRatioTolerance, "damping_ratio_tolerance")
	fromTol(&w.RateSDPct, t.RideRateTolerancePct, "ride_rate_tolerance_pct")
	if from == nil {
		from = []string{}
	}
	if math.IsNaN(w.FrequencySDPct) && math.IsNaN(w.DampingSD) && math.IsNaN(w.NodeSDM) && math.IsNaN(w.RateSDPct) {
		return w, nil, errors.New("no uncertainty is wanted: give --frequency-sd-pct, --damping-sd, --node-sd-m or " +
			"--rate-sd-pct, or tolerances in the setup's [targets] table")
	}
	return w, from, nil
}

// nodeReachWheelbases bounds the nodes a node sd is wanted of: a node
// farther than this many wheelbases from the CG (a nearly pure bounce) is
// ill-conditioned, and its pitch per bounce, not its position, says what
// the shape is.
const nodeReachWheelbases = 2

// quantity is one reported value: a mode's natural frequency, damping
// ratio, pitch per bounce or node, or a back-calculated rate.
type quantity struct {
	key      string // "bounce.natural_frequency_hz", "updated.front_rate_n_per_m"
	name     string // "bounce natural frequency"
	value    float64
	sd       float64
	bias     float64 // of an asymptotic prediction: expected estimate minus truth
	unit     string
	relative bool // the wanted sd is in % of the value
}

// modeKeys are the reported values of each mode, in order.
var modeKeys = []struct{ key, name, unit string }{
	{"natural_frequency_hz", "natural frequency", "Hz"},
	{"damping_ratio", "damping ratio", "1"},
	{"pitch_per_bounce_rad_per_m", "pitch per bounce", "rad/m"},
	{"node_m", "node", "m"},
}

// quantitiesOf returns the values of a result (an analysis, or a
// prediction in the same form) that exist, modes in the result's order,
// then the front and rear rate. sd is NaN where the result states none.
func quantitiesOf(r *compare.Result) []quantity {
	var qs []quantity
	nan := math.NaN()
	opt := func(x *float64) float64 {
		if x == nil {
			return nan
		}
		return *x
	}
	for _, m := range r.Modes {
		u := m.Uncertainty
		if u == nil {
			u = &compare.Uncertainty{NaturalFrequencyHz: nan, DampingRatio: nan}
		}
		vals := []float64{m.NaturalFrequencyHz, m.DampingRatio, opt(m.PitchPerBounceRadPerM), opt(m.NodeM)}
		sds := []float64{u.NaturalFrequencyHz, u.DampingRatio, opt(u.PitchPerBounceRadPerM), opt(u.NodeM)}
		for i, k := range modeKeys {
			if math.IsNaN(vals[i]) {
				continue
			}
			qs = append(qs, quantity{key: m.Label + "." + k.key, name: m.Label + " " + k.name, value: vals[i], sd: sds[i],
				unit: k.unit, relative: i == 0})
		}
	}
	if u := r.Updated; u != nil {
		sd := compare.UpdatedUncertainty{FrontRateNPerM: nan, RearRateNPerM: nan}
		if u.Uncertainty != nil {
			sd = *u.Uncertainty
		}
		qs = append(qs,
			quantity{key: "updated.front_rate_n_per_m", name: "front ride rate", value: u.FrontRateNPerM, sd: sd.FrontRateNPerM, unit: "N/m", relative: true},
			quantity{key: "updated.rear_rate_n_per_m", name: "rear ride rate", value: u.RearRateNPerM, sd: sd.RearRateNPerM, unit: "N/m", relative: true})
		if u.DampingEstimated {
			qs = append(qs,
				quantity{key: "updated.front_damping_ns_per_m", name: "front damping", value: u.FrontDampingNsPerM, sd: opt(sd.FrontDampingNsPerM), unit: "N s/m", relative: true},
				quantity{key: "updated.rear_damping_ns_per_m", name: "rear damping", value: u.RearDampingNsPerM, sd: opt(sd.RearDampingNsPerM), unit: "N s/m", relative: true})
		}
	}
	return qs
}

// truthOf returns the true value of each quantity key of car v: its damped
// (or undamped) model's modes and its rates.
func truthOf(v compare.Vehicle) (map[string]float64, error) {
	modes, err := v.Modes()
	if err != nil {
		return nil, err
	}
	t := map[string]float64{
		"updated.front_rate_n_per_m":     v.FrontRateNPerM,
		"updated.rear_rate_n_per_m":      v.RearRateNPerM,
		"updated.front_damping_ns_per_m": v.FrontDampingNsPerM,
		"updated.rear_damping_ns_per_m":  v.RearDampingNsPerM,
	}
	for _, m := range modes {
		t[m.Label+".natural_frequency_hz"] = m.NaturalFrequencyHz
		t[m.Label+".damping_ratio"] = m.DampingRatio
		t[m.Label+".pitch_per_bounce_rad_per_m"] = m.PitchPerBounceRadPerM
		t[m.Label+".node_m"] = m.NodeM
	}
	return t, nil
}

// regular reports whether a quantity enters the realism factor: natural
// frequencies, damping ratios, pitch per bounce and rates. A node is a
// nonlinear function of the pitch per bounce, whose errors have long tails
// far from the CG; the axle damping comes from the damping ratios and
// frequencies together and adds nothing of its own.
func (q quantity) regular() bool {
	return !strings.HasSuffix(q.key, ".node_m") && !strings.HasSuffix(q.key, "_damping_ns_per_m")
}

// wantedSD returns the wanted sd of q in q's unit, or NaN when none is
// wanted of it. wheelbaseM bounds the nodes judged.
func (w Wanted) wantedSD(q quantity, wheelbaseM float64) float64 {
	k := q.key[strings.IndexByte(q.key, '.')+1:]
	switch k {
	case "natural_frequency_hz":
		return w.FrequencySDPct / 100 * math.Abs(q.value)
	case "damping_ratio":
		return w.DampingSD
	case "node_m":
		if math.Abs(q.value) > nodeReachWheelbases*wheelbaseM {
			return math.NaN()
		}
		return w.NodeSDM
	case "front_rate_n_per_m", "rear_rate_n_per_m":
		return w.RateSDPct / 100 * math.Abs(q.value)
	}
	return math.NaN()
}

// farNodes names the modes whose node (truth: true values by quantity
// key) lies too far from the CG for a node sd to be judged, when a node sd
// is wanted.
func (w Wanted) farNodes(truth map[string]float64, wheelbaseM float64) []string {
	if math.IsNaN(w.NodeSDM) {
		return nil
	}
	var out []string
	for _, label := range []string{"bounce", "pitch"} {
		if x := truth[label+".node_m"]; math.Abs(x) > nodeReachWheelbases*wheelbaseM {
			out = append(out, fmt.Sprintf("the %s node lies %+.2f m from the CG, beyond %d wheelbases: its sd is not "+
				"judged against --node-sd-m (a nearly pure bounce; its pitch per bounce says what the shape is)",
				label, x, nodeReachWheelbases))
		}
	}
	return out
}
