package batch

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sync"
	"time"

	"golang.org/x/sync/errgroup"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/ingest"
)

// Files and folders that Run writes under Options.Out.
const (
	ResultsDir  = "results"
	SummaryCSV  = "summary.csv"
	SummaryJSON = "summary.jsonl"
)

// VerdictError is the verdict of a log whose analysis failed, beside the
// result verdicts pass, fail, inconclusive and none.
const VerdictError = "error"

// Options say where a campaign's outputs go and how it runs.
type Options struct {
	// Out is the folder of the outputs; it is created when missing, and
	// files of an earlier run in it are replaced.
	Out string
	// Workers is the number of logs analysed at once (0: runtime.NumCPU()).
	Workers int
	// Job holds the analysis options of every log; its LogPath, Setup,
	// SetupPath and Test are set per item, its Progress is not used.
	Job job.Options
	// Done, when not nil, is called after each log with the number of logs
	// done so far; the calls never overlap.
	Done func(done int)
}

// Row is one item's outcome. Its Item's Test is the test that was run:
// rig or drop, from the setup when the item left it empty.
type Row struct {
	Item
	// Result is the analysis result (nil when the analysis failed), and
	// ResultFile its JSON's path under Out.
	Result     *compare.Result
	ResultFile string
	// Error is the message of a failed analysis ("" otherwise).
	Error string
	// LogSHA256 and SetupSHA256 are the hex SHA-256 of the files' content
	// (LogSHA256 is "" when the log cannot be read).
	LogSHA256, SetupSHA256 string
	// AnalysedAt is when the analysis ended.
	AnalysedAt time.Time
}

// Verdict is the row's verdict: the result's (pass, fail, inconclusive,
// none), or VerdictError for a failed analysis.
func (r *Row) Verdict() string {
	if r.Result == nil {
		return VerdictError
	}
	return r.Result.Verdict.Status
}

// Batch is a finished campaign: its rows in the campaign's order.
type Batch struct {
	Rows        []Row
	MetaColumns []string
}

// Count returns the number of rows with the verdict.
func (b *Batch) Count(verdict string) int {
	n := 0
	for i := range b.Rows {
		if b.Rows[i].Verdict() == verdict {
			n++
		}
	}
	return n
}

// Worst returns the most severe verdict of the rows, in the order of the
// exit codes: VerdictError, then fail, then inconclusive; "" when every
// log passed or had no targets.
func (b *Batch) Worst() string {
	for _, v := range []string{VerdictError, compare.StatusFail, compare.StatusInconclusive} {
		if b.Count(v) > 0 {
			return v
		}
	}
	return ""
}

// Run analyses every item of the campaign with at most o.Workers at once
// and writes the outputs (see the package doc). A failed analysis becomes
// its row's Error; Run returns an error only when the context is cancelled
// (ctx.Err()) or an output cannot be written, and then writes no summary.
func Run(ctx context.Context, c *Campaign, o Options) (*Batch, error) {
	if err := guardInputs(c, o.Out); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(filepath.Join(o.Out, ResultsDir), 0o755); err != nil {
		return nil, err
	}
	workers := o.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	b := &Batch{Rows: make([]Row, len(c.Items)), MetaColumns: c.MetaColumns}
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(workers)
	var (
		mu   sync.Mutex
		done int
	)
	for i := range c.Items {
		if gctx.Err() != nil {
			break
		}
		g.Go(func() error {
			row, err := analyse(gctx, c, c.Items[i], o)
			if err != nil {
				return err
			}
			b.Rows[i] = row
			mu.Lock()
			defer mu.Unlock()
			done++
			if o.Done != nil {
				o.Done(done)
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := b.writeSummaries(o.Out); err != nil {
		return nil, err
	}
	return b, nil
}

// analyse runs one item and writes its result JSON.
func analyse(ctx context.Context, c *Campaign, it Item, o Options) (Row, error) {
	sf := c.setups[it.Setup]
	row := Row{Item: it, SetupSHA256: sf.sha256, ResultFile: filepath.Join(ResultsDir, it.ResultName())}
	if test, err := identify.TestOf(sf.setup, it.Test); err == nil {
		row.Test = test
	}
	jo := o.Job
	jo.LogPath, jo.Setup, jo.SetupPath, jo.Test, jo.Progress = it.Log, sf.setup, it.Setup, it.Test, nil
	out, err := job.Analyze(ctx, jo)
	row.AnalysedAt = time.Now().UTC()
	if ctx.Err() != nil {
		return Row{}, ctx.Err()
	}
	if err != nil {
		row.Error, row.ResultFile = err.Error(), ""
		row.LogSHA256, _ = ingest.FileSHA256(it.Log)
		return row, nil
	}
	row.Result, row.LogSHA256 = out.Result, out.Result.Log.SHA256
	data, err := out.Result.Marshal()
	if err != nil {
		return Row{}, err
	}
	if err := ingest.WriteFileAtomic(filepath.Join(o.Out, row.ResultFile), data); err != nil {
		return Row{}, err
	}
	return row, nil
}

// guardInputs refuses an output folder whose summary files would replace
// one of the campaign's inputs (a log folder given as --out).
func guardInputs(c *Campaign, out string) error {
	inputs := []string{c.Manifest}
	for _, it := range c.Items {
		inputs = append(inputs, it.Log, it.Setup)
	}
	for _, name := range []string{SummaryCSV, SummaryJSON} {
		path := filepath.Join(out, name)
		for _, in := range inputs {
			if in != "" && ingest.SameFile(path, in) {
				return fmt.Errorf("the output %s would replace the input %s; choose another output folder", path, in)
			}
		}
	}
	return nil
}
