package cli

import (
	"fmt"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/ingest"
	"github.com/ridemodes/ridemodes/plots"
)

func newCompareCmd() *cobra.Command {
	var modesPath, setupPath, jsonPath string
	cmd := &cobra.Command{
		Use:   "compare --modes RESULT.json --setup FILE [--json OUT]",
		Short: "Set measured modes beside the design model and back-calculate the rates",
		Long: `compare takes measured bounce and pitch modes — the result of an earlier
analyze, or a hand-written file with the same "modes" array — and sets them
beside the design model of the setup file: frequency difference in %, damping,
node, pitch per bounce, and the MAC of the mode shapes where shapes were
measured. It back-calculates the effective front and rear ride rates (and the
damping, when damping was measured) that make the model match, with their
uncertainties, judges the setup's [targets] and reports the trade's ride
guidance.

A hand-written modes file needs, per mode, "label" (bounce or pitch) and
"natural_frequency_hz"; "damping_ratio", "pitch_per_bounce_rad_per_m" or
"node_m", and "uncertainty" are optional and used when given.

Exit codes: 0 done; 1 bad data; 2 bad usage; 3 done, but a target failed;
4 done, nothing failed, but a check is inconclusive.`,
		Example: `  ridemodes compare --modes result.json --setup car.toml
  ridemodes compare --modes measured.json --setup car-v2.toml --json compared.json`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			setup, err := ingest.LoadSetup(setupPath)
			if err != nil {
				return err
			}
			if err := outputGuard("json", jsonPath, modesPath, setupPath); err != nil {
				return err
			}
			measured, err := compare.ReadModesFile(modesPath)
			if err != nil {
				return err
			}
			res := &compare.Result{Tool: compare.Tool{Name: "ridemodes", Version: version()},
				Test: measured.Test, Log: measured.Log, Analysis: measured.Analysis, Modes: measured.Modes}
			if sum, err := ingest.FileSHA256(setupPath); err == nil {
				res.Setup = &compare.FileRef{Path: setupPath, SHA256: sum}
			}
			if err := res.AssessAgainst(setup); err != nil {
				return fmt.Errorf("%s: %w", modesPath, err)
			}
			plots.WriteSummary(infoOut(cmd, jsonPath), res)
			if err := writeResult(cmd, jsonPath, res); err != nil {
				return err
			}
			return verdictError(res.Verdict.Status)
		},
	}
	cmd.Flags().StringVar(&modesPath, "modes", "", "measured modes `FILE`: an analyze result or a file with a \"modes\" array (JSON)")
	cmd.Flags().StringVar(&setupPath, "setup", "", "setup `FILE` (TOML) with the design model and targets")
	cmd.Flags().StringVar(&jsonPath, "json", "", "write the result as JSON to this `FILE` (- for standard output)")
	cmd.MarkFlagRequired("modes")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagFilename("modes", "json")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("json", "json")
	return cmd
}
