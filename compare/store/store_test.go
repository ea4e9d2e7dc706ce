package store_test

import (
	"bytes"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/ridemodes/ridemodes/compare"
	"github.com/ridemodes/ridemodes/compare/job"
	"github.com/ridemodes/ridemodes/compare/simulate"
	"github.com/ridemodes/ridemodes/compare/store"
	"github.com/ridemodes/ridemodes/ingest"
)

// exampleSetup is the invented example car of the project's tests.
const exampleSetup = "../../testdata/example/hatchback.toml"

var (
	analysed    *compare.Result
	analysedErr error
	analyseOnce sync.Once
)

// result is a real analysis (a simulated drop log of the example car,
// analysed by compare/job), the template of every recorded run: each call
// gives its own deep copy.
func result(t testing.TB) *compare.Result {
	t.Helper()
	r, err := resultCopy()
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func resultCopy() (*compare.Result, error) {
	analyseOnce.Do(func() {
		dir, err := os.MkdirTemp("", "store-test")
		if err != nil {
			analysedErr = err
			return
		}
		defer os.RemoveAll(dir)
		analysed, analysedErr = analyseDrop(dir)
	})
	if analysedErr != nil {
		return nil, analysedErr
	}
	b, err := json.Marshal(analysed)
	if err != nil {
		return nil, err
	}
	var r compare.Result
	if err := json.Unmarshal(b, &r); err != nil {
		return nil, err
	}
	return &r, nil
}

func analyseDrop(dir string) (*compare.Result, error) {
	setup, err := ingest.LoadSetup(exampleSetup)
	if err != nil {
		return nil, err
	}
	o := simulate.Defaults("drop")
	o.NoiseFraction, o.Seed = 0.02, 3
	log, err := simulate.Drop(compare.DesignOf(setup.Vehicle), setup.Sensors, o)
	if err != nil {
		return nil, err
	}
	path := filepath.Join(dir, "drop.csv")
	if err := log.WriteFile(path); err != nil {
		return nil, err
	}
	out, err := job.Analyze(context.Background(), job.Options{LogPath: path, SetupPath: exampleSetup, Test: "drop", ToolVersion: "test"})
	if err != nil {
		return nil, err
	}
	return out.Result, nil
}

// runOf is run number i of car, analysed at a fixed time plus i minutes;
// its log hash is made unique by i (the run key follows).
func runOf(t testing.TB, car string, i int) store.Run {
	t.Helper()
	r, err := runOrErr(car, i)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func runOrErr(car string, i int) (store.Run, error) {
	res, err := resultCopy()
	if err != nil {
		return store.Run{}, err
	}
	res.Log.SHA256 = fmt.Sprintf("%064x", i)
	res.Log.Path = fmt.Sprintf("logs/%s-%d.csv", car, i)
	return store.Run{
		Car: car, Run: fmt.Sprint(i), Result: res,
		AnalysedAt: time.Date(2031, 5, 4, 9, 0, 0, 0, time.UTC).Add(time.Duration(i) * time.Minute),
		Meta:       map[string]string{"notes": fmt.Sprintf("run %d of %s", i, car)},
	}, nil
}

func openSQLite(t testing.TB) (*store.Store, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "campaign.sqlite")
	s, err := store.Open(context.Background(), path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s, path
}

func plainSQLite(t testing.TB, path string) *sql.DB {
	t.Helper()
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	return db
}

func count(t testing.TB, db *sql.DB, q string, args ...any) int {
	t.Helper()
	var n int
	if err := db.QueryRow(q, args...).Scan(&n); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	return n
}

// TestRunKey: the run key is the hex SHA-256 of the two hashes and the
// version joined by newlines. Expected value: printf 'a\nb\nv1' | sha256sum
// (GNU coreutils 9).
func TestRunKey(t *testing.T) {
	const want = "c6ac900349f7093fc49af3196043eb75e21bb128627506e081f5a901225c0347"
	if got := store.RunKey("a", "b", "v1"); got != want {
		t.Errorf("RunKey = %s, want %s", got, want)
	}
}

// TestSQLiteReadBackWithPlainSQL: what Record writes is in the contract's
// fixed tables, read with plain SQL by a connection of its own, value for
// value as the result has it.
func TestSQLiteReadBackWithPlainSQL(t *testing.T) {
	ctx := context.Background()
	s, path := openSQLite(t)
	good := runOf(t, "hatch-01", 1)
	if err := s.Record(ctx, good); err != nil {
		t.Fatal(err)
	}
	failed := store.Run{LogSHA256: strings.Repeat("f", 64), LogPath: "logs/broken.csv", SetupSHA256: good.Result.Setup.SHA256,
		Car: "hatch-01", Run: "2", Test: "drop", ToolVersion: "test", Error: "logs/broken.csv:14:3: not a number"}
	if err := s.Record(ctx, failed); err != nil {
		t.Fatal(err)
	}
	s.Close()

	db := plainSQLite(t, path)
	res := good.Result
	key := store.RunKey(res.Log.SHA256, res.Setup.SHA256, res.Tool.Version)
	var (
		logSHA, logPath, setupSHA, car, run, test, version, at, verdict, msg string
	)
	if err := db.QueryRow(`SELECT log_sha256, log_path, setup_sha256, car, run, test, tool_version, analysed_at, verdict, error
FROM runs WHERE run_key = ?`, key).Scan(&logSHA, &logPath, &setupSHA, &car, &run, &test, &version, &at, &verdict, &msg); err != nil {
		t.Fatal(err)
	}
	if logSHA != res.Log.SHA256 || logPath != res.Log.Path || setupSHA != res.Setup.SHA256 || car != "hatch-01" || run != "1" ||
		test != "drop" || version != "test" || at != "2031-05-04T09:01:00.000000Z" || verdict != res.Verdict.Status || msg != "" {
		t.Errorf("runs row: %q %q %q %q %q %q %q %q %q %q", logSHA, logPath, setupSHA, car, run, test, version, at, verdict, msg)
	}
	if err := db.QueryRow("SELECT verdict, error FROM runs WHERE log_path = 'logs/broken.csv'").Scan(&verdict, &msg); err != nil {
		t.Fatal(err)
	}
	if verdict != "error" || msg != failed.Error {
		t.Errorf("failed run: verdict %q, error %q", verdict, msg)
	}

	rows, err := db.Query(`SELECT label, natural_frequency_hz, natural_frequency_sd_hz, damping_ratio, damping_ratio_sd,
    node_m, pitch_per_bounce_rad_per_m, flagged FROM modes WHERE run_key = ? ORDER BY ordinal`, key)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	i := 0
	for ; rows.Next(); i++ {
		var (
			label     string
			f, z      float64
			fSD, zSD  sql.NullFloat64
			node, ppb sql.NullFloat64
			flagged   bool
		)
		if err := rows.Scan(&label, &f, &fSD, &z, &zSD, &node, &ppb, &flagged); err != nil {
			t.Fatal(err)
		}
		m := res.Modes[i]
		if label != m.Label || f != m.NaturalFrequencyHz || z != m.DampingRatio || flagged != m.Flagged ||
			fSD.Float64 != m.Uncertainty.NaturalFrequencyHz || zSD.Float64 != m.Uncertainty.DampingRatio ||
			node.Valid != (m.NodeM != nil) || (node.Valid && node.Float64 != *m.NodeM) ||
			ppb.Valid != (m.PitchPerBounceRadPerM != nil) || (ppb.Valid && ppb.Float64 != *m.PitchPerBounceRadPerM) {
			t.Errorf("modes row %d: %s %g %v %g %v %v %v %v; result %+v", i, label, f, fSD, z, zSD, node, ppb, flagged, m)
		}
	}
	if i != len(res.Modes) || i == 0 {
		t.Errorf("%d modes rows, want %d", i, len(res.Modes))
	}

	var kf, kr float64
	var cf, cr, kfSD, krSD sql.NullFloat64
	if err := db.QueryRow(`SELECT front_rate_n_per_m, rear_rate_n_per_m, front_damping_ns_per_m, rear_damping_ns_per_m,
    front_rate_sd_n_per_m, rear_rate_sd_n_per_m FROM rates WHERE run_key = ?`, key).Scan(&kf, &kr, &cf, &cr, &kfSD, &krSD); err != nil {
		t.Fatal(err)
	}
	u := res.Updated
	if kf != u.FrontRateNPerM || kr != u.RearRateNPerM || cf.Valid != u.DampingEstimated ||
		(cf.Valid && (cf.Float64 != u.FrontDampingNsPerM || cr.Float64 != u.RearDampingNsPerM)) ||
		kfSD.Float64 != u.Uncertainty.FrontRateNPerM || krSD.Float64 != u.Uncertainty.RearRateNPerM {
		t.Errorf("rates row: %g %g %v %v %v %v; result %+v %+v", kf, kr, cf, cr, kfSD, krSD, u, u.Uncertainty)
	}
	if n := count(t, db, "SELECT COUNT(*) FROM modes WHERE run_key <> ?", key); n != 0 {
		t.Errorf("the failed run has %d modes rows", n)
	}
	if n := count(t, db, "SELECT COUNT(*) FROM schema_version"); n != 1 {
		t.Errorf("schema_version has %d rows, want 1", n)
	}
}

// TestRecordAgainReplaces: recording the same run key again replaces the
// run and its child rows, never duplicates them.
func TestRecordAgainReplaces(t *testing.T) {
	ctx := context.Background()
	s, path := openSQLite(t)
	r := runOf(t, "hatch-01", 1)
	for i := range 3 {
		r.Meta = map[string]string{"notes": fmt.Sprint("pass ", i)}
		if i == 2 {
			r.Meta["date"] = "2031-05-04"
		}
		if err := s.Record(ctx, r); err != nil {
			t.Fatal(err)
		}
	}
	db := plainSQLite(t, path)
	if n := count(t, db, "SELECT COUNT(*) FROM runs"); n != 1 {
		t.Errorf("%d runs rows, want 1", n)
	}
	if n, want := count(t, db, "SELECT COUNT(*) FROM modes"), len(r.Result.Modes); n != want {
		t.Errorf("%d modes rows, want %d", n, want)
	}
	if n := count(t, db, "SELECT COUNT(*) FROM rates"); n != 1 {
		t.Errorf("%d rates rows, want 1", n)
	}
	runs, err := s.Runs(ctx, store.Filter{})
	if err != nil {
		t.Fatal(err)
	}
	if len(runs) != 1 || runs[0].Meta["notes"] != "pass 2" || runs[0].Meta["date"] != "2031-05-04" || len(runs[0].Meta) != 2 {
		t.Errorf("runs after re-recording: %+v", runs)
	}
}

// TestRunsRoundTrip: Runs gives back every field, the result JSON byte for
// byte, in the order of AnalysedAt then Run (numbers as numbers), and
// filters by car.
func TestRunsRoundTrip(t *testing.T) {
	ctx := context.Background()
	s, _ := openSQLite(t)
	var want []store.Run
	for _, i := range []int{10, 2, 1} {
		r := runOf(t, "hatch-01", i)
		r.AnalysedAt = time.Date(2031, 5, 4, 9, 0, 0, 0, time.UTC) // all at once: Run decides
		if err := s.Record(ctx, r); err != nil {
			t.Fatal(err)
		}
		want = append([]store.Run{r}, want...)
	}
	if err := s.Record(ctx, runOf(t, "coupe-07", 4)); err != nil {
		t.Fatal(err)
	}
	got, err := s.Runs(ctx, store.Filter{Car: "hatch-01"})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(want) {
		t.Fatalf("%d runs, want %d", len(got), len(want))
	}
	for i, g := range got {
		w := want[i]
		if g.Run != w.Run || g.Car != w.Car || !g.AnalysedAt.Equal(w.AnalysedAt) || g.Meta["notes"] != w.Meta["notes"] ||
			g.Verdict != w.Result.Verdict.Status || g.Test != "drop" || g.ToolVersion != "test" || g.LogPath != w.Result.Log.Path {
			t.Errorf("run %d: got %+v, want %+v", i, g, w)
		}
		gb, _ := g.Result.Marshal()
		wb, _ := w.Result.Marshal()
		if !bytes.Equal(gb, wb) {
			t.Errorf("run %s: the result JSON differs after the round trip", g.Run)
		}
	}
	all, err := s.Runs(ctx, store.Filter{})
	if err != nil || len(all) != 4 {
		t.Errorf("all runs: %d, %v", len(all), err)
	}
}

// TestConcurrentWriters: goroutines writing through one store and through
// a second store on the same file (as a second process would) lose
// nothing and double nothing, also when they write the same runs.
func TestConcurrentWriters(t *testing.T) {
	s, path := openSQLite(t)
	s2, err := store.Open(context.Background(), path)
	if err != nil {
		t.Fatal(err)
	}
	defer s2.Close()
	const writers, each = 8, 25
	start := time.Now()
	hammer(t, []*store.Store{s, s2}, writers, each)
	t.Logf("SQLite: %d records from %d goroutines over two stores in %v", writers*each, writers, time.Since(start))
	checkCounts(t, s, writers*each/2)
}

// hammer records each runs from every one of writers goroutines, the
// goroutines alternating between the stores; goroutines 2k and 2k+1 write
// the same runs (overlapping upserts of the same keys).
func hammer(t *testing.T, stores []*store.Store, writers, each int) {
	t.Helper()
	var wg sync.WaitGroup
	errs := make(chan error, writers*each)
	for w := range writers {
		s := stores[w%len(stores)]
		wg.Go(func() {
			for i := range each {
				r := runOf(t, fmt.Sprint("car-", w/2), (w/2)*each+i)
				if err := s.Record(context.Background(), r); err != nil {
					errs <- err
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
}

// checkCounts: the store holds exactly n runs, each with all its modes and
// one rates row.
func checkCounts(t *testing.T, s *store.Store, n int) {
	t.Helper()
	runs, err := s.Runs(context.Background(), store.Filter{})
	if err != nil {
		t.Fatal(err)
	}
	if len(runs) != n {
		t.Errorf("%d runs, want %d", len(runs), n)
	}
	seen := map[string]bool{}
	for _, r := range runs {
		if seen[r.RunKey] {
			t.Errorf("run key %s twice", r.RunKey)
		}
		seen[r.RunKey] = true
		if r.Result == nil || len(r.Result.Modes) == 0 || r.Meta["notes"] == "" {
			t.Errorf("run %s lost its result or metadata", r.Run)
		}
	}
}

// TestOpenErrors: a folder, a missing folder, or a file that is not a
// database are refused with a message that says what to do, and the file is
// left as it was.
func TestOpenErrors(t *testing.T) {
	dir := t.TempDir()
	notDB := filepath.Join(dir, "log.csv")
	content := []byte("time [s],a [m/s^2]\n0,1\n")
	if err := os.WriteFile(notDB, content, 0o644); err != nil {
		t.Fatal(err)
	}
	for target, want := range map[string]string{
		dir:                              "is a folder",
		filepath.Join(dir, "no", "c.db"): "does not exist",
		notDB:                            "not a database",
		"":                               "no store given",
		"mysql://host/db":                "postgres:// URL",
	} {
		s, err := store.Open(context.Background(), target)
		if err == nil {
			s.Close()
			t.Errorf("Open(%q) succeeded", target)
		} else if !strings.Contains(err.Error(), want) {
			t.Errorf("Open(%q): %v, want it to say %q", target, err, want)
		}
	}
	if got, _ := os.ReadFile(notDB); !bytes.Equal(got, content) {
		t.Errorf("the file that is not a database was changed")
	}
}

// TestNewerSchemaRefused: a store whose schema is newer than this program
// knows is refused, not migrated down or written.
func TestNewerSchemaRefused(t *testing.T) {
	s, path := openSQLite(t)
	s.Close()
	db := plainSQLite(t, path)
	if _, err := db.Exec("INSERT INTO schema_version (version, name, applied_at) VALUES (99, '0099_future.sql', 'x')"); err != nil {
		t.Fatal(err)
	}
	if _, err := store.Open(context.Background(), path); err == nil || !strings.Contains(err.Error(), "newer ridemodes") {
		t.Errorf("Open of a newer store: %v", err)
	}
}

// TestBadVerdictRefused: a verdict outside the contract's words is refused.
func TestBadVerdictRefused(t *testing.T) {
	s, _ := openSQLite(t)
	r := runOf(t, "hatch-01", 1)
	r.Verdict = "ok"
	if err := s.Record(context.Background(), r); err == nil || !strings.Contains(err.Error(), "inconclusive") {
		t.Errorf("Record with verdict ok: %v", err)
	}
}

// TestRecordResultPooled: analyze --store of a pooled result (several logs,
// no single log) names the run after its logs joined by "+", keeps their
// paths joined by ";" and hashes their hashes; the car falls back to the
// setup file's name.
func TestRecordResultPooled(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "campaign.sqlite")
	res := result(t)
	a, b := *res.Log, *res.Log
	a.Path, a.SHA256 = "logs/drop-1.csv", strings.Repeat("a", 64)
	b.Path, b.SHA256 = "logs/drop-2.csv", strings.Repeat("b", 64)
	res.Log = nil
	res.Runs = []compare.RunJSON{{Log: &a}, {Log: &b}}
	res.Setup.Path = "setups/hatch.toml"
	if err := store.RecordResult(ctx, path, "", res); err != nil {
		t.Fatal(err)
	}
	s, err := store.OpenExisting(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	runs, err := s.Runs(ctx, store.Filter{})
	if err != nil || len(runs) != 1 {
		t.Fatalf("runs %v, %v", runs, err)
	}
	// The pooled log hash: SHA-256 of the logs' hashes joined by a newline.
	h := sha256.Sum256([]byte(a.SHA256 + "\n" + b.SHA256))
	r := runs[0]
	if r.Run != "drop-1+drop-2" || r.Car != "hatch" || r.LogPath != "logs/drop-1.csv;logs/drop-2.csv" || r.LogSHA256 != hex.EncodeToString(h[:]) ||
		r.RunKey != store.RunKey(r.LogSHA256, res.Setup.SHA256, res.Tool.Version) {
		t.Errorf("pooled run %+v", r)
	}
}
