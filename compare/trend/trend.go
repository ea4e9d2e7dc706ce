// Package trend follows a campaign's runs over time: each run's modal
// frequencies, damping ratios and back-calculated ride rates with their
// uncertainties and design values, an individuals and moving-range control
// chart per quantity with limits from the campaign's own scatter (package
// control), the runs that moved more than that scatter and their own
// uncertainty explain, named in a sentence, and the campaign's worst
// verdict. It also writes the history table (CSV, JSON, terminal).
//
// # Drift rule
//
// A run is named when its value lies beyond the individuals chart's limits
// (mean ± 2.66 mean moving range) by more than its own expanded uncertainty
// (2 sd), or when its step from the run before exceeds the moving-range
// chart's upper limit (3.267 mean moving range) by more than the step's
// expanded uncertainty (2 sd of the two runs combined in quadrature). A
// value beyond a limit that its own uncertainty reaches back across is
// drawn outside the limits but not named: a control chart alone would name
// it, this rule asks that the move also be larger than the measurement can
// explain.
//
// Units are those of the result: Hz, N/m, damping ratios as fractions of
// critical; an uncertainty "sd" is one standard deviation, a bar in a
// figure is ± 2 sd.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// compare layer. It imports compare, compare/store (the runs) and
// compare/control, never plots or cmd.
package trend

import (
	"fmt"
	"math"
	"strings"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/control"
	"github.com/ridemodes/ridemodes/compare/store"
)

// MinChartRuns is the fewest values of a quantity that get a control
// chart: with two, both values lie inside any limits drawn from their one
// moving range.
const MinChartRuns = 3

// RoughChartRuns is the number of runs below which control limits are
// called rough: common practice sets trial limits from 20 to 25 samples
// (Montgomery 2012, ch. 6; from memory).
const RoughChartRuns = 20

// Quantity is one value followed over the runs.
type Quantity struct {
	// Stem and Unit build the column names: Stem+Unit for the value,
	// Stem+"_sd"+Unit for its standard deviation, Stem+"_design"+Unit for
	// the design value (Unit is "_hz", "_n_per_m" or "" for a ratio).
	Stem, Unit string
	// Name is the quantity in words; Symbol its unit as printed ("Hz",
	// "N/m", "" for a ratio); Decimals how many to print.
	Name, Symbol string
	Decimals     int
	// mode is the label of the mode it belongs to; rate picks front or
	// rear ride rate when mode is empty.
	mode  string
	ratio bool // damping ratio rather than frequency
	front bool
}

// Key is the quantity's column name, e.g. "pitch_natural_frequency_hz".
func (q Quantity) Key() string { return q.Stem + q.Unit }

// Quantities are the values followed, in the order of the report.
var Quantities = []Quantity{
	{Stem: "bounce_natural_frequency", Unit: "_hz", Name: "bounce frequency", Symbol: "Hz", Decimals: 3, mode: "bounce"},
	{Stem: "pitch_natural_frequency", Unit: "_hz", Name: "pitch frequency", Symbol: "Hz", Decimals: 3, mode: "pitch"},
	{Stem: "bounce_damping_ratio", Name: "bounce damping ratio", Decimals: 3, mode: "bounce", ratio: true},
	{Stem: "pitch_damping_ratio", Name: "pitch damping ratio", Decimals: 3, mode: "pitch", ratio: true},
	{Stem: "front_rate", Unit: "_n_per_m", Name: "front ride rate", Symbol: "N/m", Decimals: 0, front: true},
	{Stem: "rear_rate", Unit: "_n_per_m", Name: "rear ride rate", Symbol: "N/m", Decimals: 0},
}

// Value is one run's value of a quantity. SD and Design are NaN when the
// result has none.
type Value struct {
	Value, SD, Design float64
	// Flagged is true when the mode behind it is flagged (the data cannot
	// support it).
	Flagged bool
}

// valueOf returns q's value in res, and false when res has none.
func (q Quantity) valueOf(res *compare.Result) (Value, bool) {
	if res == nil {
		return Value{}, false
	}
	if q.mode == "" {
		u := res.Updated
		if u == nil {
			return Value{}, false
		}
		v := Value{Value: u.RearRateNPerM, SD: math.NaN(), Design: math.NaN()}
		if q.front {
			v.Value = u.FrontRateNPerM
		}
		if s := u.Uncertainty; s != nil {
			v.SD = s.RearRateNPerM
			if q.front {
				v.SD = s.FrontRateNPerM
			}
		}
		if m := res.Model; m != nil {
			v.Design = positive(m.Rates.RearRateNPerM)
			if q.front {
				v.Design = positive(m.Rates.FrontRateNPerM)
			}
		}
		return v, true
	}
	for _, m := range res.Modes {
		if m.Label != q.mode {
			continue
		}
		v := Value{Value: m.NaturalFrequencyHz, SD: math.NaN(), Design: math.NaN(), Flagged: m.Flagged}
		if q.ratio {
			v.Value = m.DampingRatio
		}
		if u := m.Uncertainty; u != nil {
			v.SD = u.NaturalFrequencyHz
			if q.ratio {
				v.SD = u.DampingRatio
			}
		}
		if res.Model != nil {
			for _, d := range res.Model.Modes {
				if d.Label == q.mode {
					v.Design = d.NaturalFrequencyHz
					if q.ratio {
						v.Design = d.DampingRatio
					}
				}
			}
		}
		return v, true
	}
	return Value{}, false
}

// positive is x, or NaN when x is not above 0 (a design rate a result
// written before the model part carried its rates leaves at 0).
func positive(x float64) float64 {
	if x > 0 {
		return x
	}
	return math.NaN()
}

// Series is one quantity over the runs that have it.
type Series struct {
	Quantity Quantity
	// Runs are the indices (into Campaign.Runs) of the runs that have a
	// value, in time order; Values are their values.
	Runs   []int
	Values []Value
	// Chart is the control chart of the values; nil with fewer than
	// MinChartRuns.
	Chart *control.Chart
}

// Finding is a run that moved more than the campaign's scatter and its own
// uncertainty explain (see the drift rule in the package doc).
type Finding struct {
	// Run is the index of the run in Campaign.Runs; Quantity what moved.
	Run      int
	Quantity Quantity
	// Kind is "above" or "below" (the value lies beyond the individuals
	// chart's limit) or "jump" (the step from the run before lies above
	// the moving-range chart's limit); Value is the value or the step, and
	// Limit the limit it crossed.
	Kind         string
	Value, Limit float64
	// Sentence says it in words, naming the run.
	Sentence string
}

// Campaign is the trend view of a car's (or a whole store's) runs.
type Campaign struct {
	// Car is the car asked for; empty for every car of the store.
	Car  string
	Runs []store.Run
	// Labels name the runs in sentences (RunLabel), in the order of Runs.
	Labels []string
	// Series has one entry per quantity that some run has.
	Series   []Series
	Findings []Finding
	// Verdict is the worst verdict of the runs: fail, else inconclusive
	// (also when a log could not be analysed), else pass, else none; Summary
	// says it in one sentence.
	Verdict, Summary string
	// Notes say what limits the drift check (too few runs).
	Notes []string
}

// Build makes the trend view of runs (in time order, as store.Runs gives
// them).
func Build(car string, runs []store.Run) *Campaign {
	c := &Campaign{Car: car, Runs: runs}
	cars := map[string]bool{}
	for _, r := range runs {
		cars[r.Car] = true
	}
	for _, r := range runs {
		c.Labels = append(c.Labels, RunLabel(r, len(cars) > 1))
	}
	c.Verdict, c.Summary = worstVerdict(runs, c.Labels)
	for _, q := range Quantities {
		s := Series{Quantity: q}
		for i, r := range runs {
			if v, ok := q.valueOf(r.Result); ok {
				s.Runs = append(s.Runs, i)
				s.Values = append(s.Values, v)
			}
		}
		if len(s.Runs) == 0 {
			continue
		}
		if len(s.Runs) < MinChartRuns {
			c.Notes = append(c.Notes, fmt.Sprintf("%s: %d run(s), too few for control limits (at least %d).", q.Name, len(s.Runs), MinChartRuns))
		} else {
			x := make([]float64, len(s.Values))
			for i, v := range s.Values {
				x[i] = v.Value
			}
			if ch, err := control.Individuals(x); err == nil {
				s.Chart = &ch
				c.Findings = append(c.Findings, findings(c.Labels, s)...)
			} else {
				c.Notes = append(c.Notes, fmt.Sprintf("%s: no control chart: %v.", q.Name, err))
			}
		}
		c.Series = append(c.Series, s)
	}
	if n := len(runs); n >= MinChartRuns && n < RoughChartRuns {
		c.Notes = append(c.Notes, fmt.Sprintf("The control limits come from %d runs; common practice sets them from %d or more, so treat them as rough.", n, RoughChartRuns))
	}
	return c
}

// findings names the runs of s that moved more than the campaign's scatter
// and their own uncertainty explain: a value beyond the individuals chart's
// limits by more than its 2-sd uncertainty, or a step from the run before
// beyond the moving-range chart's limit by more than the step's 2-sd
// uncertainty (the two runs' sds combined in quadrature). Without a known
// sd the limit alone decides.
func findings(labels []string, s Series) []Finding {
	q, ch := s.Quantity, s.Chart
	var out []Finding
	for k, v := range s.Values {
		i := s.Runs[k]
		if k > 0 && ch.JumpOut(k-1) {
			prev := s.Values[k-1]
			u2 := 2 * math.Hypot(prev.SD, v.SD)
			if math.IsNaN(u2) || ch.MR[k-1]-ch.UpperMR > u2 {
				out = append(out, Finding{Run: i, Quantity: q, Kind: "jump", Value: ch.MR[k-1], Limit: ch.UpperMR,
					Sentence: fmt.Sprintf("%s -> %s: %s moved %s%s, beyond the moving-range limit %s",
						labels[s.Runs[k-1]], labels[i], q.Name, q.Format(ch.MR[k-1]), q.withU(u2), q.Format(ch.UpperMR))})
			}
		}
		side := ch.Side(v.Value)
		if side == 0 {
			continue
		}
		f := Finding{Run: i, Quantity: q, Kind: "above", Value: v.Value, Limit: ch.Upper}
		word := "upper"
		if side < 0 {
			f.Kind, f.Limit, word = "below", ch.Lower, "lower"
		}
		if !math.IsNaN(v.SD) && math.Abs(v.Value-f.Limit) <= 2*v.SD {
			continue // its own uncertainty reaches back inside the limits
		}
		f.Sentence = fmt.Sprintf("%s: %s %s%s beyond the %s control limit %s", labels[i], q.Name, q.Format(v.Value), q.withU(2*v.SD), word, q.Format(f.Limit))
		if v.Flagged {
			f.Sentence += "; the mode is flagged: the data cannot support it"
		}
		out = append(out, f)
	}
	return out
}

// withU is " (± u, 2 sd)" for a known expanded uncertainty u, else "".
func (q Quantity) withU(u float64) string {
	if math.IsNaN(u) || u <= 0 {
		return ""
	}
	return fmt.Sprintf(" (± %s, 2 sd)", q.Format(u))
}

// Format prints x with the quantity's decimals and unit.
func (q Quantity) Format(x float64) string {
	s := fmt.Sprintf("%.*f", q.Decimals, x)
	if q.Symbol != "" {
		s += " " + q.Symbol
	}
	return s
}

// RunLabel names a run in a sentence: "run 7", with its notes in
// parentheses when it has some ("run 7 (after spring change)"), and its car
// first when withCar is true (a campaign of several cars).
func RunLabel(r store.Run, withCar bool) string {
	name := r.Run
	if name == "" {
		name = r.RunKey[:min(12, len(r.RunKey))]
	}
	if !strings.HasPrefix(strings.ToLower(name), "run") {
		name = "run " + name
	}
	if withCar && r.Car != "" {
		name = r.Car + " " + name
	}
	if n := r.Meta["notes"]; n != "" {
		name += " (" + n + ")"
	}
	return name
}

// worstVerdict is the campaign's verdict and its sentence.
func worstVerdict(runs []store.Run, labels []string) (verdict, summary string) {
	by := map[string][]string{}
	for i, r := range runs {
		by[r.Verdict] = append(by[r.Verdict], labels[i])
	}
	list := func(v string) string {
		names := by[v]
		if len(names) > 4 {
			return strings.Join(names[:4], ", ") + fmt.Sprintf(" and %d more", len(names)-4)
		}
		return strings.Join(names, ", ")
	}
	n := len(runs)
	var errs string
	if e := len(by[store.VerdictError]); e > 0 {
		errs = fmt.Sprintf(" %d of %d logs could not be analysed (%s).", e, n, list(store.VerdictError))
	}
	switch {
	case n == 0:
		return compare.StatusNone, "No runs recorded."
	case len(by[compare.StatusFail]) > 0:
		return compare.StatusFail, fmt.Sprintf("Fail: %d of %d runs failed a target (%s).", len(by[compare.StatusFail]), n, list(compare.StatusFail)) + errs
	case len(by[compare.StatusInconclusive]) > 0:
		return compare.StatusInconclusive, fmt.Sprintf("Inconclusive: no run failed a target, but %d of %d could not be decided (%s).", len(by[compare.StatusInconclusive]), n, list(compare.StatusInconclusive)) + errs
	case errs != "":
		return compare.StatusInconclusive, "Inconclusive: no run failed a target, but not every log was analysed." + errs
	case len(by[compare.StatusPass]) == n:
		return compare.StatusPass, fmt.Sprintf("Pass: all %d runs passed their targets.", n)
	case len(by[compare.StatusPass]) > 0:
		return compare.StatusPass, fmt.Sprintf("Pass: %d of %d runs passed their targets; the others have none.", len(by[compare.StatusPass]), n)
	}
	return compare.StatusNone, fmt.Sprintf("None: the %d runs have no targets to judge.", n)
}
