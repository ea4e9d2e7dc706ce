package store

import (
	"cmp"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"github.com/ridemodes/ridemodes/compare"
)

// VerdictError is the verdict of a log that could not be analysed.
const VerdictError = "error"

// Store is a campaign's record of runs, safe for concurrent use by several
// goroutines and by several processes at once.
type Store struct {
	db *sql.DB
	d  dialect
}

// Open opens (creating and migrating as needed) the store at target: a file
// path is an embedded SQLite database (modernc.org/sqlite, pure Go); a
// postgres:// or postgresql:// URL is a PostgreSQL server (jackc/pgx/v5 via its
// database/sql driver "pgx" from github.com/jackc/pgx/v5/stdlib).
func Open(ctx context.Context, target string) (*Store, error) {
	return open(ctx, target, true)
}

// OpenExisting is Open for a reader: an SQLite file must exist already (a
// mistyped path is an error, not a new empty store).
func OpenExisting(ctx context.Context, target string) (*Store, error) {
	return open(ctx, target, false)
}

func open(ctx context.Context, target string, create bool) (*Store, error) {
	d, err := dialectFor(target)
	if err != nil {
		return nil, err
	}
	where := target
	if d.name == "sqlite" {
		if err := checkFilePath(target); err != nil {
			return nil, err
		}
		if _, err := os.Stat(target); !create && err != nil {
			return nil, fmt.Errorf("store %s does not exist: record runs into it first (analyze --store, batch --store)", target)
		}
	} else if u, err := url.Parse(target); err == nil {
		where = u.Redacted()
	}
	ms, err := loadMigrations(migrationFiles)
	if err != nil {
		return nil, err
	}
	db, err := sql.Open(d.driver, d.dsn)
	if err != nil {
		return nil, fmt.Errorf("store %s: %w", where, err)
	}
	// Two processes opening a new SQLite file at once (the shards of a
	// batch) can meet SQLITE_BUSY while one switches the file to WAL, which
	// SQLite's busy handler does not wait for: retry, for as long as a
	// writer would wait.
	deadline := time.Now().Add(busyTimeoutMs * time.Millisecond)
	for pause := 10 * time.Millisecond; ; pause = min(2*pause, 500*time.Millisecond) {
		err = db.PingContext(ctx)
		if err == nil {
			err = migrate(ctx, db, d, ms)
		}
		if err == nil || !busy(err) || time.Now().After(deadline) {
			break
		}
		select {
		case <-ctx.Done():
			err = ctx.Err()
		case <-time.After(pause):
			continue
		}
		break
	}
	if err != nil {
		db.Close()
		return nil, fmt.Errorf("store %s: cannot open it: %w", where, err)
	}
	return &Store{db: db, d: d}, nil
}

// busy reports whether err is SQLite's "another connection holds the lock".
func busy(err error) bool {
	return strings.Contains(err.Error(), "SQLITE_BUSY") || strings.Contains(err.Error(), "database is locked")
}

// checkFilePath refuses an SQLite target whose folder is missing or that is
// a folder, with a message that says so (SQLite's own is vague).
func checkFilePath(path string) error {
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return fmt.Errorf("store %s is a folder: name a file in it, such as %s", path, filepath.Join(path, "campaign.sqlite"))
	}
	dir := filepath.Dir(path)
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		return fmt.Errorf("store %s: the folder %s does not exist: create it first", path, dir)
	}
	return nil
}

// Close closes the store.
func (s *Store) Close() error { return s.db.Close() }

// Run is one analysed (or failed) log.
type Run struct {
	// RunKey is RunKey(LogSHA256, SetupSHA256, ToolVersion); Car and Run
	// name the car and the run within its campaign; Test is rig or drop.
	RunKey, LogSHA256, LogPath, SetupSHA256, Car, Run, Test, ToolVersion string

	AnalysedAt time.Time
	Verdict    string            // pass | fail | inconclusive | none | error
	Error      string            // the message of a failed log
	Meta       map[string]string // manifest metadata columns (date, notes, ...)
	Result     *compare.Result   // nil for a failed log
}

// RunKey identifies log content + setup content + tool version: the hex
// SHA-256 of the three joined by newlines (the hashes as hex text).
func RunKey(logSHA256, setupSHA256, toolVersion string) string {
	h := sha256.Sum256([]byte(logSHA256 + "\n" + setupSHA256 + "\n" + toolVersion))
	return hex.EncodeToString(h[:])
}

// complete fills r's empty fields from its result (hashes, paths, test,
// tool version, verdict), the verdict of a failed log ("error"), the time
// (now) and the run key (RunKey of the hashes and version), and checks the
// verdict.
func (r *Run) complete() error {
	if res := r.Result; res != nil {
		path, sha := resultLog(res)
		r.LogPath = cmp.Or(r.LogPath, path)
		r.LogSHA256 = cmp.Or(r.LogSHA256, sha)
		if res.Setup != nil {
			r.SetupSHA256 = cmp.Or(r.SetupSHA256, res.Setup.SHA256)
		}
		r.Test = cmp.Or(r.Test, res.Test)
		r.ToolVersion = cmp.Or(r.ToolVersion, res.Tool.Version)
		if r.Verdict == "" && res.Verdict != nil {
			r.Verdict = res.Verdict.Status
		}
	}
	if r.Verdict == "" && r.Error != "" {
		r.Verdict = VerdictError
	}
	r.Verdict = cmp.Or(r.Verdict, compare.StatusNone)
	switch r.Verdict {
	case compare.StatusPass, compare.StatusFail, compare.StatusInconclusive, compare.StatusNone, VerdictError:
	default:
		return fmt.Errorf("store: run %q has the verdict %q: want pass, fail, inconclusive, none or error", r.Run, r.Verdict)
	}
	if r.AnalysedAt.IsZero() {
		r.AnalysedAt = time.Now()
	}
	r.RunKey = cmp.Or(r.RunKey, RunKey(r.LogSHA256, r.SetupSHA256, r.ToolVersion))
	return nil
}

// resultLog is the log path and content hash of a result; a pooled result
// (several logs) gives its logs' paths joined by ";" and the SHA-256 of
// their hashes joined by newlines, in the order of the logs.
func resultLog(res *compare.Result) (path, sha string) {
	if res.Log != nil {
		return res.Log.Path, res.Log.SHA256
	}
	if len(res.Runs) == 0 {
		return "", ""
	}
	var paths, shas []string
	for _, r := range res.Runs {
		if r.Log != nil {
			paths = append(paths, r.Log.Path)
			shas = append(shas, r.Log.SHA256)
		}
	}
	h := sha256.Sum256([]byte(strings.Join(shas, "\n")))
	return strings.Join(paths, ";"), hex.EncodeToString(h[:])
}

// Record stores a run in one transaction, replacing any run with the same
// RunKey (its modes, rates and metadata included). Empty fields are filled
// from r.Result where it has them; an empty RunKey is RunKey of the hashes
// and tool version; a zero AnalysedAt is now. Times are kept to the
// microsecond, in UTC.
func (s *Store) Record(ctx context.Context, r Run) error {
	if err := r.complete(); err != nil {
		return err
	}
	var resultJSON sql.NullString
	if r.Result != nil {
		b, err := json.Marshal(r.Result)
		if err != nil {
			return fmt.Errorf("store: run %q: %w", r.Run, err)
		}
		resultJSON = sql.NullString{String: string(b), Valid: true}
	}
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	defer tx.Rollback()
	exec := func(q string, args ...any) error {
		_, err := tx.ExecContext(ctx, s.d.rebind(q), args...)
		return err
	}
	if err := exec(`INSERT INTO runs (run_key, log_sha256, log_path, setup_sha256, car, run, test, tool_version, analysed_at, verdict, error, result_json)
VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)
ON CONFLICT (run_key) DO UPDATE SET
    log_sha256 = excluded.log_sha256, log_path = excluded.log_path, setup_sha256 = excluded.setup_sha256,
    car = excluded.car, run = excluded.run, test = excluded.test, tool_version = excluded.tool_version,
    analysed_at = excluded.analysed_at, verdict = excluded.verdict, error = excluded.error,
    result_json = excluded.result_json`,
		r.RunKey, r.LogSHA256, r.LogPath, r.SetupSHA256, r.Car, r.Run, r.Test, r.ToolVersion,
		s.d.timeArg(r.AnalysedAt), r.Verdict, r.Error, resultJSON); err != nil {
		return fmt.Errorf("store: recording run %q: %w", r.Run, err)
	}
	for _, table := range []string{"modes", "rates", "run_meta"} {
		if err := exec("DELETE FROM "+table+" WHERE run_key = ?", r.RunKey); err != nil {
			return fmt.Errorf("store: recording run %q: %w", r.Run, err)
		}
	}
	if err := insertChildren(exec, r); err != nil {
		return fmt.Errorf("store: recording run %q: %w", r.Run, err)
	}
	return tx.Commit()
}

// insertChildren writes r's modes, rates and metadata rows.
func insertChildren(exec func(q string, args ...any) error, r Run) error {
	if res := r.Result; res != nil {
		for i, m := range res.Modes {
			var fSD, zSD *float64
			if u := m.Uncertainty; u != nil {
				fSD, zSD = compare.Finite(u.NaturalFrequencyHz), compare.Finite(u.DampingRatio)
			}
			if err := exec(`INSERT INTO modes (run_key, ordinal, label, natural_frequency_hz, natural_frequency_sd_hz,
    damping_ratio, damping_ratio_sd, node_m, pitch_per_bounce_rad_per_m, flagged)
VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
				r.RunKey, i, m.Label, m.NaturalFrequencyHz, fSD, m.DampingRatio, zSD,
				m.NodeM, m.PitchPerBounceRadPerM, m.Flagged); err != nil {
				return err
			}
		}
		if u := res.Updated; u != nil {
			var cf, cr, kfSD, krSD *float64
			if u.DampingEstimated {
				cf, cr = &u.FrontDampingNsPerM, &u.RearDampingNsPerM
			}
			if s := u.Uncertainty; s != nil {
				kfSD, krSD = compare.Finite(s.FrontRateNPerM), compare.Finite(s.RearRateNPerM)
			}
			if err := exec(`INSERT INTO rates (run_key, front_rate_n_per_m, rear_rate_n_per_m, front_damping_ns_per_m,
    rear_damping_ns_per_m, front_rate_sd_n_per_m, rear_rate_sd_n_per_m)
VALUES (?, ?, ?, ?, ?, ?, ?)`,
				r.RunKey, u.FrontRateNPerM, u.RearRateNPerM, cf, cr, kfSD, krSD); err != nil {
				return err
			}
		}
	}
	keys := make([]string, 0, len(r.Meta))
	for k := range r.Meta {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		if err := exec("INSERT INTO run_meta (run_key, key, value) VALUES (?, ?, ?)", r.RunKey, k, r.Meta[k]); err != nil {
			return err
		}
	}
	return nil
}

// Cars returns the cars of the store's runs, sorted.
func (s *Store) Cars(ctx context.Context) ([]string, error) {
	rows, err := s.db.QueryContext(ctx, "SELECT DISTINCT car FROM runs ORDER BY car")
	if err != nil {
		return nil, fmt.Errorf("store: reading cars: %w", err)
	}
	defer rows.Close()
	var cars []string
	for rows.Next() {
		var c string
		if err := rows.Scan(&c); err != nil {
			return nil, fmt.Errorf("store: reading cars: %w", err)
		}
		cars = append(cars, c)
	}
	return cars, rows.Err()
}

// Filter selects runs; zero fields select all.
type Filter struct{ Car string }

// where is f as a WHERE clause over runs (aliased r) and its arguments.
func (f Filter) where() (string, []any) {
	if f.Car == "" {
		return "", nil
	}
	return " WHERE r.car = ?", []any{f.Car}
}

// Runs returns the runs that f selects, ordered by AnalysedAt then Run
// (numbers within run names compared as numbers: run 2 before run 10), each
// with its Result re-read.
func (s *Store) Runs(ctx context.Context, f Filter) ([]Run, error) {
	where, args := f.where()
	rows, err := s.db.QueryContext(ctx, s.d.rebind(`SELECT r.run_key, r.log_sha256, r.log_path, r.setup_sha256, r.car, r.run, r.test,
    r.tool_version, r.analysed_at, r.verdict, r.error, r.result_json FROM runs r`+where), args...)
	if err != nil {
		return nil, fmt.Errorf("store: reading runs: %w", err)
	}
	defer rows.Close()
	var runs []Run
	index := map[string]int{}
	for rows.Next() {
		var (
			r      Run
			at     any
			result sql.NullString
		)
		if err := rows.Scan(&r.RunKey, &r.LogSHA256, &r.LogPath, &r.SetupSHA256, &r.Car, &r.Run, &r.Test,
			&r.ToolVersion, &at, &r.Verdict, &r.Error, &result); err != nil {
			return nil, fmt.Errorf("store: reading runs: %w", err)
		}
		if r.AnalysedAt, err = s.d.readTime(at); err != nil {
			return nil, fmt.Errorf("store: run %s: %w", r.RunKey, err)
		}
		if result.Valid {
			r.Result = new(compare.Result)
			if err := json.Unmarshal([]byte(result.String), r.Result); err != nil {
				return nil, fmt.Errorf("store: run %s: its result JSON: %w", r.RunKey, err)
			}
		}
		index[r.RunKey] = len(runs)
		runs = append(runs, r)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("store: reading runs: %w", err)
	}
	rows.Close()
	if err := s.readMeta(ctx, f, runs, index); err != nil {
		return nil, err
	}
	slices.SortStableFunc(runs, func(a, b Run) int {
		return cmp.Or(a.AnalysedAt.Compare(b.AnalysedAt), naturalCompare(a.Run, b.Run), strings.Compare(a.RunKey, b.RunKey))
	})
	return runs, nil
}

// readMeta fills the metadata of runs (indexed by run key).
func (s *Store) readMeta(ctx context.Context, f Filter, runs []Run, index map[string]int) error {
	where, args := f.where()
	rows, err := s.db.QueryContext(ctx, s.d.rebind(`SELECT m.run_key, m.key, m.value FROM run_meta m
JOIN runs r ON r.run_key = m.run_key`+where), args...)
	if err != nil {
		return fmt.Errorf("store: reading run metadata: %w", err)
	}
	defer rows.Close()
	for rows.Next() {
		var key, k, v string
		if err := rows.Scan(&key, &k, &v); err != nil {
			return fmt.Errorf("store: reading run metadata: %w", err)
		}
		i, ok := index[key]
		if !ok {
			continue // recorded after the runs were read
		}
		if runs[i].Meta == nil {
			runs[i].Meta = map[string]string{}
		}
		runs[i].Meta[k] = v
	}
	return rows.Err()
}

// naturalCompare orders strings with their runs of digits compared as
// numbers ("run 2" < "run 10").
func naturalCompare(a, b string) int {
	for a != "" && b != "" {
		da, db := digitPrefix(a), digitPrefix(b)
		if da != "" && db != "" {
			na, nb := strings.TrimLeft(da, "0"), strings.TrimLeft(db, "0")
			if c := cmp.Or(cmp.Compare(len(na), len(nb)), strings.Compare(na, nb)); c != 0 {
				return c
			}
			a, b = a[len(da):], b[len(db):]
			continue
		}
		if a[0] != b[0] {
			return cmp.Compare(a[0], b[0])
		}
		a, b = a[1:], b[1:]
	}
	return cmp.Compare(len(a), len(b))
}

// digitPrefix is the leading run of ASCII digits of s.
func digitPrefix(s string) string {
	i := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
	}
	return s[:i]
}

// RecordResult opens the store at target, records one analysed result and
// closes the store: the run of `analyze --store`. The run is named after its
// log file (a pooled result: its logs' names joined by "+"); car is the
// setup's vehicle name, or when empty the setup file's name, both without
// their extensions.
func RecordResult(ctx context.Context, target, car string, res *compare.Result) error {
	var names []string
	if res.Log != nil {
		names = append(names, baseName(res.Log.Path))
	}
	for _, r := range res.Runs {
		if r.Log != nil {
			names = append(names, baseName(r.Log.Path))
		}
	}
	if car == "" && res.Setup != nil {
		car = baseName(res.Setup.Path)
	}
	s, err := Open(ctx, target)
	if err != nil {
		return err
	}
	err = s.Record(ctx, Run{Car: car, Run: strings.Join(names, "+"), Result: res})
	return errors.Join(err, s.Close())
}

// baseName is a path's file name without its extension.
func baseName(path string) string {
	b := filepath.Base(path)
	return strings.TrimSuffix(b, filepath.Ext(b))
}
