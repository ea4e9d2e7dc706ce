package cli

import (
	"io"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare/trend"
	"github.com/ridemodes/ridemodes/plots"
)

func newHistoryCmd() *cobra.Command {
	var storeTarget, car, csvPath, jsonPath, reportDir string
	cmd := &cobra.Command{
		Use:   "history --store PATH|URL [--car ID] [--csv OUT] [--json OUT] [--report DIR]",
		Short: "A car's or a campaign's recorded runs as a table, and their trend report",
		Long: `history reads the runs recorded in a store (analyze --store, batch --store):
an SQLite file or a postgres:// URL. It prints one line per run in time order
with the bounce and pitch frequencies and damping ratios and the
back-calculated ride rates, then the drift check: the runs that moved more
than the campaign's own scatter and their own uncertainty explain, from an
individuals and moving-range control chart per quantity. --csv and --json
write the table with every column; --report writes the trend report
(index.html with a figure per quantity) into a folder.

Without --car it shows every car of the store, as one campaign.`,
		Example: `  ridemodes history --store campaign.sqlite --car hatch-01
  ridemodes history --store campaign.sqlite --car hatch-01 --csv hatch-01.csv --report trend/
  ridemodes history --store postgres://rides@db.example/campaigns --json week.json`,
		Args: usageArgs(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := outputGuard("csv", csvPath, storeTarget); err != nil {
				return err
			}
			if err := outputGuard("json", jsonPath, storeTarget); err != nil {
				return err
			}
			c, err := trend.Load(cmd.Context(), storeTarget, car)
			if err != nil {
				return err
			}
			if err := c.WriteTable(infoOut(cmd, csvPath, jsonPath)); err != nil {
				return err
			}
			for _, out := range []struct {
				path  string
				write func(io.Writer) error
			}{{csvPath, c.WriteCSV}, {jsonPath, c.WriteJSON}} {
				if out.path != "" {
					if err := writeOutput(cmd, out.path, out.write); err != nil {
						return err
					}
				}
			}
			if reportDir != "" {
				_, err = plots.WriteTrendReport(reportDir, c)
			}
			return err
		},
	}
	f := cmd.Flags()
	f.StringVar(&storeTarget, "store", "", "the store: an SQLite `FILE` or a postgres:// URL")
	f.StringVar(&car, "car", "", "only the runs of this `CAR` (default: every car)")
	f.StringVar(&csvPath, "csv", "", "write the table as CSV to this `FILE` (- for standard output)")
	f.StringVar(&jsonPath, "json", "", "write the table, the drift findings and the verdict as JSON to this `FILE` (- for standard output)")
	f.StringVar(&reportDir, "report", "", "write the trend report (index.html and figures) into this `DIR`")
	cmd.MarkFlagRequired("store")
	cmd.MarkFlagFilename("csv", "csv")
	cmd.MarkFlagFilename("json", "json")
	cmd.MarkFlagDirname("report")
	return cmd
}
