package store

import (
	"fmt"
	"net/url"
	"strconv"
	"strings"
	"time"

	// The two database/sql drivers: "sqlite" (pure Go) and "pgx".
	_ "github.com/jackc/pgx/v5/stdlib"
	_ "modernc.org/sqlite"
)

// dialect holds everything that differs between SQLite and PostgreSQL: the
// driver and its connection string, the placeholder style, the time type and
// how a time is bound and read back, and the lock that serialises schema
// migrations. Every query of the package is written once, with ? placeholders,
// in the SQL that both speak (ON CONFLICT upserts included).
type dialect struct {
	name   string
	driver string
	dsn    string
	// timestamp is the SQL type of analysed_at: TEXT holding a fixed-width
	// UTC ISO 8601 time in SQLite (so that it sorts as text and SQLite's date
	// functions read it), TIMESTAMPTZ in PostgreSQL.
	timestamp string
	// migrationLock is run first in the migration transaction so that two
	// processes opening a new store at once do not both migrate it. SQLite
	// needs none: its transactions begin IMMEDIATE (one writer at a time).
	migrationLock string
	dollar        bool // placeholders $1, $2, ... instead of ?
}

// sqliteTime is the fixed-width text form of a time in SQLite: UTC with
// microseconds, the precision of PostgreSQL's TIMESTAMPTZ.
const sqliteTime = "2006-01-02T15:04:05.000000Z"

// busyTimeoutMs is how long an SQLite writer waits for another writer's
// transaction before giving up, in ms.
const busyTimeoutMs = 30000

// dialectFor chooses the dialect from a store target: a postgres:// or
// postgresql:// URL, else a file path.
func dialectFor(target string) (dialect, error) {
	if u, err := url.Parse(target); err == nil && (u.Scheme == "postgres" || u.Scheme == "postgresql") {
		return dialect{
			name: "postgres", driver: "pgx", dsn: target,
			timestamp: "TIMESTAMPTZ",
			// Any fixed key: it only has to be the same for every ridemodes store.
			migrationLock: "SELECT pg_advisory_xact_lock(7306112)",
			dollar:        true,
		}, nil
	}
	if target == "" {
		return dialect{}, fmt.Errorf("store: no store given: name an SQLite file (campaign.sqlite) or a postgres:// URL")
	}
	if strings.ContainsAny(target, "?#") || strings.Contains(target, "://") {
		return dialect{}, fmt.Errorf("store: %q is neither a file path without ? or # nor a postgres:// URL", target)
	}
	// WAL lets readers work beside the one writer; busy_timeout makes a
	// writer wait for another (in this process or another one) instead of
	// failing; IMMEDIATE transactions take the write lock at BEGIN, so a
	// transaction never has to be retried halfway.
	dsn := target + "?_pragma=busy_timeout(" + strconv.Itoa(busyTimeoutMs) + ")" +
		"&_pragma=journal_mode(WAL)&_pragma=foreign_keys(1)&_txlock=immediate"
	return dialect{name: "sqlite", driver: "sqlite", dsn: dsn, timestamp: "TEXT"}, nil
}

// rebind turns the ? placeholders of q into the dialect's.
func (d dialect) rebind(q string) string {
	if !d.dollar {
		return q
	}
	var b strings.Builder
	n := 0
	for _, r := range q {
		if r == '?' {
			n++
			b.WriteString("$" + strconv.Itoa(n))
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}

// timeArg is t as the dialect binds it.
func (d dialect) timeArg(t time.Time) any {
	t = t.UTC().Truncate(time.Microsecond)
	if d.name == "sqlite" {
		return t.Format(sqliteTime)
	}
	return t
}

// readTime turns a scanned analysed_at back into a time.
func (d dialect) readTime(v any) (time.Time, error) {
	switch v := v.(type) {
	case time.Time:
		return v.UTC(), nil
	case string:
		return time.Parse(sqliteTime, v)
	case []byte:
		return time.Parse(sqliteTime, string(v))
	}
	return time.Time{}, fmt.Errorf("store: analysed_at holds %T, not a time", v)
}
