package cli

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
)

func newModelCmd() *cobra.Command {
	var setupPath, jsonPath string
	cmd := &cobra.Command{
		Use:   "model --setup FILE [--json OUT]",
		Short: "Print the design model's bounce and pitch modes (no log needed)",
		Long: `model solves the two-degree-of-freedom bounce-pitch model of the setup file's
[vehicle] table: a rigid body of mass m and pitch inertia J on front and rear
ride rates (and dampers, when the setup gives them). With damping it solves the
state-space eigenproblem; without, the undamped eigenproblem.

For each mode it prints the natural frequency (Hz and rad/s), the damping ratio,
the damped frequency, the pitch per bounce (rad of pitch, positive nose-down, per
m of heave at the CG) and the node: the position, from the CG and positive
forward, where the body does not move vertically. The mode whose node lies
farther from the CG is labelled bounce, the other pitch.`,
		Example: `  ridemodes model --setup testdata/example/hatchback.toml
  ridemodes model --setup car.toml --json model.json`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			setup, err := ingest.LoadSetup(setupPath)
			if err != nil {
				return err
			}
			v := compare.DesignOf(setup.Vehicle)
			modes, err := v.Modes()
			if err != nil {
				return fmt.Errorf("%s: %w", setupPath, err)
			}
			damped := v.Damped()
			guidance, err := compare.ModelGuidance(v)
			if err != nil {
				return fmt.Errorf("%s: %w", setupPath, err)
			}
			printModel(cmd.OutOrStdout(), setup, modes, damped, guidance)
			if jsonPath == "" {
				return nil
			}
			if err := outputGuard("json", jsonPath, setupPath); err != nil {
				return err
			}
			sum, err := ingest.FileSHA256(setupPath)
			if err != nil {
				return err
			}
			res := &compare.Result{
				Tool:   compare.Tool{Name: "ridemodes", Version: version()},
				Setup:  &compare.FileRef{Path: setupPath, SHA256: sum},
				Model:  compare.ModelPart(v, modes),
				Checks: guidance,
			}
			data, err := res.Marshal()
			if err != nil {
				return err
			}
			return ingest.WriteFileAtomic(jsonPath, data)
		},
	}
	cmd.Flags().StringVar(&setupPath, "setup", "", "setup file (TOML) describing the vehicle")
	cmd.Flags().StringVar(&jsonPath, "json", "", "also write the result as JSON to this file")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("json", "json")
	return cmd
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

func printModel(w io.Writer, setup *ingest.Setup, modes []compare.Mode, damped bool, guidance []compare.Check) {
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
	printChecks(w, "Ride guidance (design stage; guidance, never a verdict)", guidance)
	fmt.Fprintln(w, "\nAxes: ISO 8855 (x forward, z up, pitch positive nose-down); positions from the CG, positive forward.")
}
