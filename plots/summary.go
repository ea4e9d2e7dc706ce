package plots

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

// The text summaries that the command line prints: the same facts as the
// HTML report, for a terminal (text/tabwriter).

// pm formats a value with its standard deviation, or the value alone.
func pm(format string, v *float64, sd *float64) string {
	if v == nil {
		return "-"
	}
	s := fmt.Sprintf(format, *v)
	if sd != nil && *sd > 0 {
		s += " ±" + strings.TrimLeft(fmt.Sprintf(format, *sd), "+")
	}
	return s
}

func ptr(x float64) *float64 { return &x }

// measuredZeta is a measured mode's damping ratio, nil when none was
// measured (0 in a hand-written modes file, see compare.MeasuredFromJSON).
func measuredZeta(m compare.ModeJSON) *float64 {
	if m.DampingRatio == 0 {
		return nil
	}
	return &m.DampingRatio
}

// WriteSummary writes the text summary of an analyze or compare result, as
// the terminal shows it: measured modes beside the model, the rates that
// make the model match, the checks, the verdict and the warnings.
func WriteSummary(w io.Writer, res *compare.Result) {
	if res.Log != nil {
		fmt.Fprintf(w, "%s test, %s: %d samples at %.6g Hz (%.1f s)\n", res.Test, res.Log.Path, res.Log.Samples,
			res.Log.SampleRateHz, res.Log.DurationS)
	}
	writeRuns(w, res)
	model := map[string]compare.ModeJSON{}
	if res.Model != nil {
		for _, m := range res.Model.Modes {
			model[m.Label] = m
		}
	}
	cmp := map[string]compare.Comparison{}
	for _, c := range res.Comparison {
		cmp[c.Label] = c
	}
	fmt.Fprintln(w, "\nBody modes: measured (± one standard deviation) beside the design model")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "mode\tf_n [Hz]\tzeta [-]\tnode [m]\tpitch/bounce [rad/m]\t|\tmodel f_n\tmodel zeta\tmodel node\t|\tdiff f_n\tMAC")
	for _, m := range res.Modes {
		var sdF, sdZ, sdN, sdP *float64
		if u := m.Uncertainty; u != nil {
			sdF, sdZ, sdN, sdP = ptr(u.NaturalFrequencyHz), ptr(u.DampingRatio), u.NodeM, u.PitchPerBounceRadPerM
		}
		label := m.Label
		if m.Flagged {
			label += " FLAGGED" // the data cannot support it: see the warnings
		}
		row := []string{label, pm("%.4f", ptr(m.NaturalFrequencyHz), sdF), pm("%.3f", measuredZeta(m), sdZ),
			pm("%+.3f", m.NodeM, sdN), pm("%+.4f", m.PitchPerBounceRadPerM, sdP), "|"}
		if p, ok := model[m.Label]; ok {
			row = append(row, fmt.Sprintf("%.4f", p.NaturalFrequencyHz), fmt.Sprintf("%.3f", p.DampingRatio), pm("%+.3f", p.NodeM, nil))
		} else {
			row = append(row, "-", "-", "-")
		}
		row = append(row, "|")
		if c, ok := cmp[m.Label]; ok {
			mac := "-"
			if c.ShapeMeasured {
				mac = fmt.Sprintf("%.3f", c.MAC)
			}
			row = append(row, fmt.Sprintf("%+.1f %%", c.DifferencePct), mac)
		} else {
			row = append(row, "-", "-")
		}
		fmt.Fprintln(tw, strings.Join(row, "\t"))
	}
	tw.Flush()
	for _, m := range res.Modes {
		if m.Flagged {
			fmt.Fprintf(w, "  %s is FLAGGED: the data cannot support its values as stated (reasons under Warnings); checks that use it are inconclusive\n", m.Label)
		}
	}
	writeRates(w, res.Updated)
	WriteChecks(w, "Checks", res.Checks)
	if v := res.Verdict; v != nil {
		fmt.Fprintf(w, "\nVerdict: %s. %s\n", strings.ToUpper(v.Status), v.Summary)
	}
	if len(res.Warnings) > 0 {
		fmt.Fprintln(w, "\nWarnings")
		for _, s := range res.Warnings {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
	fmt.Fprintln(w, "\nEngineering estimates, not a certification; see the safety notes in --help.")
}

// writeRates writes the rates (and damping) that make the model match.
func writeRates(w io.Writer, u *compare.Updated) {
	if u == nil {
		return
	}
	fmt.Fprintf(w, "\nEffective rates that make the model match\n  method: %s\n", u.Method)
	var sd compare.UpdatedUncertainty
	if u.Uncertainty != nil {
		sd = *u.Uncertainty
	}
	fmt.Fprintf(w, "  front ride rate   %s N/m\n  rear ride rate    %s N/m\n",
		pm("%.0f", ptr(u.FrontRateNPerM), ptr(sd.FrontRateNPerM)), pm("%.0f", ptr(u.RearRateNPerM), ptr(sd.RearRateNPerM)))
	if u.DampingEstimated {
		fmt.Fprintf(w, "  front damping     %s N s/m\n  rear damping      %s N s/m\n",
			pm("%.0f", ptr(u.FrontDampingNsPerM), sd.FrontDampingNsPerM), pm("%.0f", ptr(u.RearDampingNsPerM), sd.RearDampingNsPerM))
	}
	for _, sp := range []struct {
		axle string
		v    *float64
	}{{"front", u.FrontSpringRateNPerM}, {"rear", u.RearSpringRateNPerM}} {
		if sp.v != nil {
			fmt.Fprintf(w, "  %s spring rate %.0f N/m would give it (same motion ratio and tyre)\n", sp.axle, *sp.v)
		}
	}
	if u.PitchInertiaKgm2 != nil {
		fmt.Fprintf(w, "  pitch inertia     %s kg m^2\n", pm("%.0f", u.PitchInertiaKgm2, sd.PitchInertiaKgm2))
	}
	for _, o := range u.OtherRoots {
		fmt.Fprintf(w, "  (another root fits the frequencies too: front %.0f N/m, rear %.0f N/m; %s)\n",
			o.FrontRateNPerM, o.RearRateNPerM, u.RootChoice)
	}
}

// WriteChecks lists checks under a heading, one line each.
func WriteChecks(w io.Writer, heading string, checks []compare.Check) {
	if len(checks) == 0 {
		return
	}
	fmt.Fprintf(w, "\n%s\n", heading)
	for _, c := range checks {
		fmt.Fprintf(w, "  [%s] %s: %s\n", strings.ToUpper(c.Status), c.Name, c.Detail)
	}
}

// writeRuns lists the runs of a pooled analysis, each with its own modes,
// and the consistency tests that failed.
func writeRuns(w io.Writer, res *compare.Result) {
	if len(res.Runs) == 0 {
		return
	}
	fmt.Fprintf(w, "%s test, %d logs pooled (%s)\n\nEach log on its own\n", res.Test, len(res.Runs), res.Pooling.Method)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "log\tmode\tf_n [Hz]\tzeta [-]\tnode [m]")
	for _, r := range res.Runs {
		for _, m := range r.Modes {
			u := m.Uncertainty
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", r.Log.Path, m.Label, pm("%.4f", ptr(m.NaturalFrequencyHz), ptr(u.NaturalFrequencyHz)),
				pm("%.3f", measuredZeta(m), ptr(u.DampingRatio)), pm("%+.3f", m.NodeM, u.NodeM))
		}
	}
	tw.Flush()
	for _, c := range res.Pooling.Checks {
		if !c.Consistent {
			fmt.Fprintf(w, "  runs disagree on the %s %s (p = %.2g): %s is %.1f sd from the others\n",
				c.Label, c.Value, c.PValue, *c.OutlierLog, *c.OutlierZ)
		}
	}
}

// nodeWords describes a node position for a reader.
func nodeWords(nodeM float64) string {
	switch {
	case math.IsNaN(nodeM):
		return "no node (pure heave)"
	case math.Abs(nodeM) < 0.0005:
		return "at the CG"
	case nodeM > 0:
		return fmt.Sprintf("%.3f m ahead of the CG", nodeM)
	default:
		return fmt.Sprintf("%.3f m behind the CG", -nodeM)
	}
}

// fmtOpt formats a value that may be missing (NaN).
func fmtOpt(format string, x float64) string {
	if math.IsNaN(x) {
		return "-"
	}
	return fmt.Sprintf(format, x)
}

// WriteModel writes the text summary of the design model: its modes, the
// ride-rate build-up and the ride guidance.
func WriteModel(w io.Writer, setup *ingest.Setup, modes []compare.Mode, damped bool, guidance []compare.Check) {
	name := setup.Vehicle.Name
	if name == "" {
		name = "vehicle"
	}
	fmt.Fprintf(w, "Design model of %s (%s), from the %s\n\n", name, setup.Path, compare.ModelMethod(damped))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "mode\tf_n [Hz]\tomega_n [rad/s]\tzeta [-]\tf_d [Hz]\tpitch/bounce [rad/m]\tnode [m]\tnode lies")
	for _, m := range modes {
		fmt.Fprintf(tw, "%s\t%.3f\t%.3f\t%.3f\t%.3f\t%s\t%s\t%s\n", m.Label, m.NaturalFrequencyHz,
			2*math.Pi*m.NaturalFrequencyHz, m.DampingRatio, m.DampedFrequencyHz,
			fmtOpt("%+.4f", m.PitchPerBounceRadPerM), fmtOpt("%+.3f", m.NodeM), nodeWords(m.NodeM))
	}
	tw.Flush()
	fmt.Fprintln(w, "\nRide rates (per axle, at the wheel centre)")
	for _, r := range compare.RideRates(setup.Vehicle) {
		fmt.Fprintf(w, "  %s\n", r)
	}
	WriteChecks(w, "Ride guidance (design stage; guidance, never a verdict)", guidance)
	fmt.Fprintln(w, "\nAxes: ISO 8855 (x forward, z up, pitch positive nose-down); positions from the CG, positive forward.")
}
