package cli

import (
	"fmt"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/plan"
	"github.com/ridemodes/ridemodes/plots"
)

func newPlanCmd() *cobra.Command {
	var (
		jsonPath, reportDir string
		req                 plan.Request
	)
	cmd := &cobra.Command{
		Use:   "plan --setup FILE --test rig|drop [--frequency-sd-pct X] [--damping-sd X] [--node-sd-m X] [--rate-sd-pct X] [--verify N] [--json OUT] [--report DIR]",
		Short: "Plan a rig test or a drop series for the uncertainty wanted",
		Long: `plan works out from the design model and the sensors' noise the test that gives
the uncertainty wanted (one sd; a flag not given comes from the [targets]
tolerance over 8): a rig record's length, rate, drive and Welch segment, or the
drops' height, roll-off delay, log length and number; sensor positions within
the span allowed, warning of a sensor near a node. The prediction (rig: the FRF
error bands and fit on the expected spectra; drop: the Cramer-Rao bound of the
decay model) is refined by seeded simulated tests through the real analysis;
--verify N runs N more. Exit 3: the wanted sd is not met.

` + compare.Cautions,
		Example: `  ridemodes plan --setup car.toml --test rig --frequency-sd-pct 0.3 --damping-sd 0.005
  ridemodes plan --setup car.toml --test drop --node-sd-m 0.05 --verify 20 --json plan.json --report plan/`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := outputGuard("json", jsonPath, req.SetupPath); err != nil {
				return err
			}
			req.ToolVersion = version()
			p, err := plan.Make(cmd.Context(), req)
			if err != nil {
				return libraryError(err)
			}
			plots.WritePlan(cmd.OutOrStdout(), p)
			if jsonPath != "" {
				err = p.WriteJSON(jsonPath)
			}
			if err == nil && reportDir != "" {
				_, err = plots.WritePlanReport(reportDir, p)
			}
			if err != nil {
				return err
			}
			if !p.Meets || (p.Verification != nil && !p.Verification.Met) {
				return fmt.Errorf("%w: the plan does not meet every wanted sd", errTargetsFailed)
			}
			return nil
		},
	}
	f := cmd.Flags()
	f.StringVar(&req.SetupPath, "setup", "", "setup file (TOML): design model, sensors, pans, band, [targets]")
	testFlag(cmd, &req.Test, "kind of test: rig or drop")
	f.Float64Var(&req.Wanted.FrequencySDPct, "frequency-sd-pct", 0, "wanted sd of each natural frequency, %")
	f.Float64Var(&req.Wanted.DampingSD, "damping-sd", 0, "wanted sd of each damping ratio")
	f.Float64Var(&req.Wanted.NodeSDM, "node-sd-m", 0, "wanted sd of each node within two wheelbases of the CG, m")
	f.Float64Var(&req.Wanted.RateSDPct, "rate-sd-pct", 0, "wanted sd of the front and rear ride rates, %")
	f.IntVar(&req.Verify, "verify", 0, "simulate and analyse N tests of the plan; report the spread achieved")
	f.StringVar(&jsonPath, "json", "", "write the plan as JSON to this file")
	f.StringVar(&reportDir, "report", "", "write the plan page (plan.html) and its figure into this folder")
	f.Float64Var(&req.NoiseSDMPerS2, "noise-sd", plan.DefaultNoiseSDMPerS2, "noise sd of every channel at the planned rate, m/s^2")
	f.Float64SliceVar(&req.SensorSpanM, "sensor-span", nil, "REAR,FRONT: where sensors may sit, m from the CG (default: the axles)")
	f.Float64Var(&req.RateHz, "rate", 0, "logger sample rate, Hz (default: 50 x the band's upper edge, in 50 Hz steps)")
	f.Float64Var(&req.MaxPanTravelM, "max-pan-travel", plan.DefaultMaxPanTravelM, "rig: largest pan travel either way, m")
	f.Float64Var(&req.MaxDropHeightM, "max-drop-height", plan.DefaultMaxDropHeightM, "drop: highest drop, m")
	cmd.MarkFlagRequired("setup")
	cmd.MarkFlagRequired("test")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("json", "json")
	return cmd
}
