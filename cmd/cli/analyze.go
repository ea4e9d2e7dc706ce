package cli

import (
	"errors"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/plots"
)

func newAnalyzeCmd() *cobra.Command {
	var (
		o                   job.Options
		jsonPath, reportDir string
		storeTarget         string
	)
	cmd := &cobra.Command{
		Use:   "analyze LOG... --setup FILE [--test rig|drop] [--json OUT] [--report DIR]",
		Short: "Identify bounce and pitch from a rig or drop log and set them beside the model",
		Long: `analyze does the whole job on one log. For a rig test (the default when the
setup has [[input]] channels) it estimates the FRFs from the front and rear
pans to every body sensor and fits both body modes to all FRFs together with
common poles; for a drop test (--test drop, or a setup without inputs) it
finds the release and fits the free decay of all sensors together. One setup
serves both tests of a car: with --test drop its [[input]] tables are ignored.
Then it solves the design model, compares, back-calculates the effective ride
rates (and damping), judges the [targets] and reports the trade's ride
guidance.

Several logs of one car in one state (repeated drops, repeated rig runs) give
one pooled estimate: each log is identified on its own, each value is the
inverse-variance weighted mean of the runs, and a chi-square test checks that
the runs agree; a run that disagrees is named and the pooled uncertainty is
widened. Three drops pin a node about 1/sqrt(3) as tightly as one.

It prints a summary; --json writes the result (JSON, keys as in the README),
--report writes an HTML report with figures into a folder, --store records
the run in a campaign store (see history). Choices (band, resolution, model
order) are made from the data, with their reasons in the result; each can be
overridden by a flag or by the key of the same name in the setup's [analysis]
table (--segment-samples is segment_samples). Ctrl-C stops the run and leaves
no output file behind.

Exit codes: 0 done; 1 bad data or a failed analysis; 2 bad usage; 3 done, but
a check in [targets] failed; 4 done, nothing failed, but a check is
inconclusive.

` + compare.Cautions,
		Example: `  ridemodes analyze rig.csv --setup car.toml
  ridemodes analyze rig.csv --setup car.toml --json result.json --report report/
  ridemodes analyze rig.csv --setup car.toml --store campaign.sqlite
  ridemodes analyze drop.csv --setup car.toml --test drop --start 2 --end 30
  ridemodes analyze drop-1.csv drop-2.csv drop-3.csv --setup car.toml --test drop`,
		Args: usageArgs(cobra.MinimumNArgs(1)),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := outputGuard("json", jsonPath, append(args, o.SetupPath)...); err != nil {
				return err
			}
			out, err := job.AnalyzeRuns(cmd.Context(), o, args)
			if err != nil {
				return libraryError(err)
			}
			plots.WriteSummary(infoOut(cmd, jsonPath), out.Result)
			if storeTarget != "" {
				if err := store.RecordResult(cmd.Context(), storeTarget, out.Setup.Vehicle.Name, out.Result); err != nil {
					return err
				}
			}
			return writeOutcome(cmd, out, jsonPath, reportDir)
		},
	}
	registerLogFlags(cmd, &o)
	f := cmd.Flags()
	f.StringVar(&jsonPath, "json", "", "write the result as JSON to this `FILE` (- for standard output)")
	f.StringVar(&reportDir, "report", "", "write an HTML report with figures into this `DIR`")
	f.StringVar(&storeTarget, "store", "", "record the run in a campaign store: an SQLite `FILE` or a postgres:// URL")
	f.IntVar(&o.MaxModelOrder, "max-model-order", 0, "highest model order `N` of the fit's sweep, even, at least 4 (default from [analysis] max_model_order, else the method's own)")
	f.IntVar(&o.Event, "event", 0, "drop test: which release `N` to analyse, counted from 0")
	deprecatedAlias(cmd, "max-order", "max-model-order", "named like the setup key max_model_order")
	cmd.MarkFlagFilename("json", "json")
	cmd.MarkFlagDirname("report")
	return cmd
}

// writeResult writes a result's JSON to path, when one is given.
func writeResult(cmd *cobra.Command, path string, res *compare.Result) error {
	if path == "" {
		return nil
	}
	data, err := res.Marshal()
	if err != nil {
		return err
	}
	return writeData(cmd, path, data)
}

// libraryError marks the library's option mistakes as usage errors (exit 2).
func libraryError(err error) error {
	var oe *compare.OptionError
	if errors.As(err, &oe) {
		return usageError{err}
	}
	return err
}

// writeOutcome writes the JSON result and the report, each atomically, and
// returns the verdict's error (exit code 3 or 4) when it is not a pass.
func writeOutcome(cmd *cobra.Command, o *job.Outcome, jsonPath, reportDir string) error {
	if err := writeResult(cmd, jsonPath, o.Result); err != nil {
		return err
	}
	if reportDir != "" {
		if _, err := plots.WriteReport(reportDir, plots.OutcomeReport(o)); err != nil {
			return err
		}
	}
	return verdictError(o.Verdict)
}
