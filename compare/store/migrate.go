package store

import (
	"context"
	"database/sql"
	"embed"
	"fmt"
	"io/fs"
	"strconv"
	"strings"
	"time"
)

// migrationFiles are the schema's versions, one numbered SQL file each
// (NNNN_what.sql, numbered from 1 without gaps); a file is never edited once
// released, a change is a new file.
//
//go:embed migrations/*.sql
var migrationFiles embed.FS

// migration is one numbered schema change.
type migration struct {
	version int
	name    string
	sql     string
}

// loadMigrations reads the embedded files in version order.
func loadMigrations(files fs.FS) ([]migration, error) {
	entries, err := fs.ReadDir(files, "migrations")
	if err != nil {
		return nil, err
	}
	var ms []migration
	for _, e := range entries {
		num, _, ok := strings.Cut(e.Name(), "_")
		v, err := strconv.Atoi(num)
		if !ok || err != nil || !strings.HasSuffix(e.Name(), ".sql") {
			return nil, fmt.Errorf("store: migration %s is not named NNNN_what.sql", e.Name())
		}
		if v != len(ms)+1 {
			return nil, fmt.Errorf("store: migration %s has version %d, want %d", e.Name(), v, len(ms)+1)
		}
		b, err := fs.ReadFile(files, "migrations/"+e.Name())
		if err != nil {
			return nil, err
		}
		ms = append(ms, migration{version: v, name: e.Name(), sql: string(b)})
	}
	return ms, nil
}

// statements splits a migration into its statements: comment lines are
// dropped and a statement ends with a line that ends in ";". The dialect's
// types replace the {{...}} names.
func (d dialect) statements(src string) []string {
	src = strings.ReplaceAll(src, "{{timestamp}}", d.timestamp)
	var out []string
	var cur strings.Builder
	for line := range strings.Lines(src) {
		t := strings.TrimSpace(line)
		if t == "" || strings.HasPrefix(t, "--") {
			continue
		}
		cur.WriteString(line)
		if strings.HasSuffix(t, ";") {
			out = append(out, strings.TrimSpace(cur.String()))
			cur.Reset()
		}
	}
	if s := strings.TrimSpace(cur.String()); s != "" {
		out = append(out, s)
	}
	return out
}

// migrate brings the schema up to the newest version in one transaction,
// recording each applied version in schema_version. A store written by a
// newer ridemodes (a version this one does not know) is refused, not touched.
func migrate(ctx context.Context, db *sql.DB, d dialect, ms []migration) error {
	tx, err := db.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	defer tx.Rollback()
	if d.migrationLock != "" {
		if _, err := tx.ExecContext(ctx, d.migrationLock); err != nil {
			return err
		}
	}
	if _, err := tx.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_version (
    version    INTEGER PRIMARY KEY,
    name       TEXT NOT NULL,
    applied_at TEXT NOT NULL
)`); err != nil {
		return err
	}
	var current int
	if err := tx.QueryRowContext(ctx, "SELECT COALESCE(MAX(version), 0) FROM schema_version").Scan(&current); err != nil {
		return err
	}
	if current > len(ms) {
		return fmt.Errorf("store: schema version %d was written by a newer ridemodes (this one knows up to %d): use that version or a newer one", current, len(ms))
	}
	for _, m := range ms[current:] {
		for _, st := range d.statements(m.sql) {
			if _, err := tx.ExecContext(ctx, st); err != nil {
				return fmt.Errorf("store: migration %s: %w", m.name, err)
			}
		}
		if _, err := tx.ExecContext(ctx, d.rebind("INSERT INTO schema_version (version, name, applied_at) VALUES (?, ?, ?)"),
			m.version, m.name, time.Now().UTC().Format(sqliteTime)); err != nil {
			return err
		}
	}
	return tx.Commit()
}
