package store_test

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"testing"
	"time"

	"github.com/ridemodes/ridemodes/compare/store"
)

// The environment variables that turn the test binary into one shard
// process of TestTwoProcesses: the store target, the shard (0 or 1) and the
// number of runs.
const (
	envTarget = "RIDEMODES_STORE_TEST_TARGET"
	envShard  = "RIDEMODES_STORE_TEST_SHARD"
	envRuns   = "RIDEMODES_STORE_TEST_RUNS"
)

func TestMain(m *testing.M) {
	if target := os.Getenv(envTarget); target != "" {
		if err := shardProcess(target); err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// shardProcess opens the store itself (a new store: both processes race to
// create and migrate it) and records its shard's runs: every other run of
// 0..n-1 by run number, and the last quarter by both shards (the same keys
// upserted from two processes).
func shardProcess(target string) error {
	shard, err := strconv.Atoi(os.Getenv(envShard))
	if err != nil {
		return err
	}
	n, err := strconv.Atoi(os.Getenv(envRuns))
	if err != nil {
		return err
	}
	ctx := context.Background()
	s, err := store.Open(ctx, target)
	if err != nil {
		return err
	}
	defer s.Close()
	for i := range n {
		if i%2 != shard && i < n*3/4 {
			continue
		}
		r, err := runOrErr(fmt.Sprint("car-", i%3), i)
		if err != nil {
			return err
		}
		if err := s.Record(ctx, r); err != nil {
			return err
		}
	}
	return nil
}

// twoProcesses runs two shard processes (this test binary again) into target
// at once and checks that the store holds each of the n runs exactly once.
func twoProcesses(t *testing.T, target string, n int) {
	start := time.Now()
	var cmds []*exec.Cmd
	for shard := range 2 {
		cmd := exec.Command(os.Args[0], "-test.run=^$")
		cmd.Env = append(os.Environ(), envTarget+"="+target, envShard+"="+strconv.Itoa(shard), envRuns+"="+strconv.Itoa(n))
		cmd.Stdout, cmd.Stderr = os.Stderr, os.Stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		cmds = append(cmds, cmd)
	}
	for i, cmd := range cmds {
		if err := cmd.Wait(); err != nil {
			t.Errorf("shard process %d: %v", i, err)
		}
	}
	t.Logf("two processes recorded %d runs (%d upserts) in %v", n, n+n/4, time.Since(start))
	s, err := store.Open(context.Background(), target)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	checkCounts(t, s, n)
}

// TestTwoProcessesSQLite: two processes writing one new SQLite file at once
// lose nothing and double nothing.
func TestTwoProcessesSQLite(t *testing.T) {
	twoProcesses(t, t.TempDir()+"/campaign.sqlite", 80)
}
