package cli

import (
	"cmp"
	"fmt"
	"net/url"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/batch"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/plots"
)

// batchFlags are the options of batch.
type batchFlags struct {
	setupPath, manifest, test, outDir, target, shardText string
	workers                                              int
}

func newBatchCmd() *cobra.Command {
	var setupPath, manifest, test, outDir, target, shardText string
	var workers int
	cmd := &cobra.Command{
		Use:   "batch (LOG|DIR|GLOB)... --setup FILE | --manifest FILE.csv [--out DIR] [--workers N] [--store PATH|URL] [--shard I/N] [--test rig|drop]",
		Short: "Analyse a campaign of logs in parallel into a summary, results and a store",
		Long: `batch runs analyze on every log of a campaign, several at once. Under --out it
writes results/ (a result JSON per log), summary.csv and summary.jsonl (a row
per log in sorted-path or manifest order, failures with their message) and
report/index.html (the trend report of the batch, as history writes it), and
it records every run in a store (campaign.sqlite under --out, or a postgres://
URL). A failed log never stops the others; Ctrl-C leaves no summary.

Logs are files, folders (their *.csv files) or quoted patterns with one
--setup, or a --manifest: a CSV with the header log,setup,car,run (paths
relative to it), an optional test column (rig, drop or empty: --test) and
metadata columns. --shard I/N takes every N-th log from the I-th; without it,
JOB_COMPLETION_INDEX with RIDEMODES_SHARD_COUNT (a Kubernetes indexed Job) or
SLURM_ARRAY_TASK_ID with SLURM_ARRAY_TASK_COUNT (a Slurm array) choose it.

Exit codes: 0 done; 1 a log failed; 2 bad usage; 3 a check failed; 4 a check
is inconclusive (the most severe of the logs).

` + compare.Cautions,
		Example: `  ridemodes batch logs/ --setup car.toml --test drop
  ridemodes batch 'week12/*.csv' --setup car.toml --out week12-results --workers 4
  ridemodes batch --manifest campaign.csv --store postgres://rides@db/campaign --shard 2/8`,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runBatch(cmd, args, batchFlags{setupPath, manifest, test, outDir, target, shardText, workers})
		},
	}
	f := cmd.Flags()
	f.StringVar(&setupPath, "setup", "", "setup `FILE` (TOML) of every log given as an argument")
	f.StringVar(&manifest, "manifest", "", "campaign manifest `FILE` (CSV: log,setup,car,run, then metadata columns)")
	testFlag(cmd, &test, "the `TEST`, rig or drop, of every log (a manifest's test column wins; default: rig when the setup has [[input]] tables)")
	f.StringVar(&outDir, "out", "ridemodes-batch", "output `DIR`: results/, summary.csv, summary.jsonl, report/")
	f.IntVar(&workers, "workers", 0, "`N` logs analysed at once (default: the number of cores)")
	f.StringVar(&target, "store", "", "store of every run: an SQLite `FILE` or a postgres:// URL (default: campaign.sqlite under --out)")
	f.StringVar(&shardText, "shard", "", "analyse only part `I/N` (1-based), every N-th log (default: from the scheduler's index variables)")
	cmd.MarkFlagsMutuallyExclusive("setup", "manifest")
	cmd.MarkFlagFilename("setup", "toml")
	cmd.MarkFlagFilename("manifest", "csv")
	cmd.MarkFlagDirname("out")
	return cmd
}

// loadCampaign reads the manifest, or expands the logs given with a setup,
// and keeps the shard that --shard or the scheduler's variables choose.
func loadCampaign(args []string, setupPath, manifest, test, shardText string) (c *batch.Campaign, shard batch.Shard, from string, err error) {
	switch {
	case manifest != "" && len(args) > 0:
		return nil, shard, "", usageError{fmt.Errorf("give logs with --setup, or a --manifest, not both")}
	case manifest != "":
		c, err = batch.ReadManifest(manifest, test)
	case len(args) == 0 || setupPath == "":
		return nil, shard, "", usageError{fmt.Errorf("give the logs (files, folders or quoted patterns) with their --setup, or a --manifest")}
	default:
		c, err = batch.Expand(args, setupPath, test)
	}
	if err != nil {
		return nil, shard, "", libraryError(err)
	}
	if shard, from, err = batch.ChooseShard(shardText, os.Getenv); err != nil {
		return nil, shard, "", usageError{err}
	}
	return c.Select(shard), shard, from, nil
}

// batchError sets the exit code by the worst verdict (1 > 3 > 4 > 0).
func batchError(b *batch.Batch, summary string) error {
	switch w := b.Worst(); w {
	case "":
		return nil
	case store.VerdictError:
		return fmt.Errorf("%d of %d logs could not be analysed (their rows in %s say why)", b.Count(w), len(b.Rows), summary)
	default:
		return fmt.Errorf("%d of %d logs: %w (see %s)", b.Count(w), len(b.Rows), verdictError(w), summary)
	}
}

// runBatch analyses the campaign, records it and writes its report.
func runBatch(cmd *cobra.Command, args []string, bf batchFlags) error {
	c, shard, from, err := loadCampaign(args, bf.setupPath, bf.manifest, bf.test, bf.shardText)
	if err != nil {
		return err
	}
	if from != "" {
		fmt.Fprintf(cmd.ErrOrStderr(), "shard %s (%s): %d logs\n", shard, from, len(c.Items))
	}
	if err := os.MkdirAll(bf.outDir, 0o755); err != nil {
		return err
	}
	bf.target = cmp.Or(bf.target, filepath.Join(bf.outDir, "campaign.sqlite"))
	st, err := store.Open(cmd.Context(), bf.target)
	if err != nil {
		return err
	}
	defer st.Close()
	step, done := countProgress(cmd.ErrOrStderr(), len(c.Items), "analysing logs")
	b, err := batch.Run(cmd.Context(), c, batch.Options{Out: bf.outDir, Workers: bf.workers, Store: st,
		Job: job.Options{ToolVersion: version()}, Done: step})
	done()
	if err != nil {
		return err
	}
	for _, r := range b.Rows {
		if r.Record.Error != "" {
			fmt.Fprintf(cmd.ErrOrStderr(), "failed: %s\n", r.Record.Error)
		}
	}
	if u, err := url.Parse(bf.target); err == nil && u.Scheme != "" {
		bf.target = u.Redacted()
	}
	if _, err := plots.WriteTrendReport(filepath.Join(bf.outDir, batch.ReportDir), b.Trend()); err != nil {
		return err
	}
	fmt.Fprintf(cmd.OutOrStdout(), "logs: %s\nwritten in %s: %s, %s, %s/, %s/%s; store: %s\n", b.Tally(), bf.outDir,
		batch.SummaryCSV, batch.SummaryJSON, batch.ResultsDir, batch.ReportDir, plots.TrendReportFile, bf.target)
	return batchError(b, filepath.Join(bf.outDir, batch.SummaryCSV))
}
