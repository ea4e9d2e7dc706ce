package compare

import (
	"fmt"
	"math"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Check statuses. Target checks end pass, fail or inconclusive (decide);
// guidance checks pass or warn and never enter the verdict.
const (
	StatusPass         = "pass"
	StatusWarn         = "warn"
	StatusFail         = "fail"
	StatusInconclusive = "inconclusive"
	// StatusNone is the verdict when the setup sets no targets.
	StatusNone = "none"
)

// coverageFactor is k of the expanded uncertainty U = k sigma that the
// decision rule uses: k = 2, about 95 % coverage for a normal distribution
// (JCGM 100:2008, 6.3 [memory]; common practice).
const coverageFactor = 2

// Quantity is the numeric part of a target check: the judged value, its
// standard uncertainty and the tolerance limits, all in Unit (SI; "1" for a
// dimensionless value, the SI Brochure's unit one). Sigma is null when no
// uncertainty is known for the value; Low or High is null for a one-sided
// tolerance.
type Quantity struct {
	Value float64  `json:"value"`
	Unit  string   `json:"unit"`
	Sigma *float64 `json:"sigma"`
	Low   *float64 `json:"low"`
	High  *float64 `json:"high"`
}

// Verdict is the result's overall answer to the setup's targets: pass, fail,
// inconclusive, or none when there are no targets; the summary is one
// sentence that names the checks that decided it.
type Verdict struct {
	Status  string `json:"status"`
	Summary string `json:"summary"`
}

// decide is the decision rule of the target checks for a value with standard
// uncertainty sigma against the tolerance limits low and high (NaN: no limit
// on that side). With the expanded uncertainty U = 2 sigma it returns
//
//	pass          when [value - U, value + U] lies inside [low, high] (limits included),
//	fail          when it lies wholly outside (value + U < low or value - U > high),
//	inconclusive  otherwise: the interval reaches across a limit or touches it from outside.
//
// A sigma that is not known (NaN, negative or infinite) gives inconclusive:
// without an uncertainty no conformity can be stated with any confidence. A
// sigma of 0 is for exact values only (the callers never pass 0 for a
// measured value). With U = 2 sigma and a normal distribution of the value,
// a pass leaves at most about 2.3 % probability that the true value lies
// beyond the nearer limit, and a fail as much that it lies within.
//
// References: JCGM 106:2012, Evaluation of measurement data - The role of
// measurement uncertainty in conformity assessment, BIPM, 2012: clause 8 on
// acceptance intervals, guarded acceptance with the guard band w = U, U = 2u
// (k = 2), and guarded rejection with the acceptance limits moved out by U
// [memory: clause numbers]. Acceptance and rejection are both guarded here,
// which leaves a zone of width 2U about each limit where the result is
// inconclusive.
func decide(value, sigma, low, high float64) string {
	if math.IsNaN(value) || math.IsInf(value, 0) || !(sigma >= 0) || math.IsInf(sigma, 0) {
		return StatusInconclusive
	}
	u := coverageFactor * sigma
	lo, hi := value-u, value+u
	switch {
	case hi < low || lo > high: // comparisons with a NaN (absent) limit are false
		return StatusFail
	case (math.IsNaN(low) || lo >= low) && (math.IsNaN(high) || hi <= high):
		return StatusPass
	}
	return StatusInconclusive
}

// unitShown is how a quantity appears in details and the verdict: its value
// times scale in the display unit, with a printf verb.
type unitShown struct {
	scale  float64
	unit   string // display unit, "" for a pure number
	format string
	json   string // the SI unit of the JSON fields
}

var (
	shownHz      = unitShown{1, "Hz", "%.3f", "Hz"}
	shownRatio   = unitShown{1, "", "%.3f", "1"}
	shownRate    = unitShown{1e-3, "kN/m", "%.1f", "N/m"}
	shownDamping = unitShown{1, "N s/m", "%.0f", "N s/m"}
)

func (s unitShown) num(x float64) string { return fmt.Sprintf(s.format, x*s.scale) }

// withUnit writes x in the display unit, e.g. "45.1 kN/m".
func (s unitShown) withUnit(x float64) string { return s.num(x) + s.suffix() }

// suffix is the display unit with its leading space, "" for a pure number.
func (s unitShown) suffix() string {
	if s.unit == "" {
		return ""
	}
	return " " + s.unit
}

// judged is what a numeric target check is built from.
type judged struct {
	name  string // check name, "target.<what>"
	value float64
	sigma float64 // NaN when unknown
	// sigmaWhy says why sigma is unknown.
	sigmaWhy  string
	low, high float64 // NaN when absent
	shown     unitShown
	// against states the value relative to its reference and the tolerance
	// in words, e.g. "+9.9 % against design, tolerance ±8 %".
	against string
	// flagged names the flagged modes the check uses, with their reasons
	// ("" when none is flagged).
	flagged string
	detail  string // the check's own detail (values and reference)
}

// check decides j and writes its status, the contract's numeric fields, a
// detail that says how it was decided, and the phrase for the verdict.
func (j judged) check() Check {
	status := decide(j.value, j.sigma, j.low, j.high)
	q := &Quantity{Value: j.value, Unit: j.shown.json, Low: Finite(j.low), High: Finite(j.high)}
	if !math.IsNaN(j.sigma) {
		q.Sigma = &j.sigma
	}
	var words, why string
	if math.IsNaN(j.sigma) {
		words = fmt.Sprintf("%s %s (uncertainty unknown)", plainName(j.name), j.shown.withUnit(j.value))
	} else {
		words = fmt.Sprintf("%s %s ± %s (k = 2)", plainName(j.name), j.shown.num(j.value),
			j.shown.withUnit(coverageFactor*j.sigma))
	}
	if j.against != "" {
		words += ", " + j.against
	}
	detail := j.detail
	switch {
	case math.IsNaN(j.sigma):
		why = "no uncertainty is known: " + j.sigmaWhy
		detail += "; " + why
	default:
		u := coverageFactor * j.sigma
		detail += fmt.Sprintf("; value ± 2 sigma is [%s, %s]%s, limits [%s, %s]%s", j.shown.num(j.value-u),
			j.shown.num(j.value+u), j.shown.suffix(), limitWords(j.low, j.shown, "-inf"),
			limitWords(j.high, j.shown, "+inf"), j.shown.suffix())
		switch status {
		case StatusPass:
			detail += ": inside"
		case StatusFail:
			detail += ": wholly outside"
		default:
			why = "value ± 2 sigma reaches a limit"
			detail += ": across a limit"
		}
	}
	if j.flagged != "" {
		status, why = StatusInconclusive, j.flagged
		detail += "; " + j.flagged + ", so the check cannot be trusted"
	}
	detail += ": " + status + " (decision rule of JCGM 106:2012, U = 2 sigma)"
	return Check{Name: j.name, Status: status, Detail: detail, Quantity: q, summary: phrase(words, status, why)}
}

// limitWords writes a tolerance limit, or open for an absent one.
func limitWords(x float64, s unitShown, open string) string {
	if math.IsNaN(x) {
		return open
	}
	return s.num(x)
}

// phrase is a check's item in the verdict summary: "what: status", with the
// reason when inconclusive.
func phrase(words, status, why string) string {
	p := words + ": " + status
	if status == StatusInconclusive && why != "" {
		p += " (" + why + ")"
	}
	return p
}

// plainName turns a check name such as "target.rear_ride_rate" into words,
// "rear ride rate".
func plainName(name string) string {
	return strings.ReplaceAll(strings.TrimPrefix(name, "target."), "_", " ")
}

// flagWords says which of the modes (ordered like labels) are flagged, with
// their reasons; "" when none is.
func flagWords(modes ...MeasuredMode) string {
	var parts []string
	for _, m := range modes {
		if !m.Flagged {
			continue
		}
		s := "the " + m.Label + " mode is flagged"
		if len(m.FlagReasons) > 0 {
			s += " (" + strings.Join(m.FlagReasons, " ") + ")"
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, " and ")
}

// maxNamed is how many deciding checks the verdict summary names before it
// counts the rest.
const maxNamed = 3

// verdictOf returns the verdict of the target checks (guidance checks must
// not be passed in): none without any, fail when one fails, else
// inconclusive when one is, else pass.
func verdictOf(targets []Check) Verdict {
	if len(targets) == 0 {
		return Verdict{Status: StatusNone, Summary: "No [targets] in the setup, so nothing was judged."}
	}
	var failed, open []string
	var names []string
	for _, c := range targets {
		names = append(names, plainName(c.Name))
		switch c.Status {
		case StatusFail:
			failed = append(failed, c.summary)
		case StatusInconclusive:
			open = append(open, c.summary)
		}
	}
	switch {
	case len(failed) > 0:
		return Verdict{Status: StatusFail, Summary: capitalise(listed(failed)) + "."}
	case len(open) > 0:
		return Verdict{Status: StatusInconclusive, Summary: "Nothing failed, but " + listed(open) + "."}
	}
	return Verdict{Status: StatusPass, Summary: fmt.Sprintf("All %d target checks pass, each value with its "+
		"expanded uncertainty (k = 2) inside its tolerance: %s.", len(targets), strings.Join(names, ", "))}
}

// listed joins up to maxNamed phrases and counts the rest.
func listed(ps []string) string {
	if len(ps) <= maxNamed {
		return strings.Join(ps, "; ")
	}
	return fmt.Sprintf("%s; and %d more", strings.Join(ps[:maxNamed], "; "), len(ps)-maxNamed)
}

func capitalise(s string) string {
	r, n := utf8.DecodeRuneInString(s)
	return string(unicode.ToUpper(r)) + s[n:]
}
