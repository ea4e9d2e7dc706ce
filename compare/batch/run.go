package batch

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"time"

	"golang.org/x/sync/errgroup"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/compare/trend"
	"github.com/ridemodes/ridemodes/identify"
	"github.com/ridemodes/ridemodes/ingest"
)

// Files and folders that Run writes under Options.Out; ReportDir is the
// batch report's folder (written by package plots from Batch.Trend).
const (
	ReportDir   = "report"
	ResultsDir  = "results"
	SummaryCSV  = "summary.csv"
	SummaryJSON = "summary.jsonl"
)

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
	// Store, when not nil, records every run as soon as it is done.
	Store *store.Store
	// Done, when not nil, is called after each log with the number of logs
	// done so far; the calls never overlap.
	Done func(done int)
}

// Row is one item's outcome. Its Item's Test is the test that was run:
// rig or drop, from the setup when the item left it empty.
type Row struct {
	Item
	// ResultFile is the path of the result JSON under Out ("" when the
	// analysis failed).
	ResultFile string
	// Record is the run as a store keeps it: content hashes, run key,
	// time, verdict (store.VerdictError for a failed analysis), error
	// message, result (nil for a failed analysis) and metadata. A log that
	// cannot be read has no content hash and is keyed by its path instead.
	// AnalysedAt is the campaign's start, the same for all its runs, so that
	// a store orders them by run name, not by which worker finished first.
	Record store.Run
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
		if b.Rows[i].Record.Verdict == verdict {
			n++
		}
	}
	return n
}

// Trend is the trend view of the campaign's runs in its order (see
// package trend): the view of the batch report.
func (b *Batch) Trend() *trend.Campaign {
	runs := make([]store.Run, len(b.Rows))
	cars := map[string]bool{}
	for i := range b.Rows {
		runs[i] = b.Rows[i].Record
		cars[runs[i].Car] = true
	}
	car := "" // several cars
	if len(cars) == 1 {
		car = runs[0].Car
	}
	return trend.Build(car, runs)
}

// Tally counts the rows by verdict: "2 pass, 1 fail, 0 inconclusive,
// 0 none, 1 error".
func (b *Batch) Tally() string {
	var counts []string
	for _, v := range []string{compare.StatusPass, compare.StatusFail, compare.StatusInconclusive, compare.StatusNone, store.VerdictError} {
		counts = append(counts, fmt.Sprintf("%d %s", b.Count(v), v))
	}
	return strings.Join(counts, ", ")
}

// Worst returns the most severe verdict of the rows, in the order of the
// exit codes: store.VerdictError, then fail, then inconclusive; "" when
// every log passed or had no targets.
func (b *Batch) Worst() string {
	for _, v := range []string{store.VerdictError, compare.StatusFail, compare.StatusInconclusive} {
		if b.Count(v) > 0 {
			return v
		}
	}
	return ""
}

// Run analyses every item of the campaign with at most o.Workers at once
// and writes the outputs (see the package doc). A failed analysis becomes
// its row's Error; Run returns an error only when the context is cancelled
// (ctx.Err()), an output cannot be written or the store refuses a run, and
// then writes no summary. Runs are recorded by one goroutine beside the
// workers, so that no worker waits for the store (an SQLite commit waits
// for the disk).
func Run(ctx context.Context, c *Campaign, o Options) (*Batch, error) {
	if err := guardInputs(c, o.Out); err != nil {
		return nil, err
	}
	setups, err := loadSetups(c.setups, c.Items) // a campaign made by hand has none loaded
	if err != nil {
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
	rctx, stop := context.WithCancelCause(ctx)
	defer stop(nil)
	g, gctx := errgroup.WithContext(rctx)
	g.SetLimit(workers)
	records, recorded := recorder(rctx, stop, o.Store, workers)
	start := time.Now().UTC()
	var (
		mu   sync.Mutex
		done int
	)
	for i := range c.Items {
		if gctx.Err() != nil {
			break
		}
		g.Go(func() error {
			row, err := analyse(gctx, setups[c.Items[i].Setup], c, c.Items[i], start, o)
			if err != nil {
				return err
			}
			b.Rows[i] = row
			if records != nil {
				records <- row.Record
			}
			mu.Lock()
			defer mu.Unlock()
			done++
			if o.Done != nil {
				o.Done(done)
			}
			return nil
		})
	}
	err = g.Wait()
	if records != nil {
		close(records)
		if rerr := <-recorded; rerr != nil {
			return nil, rerr
		}
	}
	if err != nil {
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

// recorder starts the goroutine that records the runs sent on records in
// st (nil channels when st is nil) and, once records is closed, sends its
// first error or nil on recorded. An error stops the campaign (stop) and
// the runs still sent are not recorded.
func recorder(ctx context.Context, stop context.CancelCauseFunc, st *store.Store, workers int) (records chan store.Run, recorded chan error) {
	if st == nil {
		return nil, nil
	}
	records, recorded = make(chan store.Run, workers), make(chan error, 1)
	go func() {
		var err error
		for r := range records {
			if err == nil {
				if err = st.Record(ctx, r); err != nil {
					stop(err)
				}
			}
		}
		recorded <- err
	}()
	return records, recorded
}

// analyse runs one item and writes its result JSON.
func analyse(ctx context.Context, sf *setupFile, c *Campaign, it Item, at time.Time, o Options) (Row, error) {
	row := Row{Item: it, Record: store.Run{LogPath: it.Log, SetupSHA256: sf.sha256, Car: it.Car, Run: it.Run,
		ToolVersion: o.Job.ToolVersion, AnalysedAt: at, Meta: map[string]string{}}}
	for i, name := range c.MetaColumns {
		row.Record.Meta[name] = it.Meta[i]
	}
	if test, err := identify.TestOf(sf.setup, it.Test); err == nil {
		row.Test = test
	}
	jo := o.Job
	jo.LogPath, jo.Setup, jo.SetupPath, jo.Test, jo.Progress = it.Log, sf.setup, it.Setup, it.Test, nil
	out, err := job.Analyze(ctx, jo)
	if ctx.Err() != nil {
		return Row{}, ctx.Err()
	}
	rec := &row.Record
	rec.Test = row.Test
	if err != nil {
		rec.Verdict, rec.Error = store.VerdictError, err.Error()
		if rec.LogSHA256, err = ingest.FileSHA256(it.Log); err != nil {
			rec.RunKey = store.RunKey(hexSHA256("unreadable log "+it.Log), sf.sha256, rec.ToolVersion)
		}
	} else {
		rec.Result, rec.Verdict, rec.LogSHA256 = out.Result, out.Result.Verdict.Status, out.Result.Log.SHA256
		data, err := out.Result.Marshal()
		if err != nil {
			return Row{}, err
		}
		row.ResultFile = filepath.Join(ResultsDir, it.ResultName())
		if err := ingest.WriteFileAtomic(filepath.Join(o.Out, row.ResultFile), data); err != nil {
			return Row{}, err
		}
	}
	if rec.RunKey == "" {
		rec.RunKey = store.RunKey(rec.LogSHA256, rec.SetupSHA256, rec.ToolVersion)
	}
	return row, nil
}

func hexSHA256(s string) string {
	h := sha256.Sum256([]byte(s))
	return hex.EncodeToString(h[:])
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
