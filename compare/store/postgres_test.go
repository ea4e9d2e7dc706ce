package store_test

import (
	"context"
	"database/sql"
	"fmt"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/ridemodes/ridemodes/compare/store"
)

// postgresBin finds the newest PostgreSQL server binaries of Debian's
// postgresql package.
func postgresBin() string {
	found, _ := filepath.Glob("/usr/lib/postgresql/*/bin/initdb")
	slices.SortFunc(found, func(a, b string) int {
		va, _ := strconv.Atoi(filepath.Base(filepath.Dir(filepath.Dir(a))))
		vb, _ := strconv.Atoi(filepath.Base(filepath.Dir(filepath.Dir(b))))
		return va - vb
	})
	if len(found) == 0 {
		return ""
	}
	return filepath.Dir(found[len(found)-1])
}

// startPostgres starts a throw-away PostgreSQL server of its own: a new
// cluster in a temporary folder, listening on a Unix socket in that folder
// only (no TCP), run as the postgres user when the test runs as root (the
// server refuses root); stopped and removed at the end of the test. It
// returns the store URL. Without the binaries the test is skipped, or fails
// when CI is set.
func startPostgres(t *testing.T) string {
	t.Helper()
	bin := postgresBin()
	if bin == "" {
		msg := "PostgreSQL server binaries not found under /usr/lib/postgresql/*/bin: install them with apt-get install postgresql"
		if os.Getenv("CI") != "" {
			t.Fatal(msg)
		}
		t.Skip(msg)
	}
	dir, err := os.MkdirTemp("", "ridemodes-pg")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(dir) })
	var asUser []string
	if os.Geteuid() == 0 {
		u, err := user.Lookup("postgres")
		if err != nil {
			t.Fatalf("running as root, and there is no postgres user to run the server as: %v", err)
		}
		uid, _ := strconv.Atoi(u.Uid)
		gid, _ := strconv.Atoi(u.Gid)
		if err := os.Chown(dir, uid, gid); err != nil {
			t.Fatal(err)
		}
		asUser = []string{"runuser", "-u", "postgres", "--"}
	}
	run := func(name string, args ...string) {
		t.Helper()
		argv := append(slices.Clone(asUser), append([]string{filepath.Join(bin, name)}, args...)...)
		out, err := exec.Command(argv[0], argv[1:]...).CombinedOutput()
		if err != nil {
			t.Fatalf("%s: %v\n%s", strings.Join(argv, " "), err, out)
		}
	}
	data := filepath.Join(dir, "data")
	start := time.Now()
	run("initdb", "-D", data, "-U", "postgres", "-A", "trust", "-E", "UTF8", "--no-sync")
	run("pg_ctl", "-D", data, "-l", filepath.Join(dir, "server.log"), "-w", "-o",
		fmt.Sprintf("-c listen_addresses='' -k %s -c fsync=off", dir), "start")
	t.Cleanup(func() { run("pg_ctl", "-D", data, "-w", "-m", "fast", "stop") })
	url := "postgres://postgres@/postgres?host=" + dir
	db, err := sql.Open("pgx", url)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var version string
	if err := db.QueryRow("SHOW server_version").Scan(&version); err != nil {
		t.Fatal(err)
	}
	t.Logf("PostgreSQL %s started in %v", version, time.Since(start))
	return url
}

// TestPostgreSQL: two shard processes at once into a new database of a real
// server (both racing to migrate it), goroutines over two stores, then
// re-recording, all read back with plain SQL: nothing lost or doubled.
func TestPostgreSQL(t *testing.T) {
	url := startPostgres(t)
	twoProcesses(t, url, 80)

	s, err := store.Open(context.Background(), url)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	s2, err := store.Open(context.Background(), url)
	if err != nil {
		t.Fatal(err)
	}
	defer s2.Close()
	start := time.Now()
	hammer(t, []*store.Store{s, s2}, 8, 25) // runs 0..99 of car-0..car-3: overlaps the processes' runs
	t.Logf("PostgreSQL: 200 records from 8 goroutines over two stores in %v", time.Since(start))

	db, err := sql.Open("pgx", url)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var runs, modes, rates, meta, versions int
	if err := db.QueryRow(`SELECT (SELECT COUNT(*) FROM runs), (SELECT COUNT(*) FROM modes), (SELECT COUNT(*) FROM rates),
    (SELECT COUNT(*) FROM run_meta), (SELECT COUNT(*) FROM schema_version)`).Scan(&runs, &modes, &rates, &meta, &versions); err != nil {
		t.Fatal(err)
	}
	// 80 runs of the processes (car-i%3, log i) and 100 of the goroutines
	// (car-w/2, log i): different keys where the log hashes differ, i.e.
	// logs 80..99 add 20 runs; logs 0..79 are the same content (same key)
	// and replace.
	nModes := len(result(t).Modes)
	if runs != 100 || modes != 100*nModes || rates != 100 || meta != 100 || versions != 1 {
		t.Errorf("runs %d, modes %d, rates %d, run_meta %d, schema_version %d; want 100, %d, 100, 100, 1",
			runs, modes, rates, meta, versions, 100*nModes)
	}
	var at time.Time
	if err := db.QueryRow("SELECT analysed_at FROM runs WHERE log_path = 'logs/car-0-1.csv'").Scan(&at); err != nil {
		t.Fatal(err)
	}
	if want := time.Date(2031, 5, 4, 9, 1, 0, 0, time.UTC); !at.Equal(want) {
		t.Errorf("analysed_at %v, want %v", at, want)
	}
	checkCounts(t, s, 100)
}
