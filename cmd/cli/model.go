package cli

import (
	"fmt"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
	"github.com/ridemodes/ridemodes/plots"
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
			plots.WriteModel(infoOut(cmd, jsonPath), setup, modes, damped, guidance)
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
				Model:  compare.ModelPart(setup.Vehicle, modes),
				Checks: guidance,
			}
			return writeResult(cmd, jsonPath, res)
		},
	}
	cmd.Flags().StringVar(&setupPath, "setup", "", "setup `FILE` (TOML) describing the vehicle")
	cmd.Flags().StringVar(&jsonPath, "json", "", "also write the result as JSON to this `FILE` (- for standard output)")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("json", "json")
	return cmd
}
