package plots

import (
	"cmp"
	"fmt"
	"html/template"
	"math"
	"regexp"
	"slices"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/ridemodes/ridemodes/compare"
)

// reportView is what the report template renders, every number already
// formatted: the verdict first, then one table per question (modes, rates,
// checks), the run's facts, the figures, the method and the cautions.
type reportView struct {
	Title, Subtitle string
	Verdict         verdictView
	Modes           []modeRow
	FlagNotes       []string
	Rates           []rateRow
	RateNotes       []string
	Targets         []judgement
	Guidance        []guidanceRow
	Facts           []fact
	Notes           []string
	Warnings        []string
	Method          []string
	Quick           []quickRow
	QuickNotes      []string
	Figures         []figureView
	Cautions        string
}

// verdictView is the verdict box at the top of a report: the status in a
// word, a headline sentence and the deviations that decided it.
type verdictView struct {
	Status, Word, Class, Headline string
	Items                         []string
	ItemsHeading                  string
}

// modeRow is one mode: measured beside the model, with the difference and
// the MAC.
type modeRow struct {
	Label, Flag                               string
	MeasuredHz, ModelHz, DiffPct              string
	MeasuredZeta, ModelZeta, DiffZeta         string
	MeasuredNode, ModelNode, MAC, ShapeSource string
}

// rateRow is one back-calculated quantity beside its design value, with
// the tolerance and status of its target check.
type rateRow struct {
	Name, Unit, Design, Measured, Diff, Tolerance, Word, Class string
}

// judgement is one target check as the report shows it.
type judgement struct {
	Title, Value, Limits, Word, Class, Why string
	// Phrase is the check in one line, for the verdict box.
	Phrase string
	// excess is |value - reference| over the half-width of the tolerance
	// (> 1 outside it), for ranking; 0 when unknown.
	excess float64
	status string
}

// guidanceRow is one item of the ride guidance.
type guidanceRow struct{ Title, Detail, Word, Class string }

// fact is one line of the run's facts; Code marks a hash.
type fact struct {
	Name, Value string
	Code        bool
}

// quickRow is one single-mode first-look estimate.
type quickRow struct{ Source, FreqHz, Damping string }

// figureView is one figure of a page: its SVG inline, its PNG filed beside.
type figureView struct {
	Number               int
	Title, Caption, File string
	SVG                  template.HTML
}

// noValue stands where a value does not exist (a missing model mode, a node
// of a pure bounce shape).
const noValue = "—"

// num formats x with prec decimals; NaN and infinities give noValue.
func num(x float64, prec int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return noValue
	}
	return fmt.Sprintf("%.*f", prec, x)
}

// optNum is num for an optional value.
func optNum(x *float64, prec int) string {
	if x == nil {
		return noValue
	}
	return num(*x, prec)
}

// withSigma formats x ± sigma (1 standard deviation) when sigma is known.
func withSigma(x float64, sigma *float64, prec int) string {
	if sigma == nil || *sigma == 0 {
		return num(x, prec)
	}
	return num(x, prec) + " ± " + num(*sigma, prec)
}

// withOptSigma is withSigma for an optional value.
func withOptSigma(x, sigma *float64, prec int) string {
	if x == nil {
		return noValue
	}
	return withSigma(*x, sigma, prec)
}

// signed formats x with an explicit sign.
func signed(x float64, prec int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return noValue
	}
	return fmt.Sprintf("%+.*f", prec, x)
}

// shown is how the report writes a quantity of a check's SI unit: scaled
// into a display unit with a number of decimals.
type shown struct {
	scale    float64
	unit     string
	decimals int
}

// shownOf returns the display of the SI unit of a check's quantity.
func shownOf(unit string) shown {
	switch unit {
	case "N/m":
		return shown{1e-3, "kN/m", 2}
	case "N s/m":
		return shown{1, "N s/m", 0}
	case "Hz":
		return shown{1, "Hz", 3}
	}
	return shown{1, "", 3}
}

func (s shown) num(x float64) string { return num(x*s.scale, s.decimals) }

func (s shown) withUnit(x float64) string {
	if s.unit == "" {
		return s.num(x)
	}
	return s.num(x) + " " + s.unit
}

// checkTitle turns a check id ("target.rear_ride_rate",
// "guidance.measured.bounce_pitch_frequency_ratio") into its name for a
// reader ("Rear ride rate"); the ids stay in the JSON.
func checkTitle(id string) string {
	words := strings.ReplaceAll(id[strings.LastIndex(id, ".")+1:], "_", " ")
	words = strings.Replace(words, "mode shape", "mode shape (MAC)", 1)
	r, n := utf8.DecodeRuneInString(words)
	return string(unicode.ToUpper(r)) + words[n:]
}

// isTarget reports whether a check judges a [targets] tolerance (the
// others are guidance).
func isTarget(c compare.Check) bool { return strings.HasPrefix(c.Name, "target.") }

// judge formats a target check: its value with the expanded uncertainty
// (2 sd, as the decision rule of JCGM 106:2012 uses it), its limits, the
// difference from its reference (the design for rates and damping, the
// model for modes) against the tolerance, and why it is inconclusive.
func judge(c compare.Check) judgement {
	j := judgement{Title: checkTitle(c.Name), status: c.Status, Value: noValue, Limits: noValue}
	j.Word, j.Class = verdictStyle(c.Status)
	q := c.Quantity
	if q == nil {
		j.Why = strings.TrimSuffix(c.Detail, ": "+c.Status)
		j.Phrase = j.Title + ": " + c.Status + " (" + j.Why + ")"
		return j
	}
	d := shownOf(q.Unit)
	j.Value = d.withUnit(q.Value)
	if q.Sigma != nil {
		j.Value = d.num(q.Value) + " ± " + d.withUnit(2**q.Sigma)
	}
	var against string
	switch {
	case q.Low != nil && q.High != nil:
		j.Limits = d.num(*q.Low) + " to " + d.withUnit(*q.High)
		ref, half := (*q.Low+*q.High)/2, (*q.High-*q.Low)/2
		word := "model"
		if q.Unit == "N/m" || q.Unit == "N s/m" {
			word = "design"
		}
		if q.Unit == "1" {
			against = fmt.Sprintf("%s against %s %s, tolerance ±%s", signed(q.Value-ref, 3), word, d.num(ref), d.num(half))
		} else {
			against = fmt.Sprintf("%s %% against %s %s, tolerance ±%.3g %%", signed(100*(q.Value-ref)/ref, 1), word, d.withUnit(ref), 100*half/ref)
		}
		if half > 0 {
			j.excess = math.Abs(q.Value-ref) / half
		}
	case q.Low != nil:
		j.Limits = "at least " + d.withUnit(*q.Low)
		against = "least " + d.withUnit(*q.Low)
	case q.High != nil:
		j.Limits = "at most " + d.withUnit(*q.High)
		against = "most " + d.withUnit(*q.High)
	}
	if c.Status == compare.StatusInconclusive {
		switch {
		case strings.Contains(c.Detail, "is flagged"):
			j.Why = "a mode it uses is flagged (see Modes)"
		case q.Sigma == nil:
			j.Why = "no uncertainty is known for the value"
		default:
			j.Why = "the value ± 2 sd reaches across a limit"
		}
	}
	value := j.Value
	if q.Sigma != nil {
		value += " (2 sd)"
	}
	j.Phrase = j.Title + " " + value
	if against != "" {
		j.Phrase += ": " + against
	}
	j.Phrase += ": " + c.Status
	if j.Why != "" {
		j.Phrase += " (" + j.Why + ")"
	}
	return j
}

// maxVerdictItems is how many deviations the verdict box names.
const maxVerdictItems = 3

// newVerdictView is the verdict box of a result with target checks js: the
// failed checks furthest outside their tolerance first, then the
// inconclusive ones; for a pass, the checks closest to their limits.
func newVerdictView(r *compare.Result, js []judgement) verdictView {
	v := verdictView{Status: compare.StatusNone}
	if r.Verdict != nil {
		v.Status = r.Verdict.Status
	}
	v.Word, v.Class = verdictStyle(v.Status)
	count := func(status string) int {
		n := 0
		for _, j := range js {
			if j.status == status {
				n++
			}
		}
		return n
	}
	pick := func(status string) []judgement {
		var out []judgement
		for _, j := range js {
			if j.status == status {
				out = append(out, j)
			}
		}
		slices.SortStableFunc(out, func(a, b judgement) int { return cmp.Compare(b.excess, a.excess) })
		return out
	}
	var items []judgement
	switch v.Status {
	case compare.StatusFail:
		v.Headline = fmt.Sprintf("The car does not match its design: %d of %d target checks fail.", count(compare.StatusFail), len(js))
		v.ItemsHeading = "What failed"
		items = append(pick(compare.StatusFail), pick(compare.StatusInconclusive)...)
	case compare.StatusInconclusive:
		v.Headline = fmt.Sprintf("Not decided: nothing failed, but %d of %d target checks are inconclusive.", count(compare.StatusInconclusive), len(js))
		v.ItemsHeading = "What could not be decided"
		items = pick(compare.StatusInconclusive)
	case compare.StatusPass:
		v.Headline = fmt.Sprintf("The car matches its design: all %d target checks pass, each value with its uncertainty inside its tolerance.", len(js))
		v.ItemsHeading = "Closest to a limit"
		items = pick(compare.StatusPass)
		items = items[:min(len(items), 2)]
	default:
		v.Headline = "Not judged: the setup gives no [targets], so nothing was checked against tolerances; the comparison with the model is below."
	}
	for _, j := range items[:min(len(items), maxVerdictItems)] {
		v.Items = append(v.Items, j.Phrase)
	}
	if n := len(items) - maxVerdictItems; n > 0 {
		v.Items = append(v.Items, fmt.Sprintf("and %d more in the checks below", n))
	}
	return v
}

// newReportView formats the result of in for the template.
func newReportView(in ReportInput) reportView {
	r := in.Result
	v := reportView{Title: in.Title, Cautions: compare.Cautions, Warnings: r.Warnings}
	if v.Title == "" {
		v.Title = "Ride mode report"
	}
	var sub []string
	for _, s := range []string{in.Vehicle, testWords(r.Test)} {
		if s != "" {
			sub = append(sub, s)
		}
	}
	if r.Log != nil {
		sub = append(sub, r.Log.Path)
		if d := dateIn(r.Log.Notes); d != "" {
			sub = append(sub, d)
		}
	}
	v.Subtitle = strings.Join(sub, " · ")
	for _, c := range r.Checks {
		if isTarget(c) {
			v.Targets = append(v.Targets, judge(c))
			continue
		}
		g := guidanceRow{Title: checkTitle(c.Name), Detail: c.Detail, Word: "OK", Class: "verdict-pass"}
		if c.Status != compare.StatusPass {
			g.Word, g.Class = "NOTE", "verdict-warn"
		}
		v.Guidance = append(v.Guidance, g)
	}
	v.Verdict = newVerdictView(r, v.Targets)
	v.Modes, v.FlagNotes = modeRows(r)
	v.Rates, v.RateNotes = rateRows(r)
	v.Facts = runFacts(in)
	if r.Log != nil {
		v.Notes = r.Log.Notes
	}
	v.Method, v.Quick, v.QuickNotes = methodLines(in)
	return v
}

// testWords names a test for a reader.
func testWords(test string) string {
	switch test {
	case "rig":
		return "rig test"
	case "drop":
		return "drop test"
	}
	return test
}

// datePattern finds an ISO 8601 calendar date (2026-03-02) in a note.
var datePattern = regexp.MustCompile(`\b\d{4}-\d{2}-\d{2}\b`)

// dateIn returns the first date in a log's notes, or "".
func dateIn(notes []string) string {
	for _, n := range notes {
		if d := datePattern.FindString(n); d != "" {
			return d
		}
	}
	return ""
}

// runFacts are the facts that identify the run: car, test, date, log and
// setup with their hashes, the logs of a pooled analysis, the tool.
func runFacts(in ReportInput) []fact {
	r := in.Result
	var fs []fact
	add := func(name, value string, code bool) {
		if value != "" {
			fs = append(fs, fact{name, value, code})
		}
	}
	add("Car", in.Vehicle, false)
	add("Test", testWords(r.Test), false)
	if l := r.Log; l != nil {
		date := dateIn(l.Notes)
		if date == "" {
			date = "not recorded (no date in the log's notes)"
		} else {
			date += " (from the log's notes)"
		}
		add("Test date", date, false)
		add("Log", l.Path, false)
		add("Samples", fmt.Sprintf("%d at %.6g Hz, %.6g s", l.Samples, l.SampleRateHz, l.DurationS), false)
		add("Log SHA-256", l.SHA256, true)
	}
	for i, run := range r.Runs {
		if run.Log != nil {
			add(fmt.Sprintf("Log %d of %d", i+1, len(r.Runs)), run.Log.Path+" (SHA-256 "+run.Log.SHA256+")", false)
		}
	}
	if s := r.Setup; s != nil {
		add("Setup", s.Path, false)
		add("Setup SHA-256", s.SHA256, true)
	}
	add("Written by", strings.TrimSpace(r.Tool.Name+" "+r.Tool.Version), false)
	return fs
}

// modeRows pairs each measured mode with the model mode and comparison of
// the same label; model modes with no measured partner follow. It returns
// the reasons of the flagged modes beside.
func modeRows(r *compare.Result) (rows []modeRow, flags []string) {
	var model []compare.ModeJSON
	if r.Model != nil {
		model = r.Model.Modes
	}
	used := make([]bool, len(model))
	for _, m := range r.Modes {
		row := modeRow{Label: m.Label, ModelHz: noValue, ModelZeta: noValue, ModelNode: noValue,
			DiffPct: noValue, DiffZeta: noValue, MAC: noValue}
		var sHz, sZeta, sNode *float64
		if u := m.Uncertainty; u != nil {
			sHz, sZeta, sNode = &u.NaturalFrequencyHz, &u.DampingRatio, u.NodeM
		}
		row.MeasuredHz = withSigma(m.NaturalFrequencyHz, sHz, 3)
		row.MeasuredZeta = withSigma(m.DampingRatio, sZeta, 3)
		row.MeasuredNode = withOptSigma(m.NodeM, sNode, 3)
		if m.Flagged {
			row.Flag = "flagged"
			flags = append(flags, fmt.Sprintf("The %s mode is flagged: %s Checks that use it are inconclusive.", m.Label, strings.Join(m.FlagReasons, " ")))
		}
		for i, mm := range model {
			if !used[i] && mm.Label == m.Label {
				used[i] = true
				row.ModelHz, row.ModelZeta, row.ModelNode = num(mm.NaturalFrequencyHz, 3), num(mm.DampingRatio, 3), optNum(mm.NodeM, 3)
				row.DiffZeta = signed(m.DampingRatio-mm.DampingRatio, 3)
				break
			}
		}
		for _, c := range r.Comparison {
			if c.Label == m.Label {
				row.DiffPct = signed(c.DifferencePct, 1)
				if c.ShapeMeasured {
					row.MAC = num(c.MAC, 3)
				}
			}
		}
		rows = append(rows, row)
	}
	for i, mm := range model {
		if !used[i] {
			rows = append(rows, modeRow{Label: mm.Label, MeasuredHz: noValue, MeasuredZeta: noValue, MeasuredNode: noValue,
				ModelHz: num(mm.NaturalFrequencyHz, 3), ModelZeta: num(mm.DampingRatio, 3), ModelNode: optNum(mm.NodeM, 3),
				DiffPct: noValue, DiffZeta: noValue, MAC: noValue})
		}
	}
	return rows, flags
}

// rateRows sets the back-calculated rates and damping beside the design,
// each with the tolerance and status of its target check, and returns the
// notes on the update.
func rateRows(r *compare.Result) (rows []rateRow, notes []string) {
	u := r.Updated
	if u == nil {
		return nil, nil
	}
	var design compare.RatesJSON
	if r.Model != nil {
		design = r.Model.Rates
	}
	var sd compare.UpdatedUncertainty
	if u.Uncertainty != nil {
		sd = *u.Uncertainty
	}
	row := func(id, name string, got float64, sigma *float64, want float64, unit string) rateRow {
		d := shownOf(unit)
		rr := rateRow{Name: name, Unit: d.unit, Measured: d.num(got), Design: noValue, Diff: noValue,
			Tolerance: noValue, Word: "NOT JUDGED", Class: "verdict-other"}
		if sigma != nil && *sigma > 0 {
			rr.Measured += " ± " + d.num(*sigma)
		}
		if want > 0 {
			rr.Design, rr.Diff = d.num(want), signed(100*(got-want)/want, 1)+" %"
		}
		for _, c := range r.Checks {
			if c.Name != "target."+id {
				continue
			}
			rr.Word, rr.Class = verdictStyle(c.Status)
			if q := c.Quantity; q != nil && q.Low != nil && q.High != nil && want > 0 {
				rr.Tolerance = fmt.Sprintf("±%.3g %%", 100*(*q.High-*q.Low)/2/want)
			}
		}
		return rr
	}
	rows = append(rows,
		row("front_ride_rate", "Front ride rate", u.FrontRateNPerM, &sd.FrontRateNPerM, design.FrontRateNPerM, "N/m"),
		row("rear_ride_rate", "Rear ride rate", u.RearRateNPerM, &sd.RearRateNPerM, design.RearRateNPerM, "N/m"))
	if u.DampingEstimated {
		rows = append(rows,
			row("front_damping", "Front damping", u.FrontDampingNsPerM, sd.FrontDampingNsPerM, design.FrontDampingNsPerM, "N s/m"),
			row("rear_damping", "Rear damping", u.RearDampingNsPerM, sd.RearDampingNsPerM, design.RearDampingNsPerM, "N s/m"))
	} else {
		notes = append(notes, "Damping was not estimated from these data.")
	}
	if u.PitchInertiaKgm2 != nil {
		rr := row("pitch_inertia", "Pitch inertia", *u.PitchInertiaKgm2, sd.PitchInertiaKgm2, 0, "")
		rr.Unit, rr.Measured = "kg m²", withSigma(*u.PitchInertiaKgm2, sd.PitchInertiaKgm2, 0)
		rows = append(rows, rr)
	}
	for _, sp := range []struct {
		axle string
		v    *float64
	}{{"front", u.FrontSpringRateNPerM}, {"rear", u.RearSpringRateNPerM}} {
		if sp.v != nil {
			notes = append(notes, fmt.Sprintf("A %s spring rate of %s kN/m would give that %s ride rate (same motion ratio and tyre).", sp.axle, num(*sp.v/1000, 2), sp.axle))
		}
	}
	if u.RootChoice != "" {
		notes = append(notes, "Of the rates that reproduce both frequencies, the ones shown are "+u.RootChoice+".")
	}
	for _, o := range u.OtherRoots {
		notes = append(notes, fmt.Sprintf("The other root, not chosen: front %s kN/m, rear %s kN/m.", num(o.FrontRateNPerM/1000, 2), num(o.RearRateNPerM/1000, 2)))
	}
	if sd.NominalWeights {
		notes = append(notes, "Some measured values had no standard deviation: nominal ones were used, so the uncertainties are indicative only.")
	}
	if res := u.Residual; res != nil {
		notes = append(notes, fmt.Sprintf("Least-squares misfit: chi-square %s with %d degrees of freedom.", num(res.ChiSquare, 2), res.DegreesOfFreedom))
	}
	return rows, notes
}

// methodLines says once how the modes and rates were found, with the
// analysis choices and the quick first-look estimates.
func methodLines(in ReportInput) (lines []string, quick []quickRow, quickNotes []string) {
	r := in.Result
	var methods []string
	for _, m := range r.Modes {
		if m.Method != "" && !slices.Contains(methods, m.Method) {
			methods = append(methods, m.Method)
		}
	}
	for _, m := range methods {
		lines = append(lines, "Modes: "+m+".")
	}
	if u := r.Updated; u != nil && u.Method != "" {
		lines = append(lines, fmt.Sprintf("Effective rates: %s.", u.Method))
	}
	if a := r.Analysis; a != nil {
		lines = append(lines,
			fmt.Sprintf("Band %s-%s Hz.", num(a.BandLowHz, 2), num(a.BandHighHz, 2)),
			fmt.Sprintf("Fit residual (normalised, 0 for a perfect fit): %s.", num(a.FitResidual, 3)),
			fmt.Sprintf("MAC between the two measured shapes (near 0: well separated): %s.", num(a.ModeShapeMAC, 3)))
		lines = append(lines, a.Choices...)
		for _, q := range a.QuickEstimate {
			quick = append(quick, quickRow{Source: q.Source, FreqHz: num(q.NaturalFrequencyHz, 3), Damping: optNum(q.DampingRatio, 3)})
		}
		quickNotes = a.QuickEstimateNotes
	}
	return append(lines, in.Choices...), quick, quickNotes
}
