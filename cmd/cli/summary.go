package cli

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/ridemodes/ridemodes/compare"
)

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

// printSummary writes the terminal summary of an analyze or compare result.
func printSummary(w io.Writer, res *compare.Result) {
	if res.Log != nil {
		fmt.Fprintf(w, "%s test, %s: %d samples at %.6g Hz (%.1f s)\n", res.Test, res.Log.Path, res.Log.Samples,
			res.Log.SampleRateHz, res.Log.DurationS)
	}
	printRuns(w, res)
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
		row := []string{label, pm("%.4f", ptr(m.NaturalFrequencyHz), sdF), pm("%.3f", ptr(m.DampingRatio), sdZ),
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
	if u := res.Updated; u != nil {
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
	printChecks(w, "Checks", res.Checks)
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

// printChecks lists checks under a heading, one line each.
func printChecks(w io.Writer, heading string, checks []compare.Check) {
	if len(checks) == 0 {
		return
	}
	fmt.Fprintf(w, "\n%s\n", heading)
	for _, c := range checks {
		fmt.Fprintf(w, "  [%s] %s: %s\n", strings.ToUpper(c.Status), c.Name, c.Detail)
	}
}

// printRuns lists the runs of a pooled analysis, each with its own modes,
// and the consistency tests that failed.
func printRuns(w io.Writer, res *compare.Result) {
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
				pm("%.3f", ptr(m.DampingRatio), ptr(u.DampingRatio)), pm("%+.3f", m.NodeM, u.NodeM))
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
