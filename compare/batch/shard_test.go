package batch_test

import (
	"fmt"
	"slices"
	"strings"
	"testing"

	"github.com/ridemodes/ridemodes/compare/batch"
)

func TestParseShard(t *testing.T) {
	for _, c := range []struct {
		text string
		want batch.Shard
		err  string
	}{
		{"1/4", batch.Shard{Index: 1, Count: 4}, ""},
		{" 4 / 4 ", batch.Shard{Index: 4, Count: 4}, ""},
		{"1/1", batch.Shard{Index: 1, Count: 1}, ""},
		{"0/4", batch.Shard{}, "between 1 and"},
		{"5/4", batch.Shard{}, "between 1 and"},
		{"1/0", batch.Shard{}, "between 1 and"},
		{"2", batch.Shard{}, "write I/N"},
		{"a/b", batch.Shard{}, "write I/N"},
	} {
		got, err := batch.ParseShard(c.text)
		if got != c.want || (err == nil) != (c.err == "") || (err != nil && !strings.Contains(err.Error(), c.err)) {
			t.Errorf("%q: %v, %v; want %v, an error naming %q", c.text, got, err, c.want, c.err)
		}
	}
}

// TestShardsCoverCampaignOnce: the N shards of a campaign hold every item
// once, each shard every N-th item in the campaign's order.
func TestShardsCoverCampaignOnce(t *testing.T) {
	c := &batch.Campaign{}
	for i := range 11 {
		c.Items = append(c.Items, batch.Item{Log: fmt.Sprintf("%02d.csv", i)})
	}
	for n := 1; n <= 12; n++ {
		var all []string
		for i := 1; i <= n; i++ {
			part := c.Select(batch.Shard{Index: i, Count: n}).Items
			for j := range part {
				if want := c.Items[i-1+j*n].Log; part[j].Log != want {
					t.Fatalf("shard %d/%d item %d: %s, want %s", i, n, j, part[j].Log, want)
				}
				all = append(all, part[j].Log)
			}
		}
		slices.Sort(all)
		if len(all) != len(c.Items) || slices.Compact(all) == nil || len(slices.Compact(all)) != len(c.Items) {
			t.Errorf("%d shards: %d items in all, want each of %d once", n, len(all), len(c.Items))
		}
	}
	if got := c.Select(batch.Shard{}); len(got.Items) != len(c.Items) {
		t.Errorf("the zero shard holds %d items", len(got.Items))
	}
}

// TestShardFromEnv: the index variables of a Kubernetes indexed Job
// (0-based, as the Kubernetes documentation of indexed Jobs states) and of a
// Slurm job array (counted from SLURM_ARRAY_TASK_MIN in steps of
// SLURM_ARRAY_TASK_STEP, as the sbatch manual's output environment variables
// define them).
func TestShardFromEnv(t *testing.T) {
	for _, c := range []struct {
		name string
		env  map[string]string
		want batch.Shard
		err  string
	}{
		{"no scheduler", nil, batch.Shard{}, ""},
		{"k8s first pod", map[string]string{"JOB_COMPLETION_INDEX": "0", "RIDEMODES_SHARD_COUNT": "4"}, batch.Shard{Index: 1, Count: 4}, ""},
		{"k8s last pod", map[string]string{"JOB_COMPLETION_INDEX": "3", "RIDEMODES_SHARD_COUNT": "4"}, batch.Shard{Index: 4, Count: 4}, ""},
		{"k8s without count", map[string]string{"JOB_COMPLETION_INDEX": "3"}, batch.Shard{}, "RIDEMODES_SHARD_COUNT is not"},
		{"k8s index past count", map[string]string{"JOB_COMPLETION_INDEX": "4", "RIDEMODES_SHARD_COUNT": "4"}, batch.Shard{}, "between 1 and"},
		{"k8s bad index", map[string]string{"JOB_COMPLETION_INDEX": "x", "RIDEMODES_SHARD_COUNT": "4"}, batch.Shard{}, "not a whole number"},
		{"slurm 0-based", map[string]string{"SLURM_ARRAY_TASK_ID": "0", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "3", "SLURM_ARRAY_TASK_COUNT": "4"}, batch.Shard{Index: 1, Count: 4}, ""},
		{"slurm 1-based", map[string]string{"SLURM_ARRAY_TASK_ID": "4", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "4", "SLURM_ARRAY_TASK_COUNT": "4"}, batch.Shard{Index: 4, Count: 4}, ""},
		{"slurm from 10 in steps of 5", map[string]string{"SLURM_ARRAY_TASK_ID": "20", "SLURM_ARRAY_TASK_MIN": "10", "SLURM_ARRAY_TASK_MAX": "25", "SLURM_ARRAY_TASK_STEP": "5", "SLURM_ARRAY_TASK_COUNT": "4"}, batch.Shard{Index: 3, Count: 4}, ""},
		{"slurm uneven list 1,2,9", map[string]string{"SLURM_ARRAY_TASK_ID": "9", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "9", "SLURM_ARRAY_TASK_COUNT": "3"}, batch.Shard{}, "evenly spaced"},
		{"slurm off the step", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_STEP": "2", "SLURM_ARRAY_TASK_COUNT": "4"}, batch.Shard{}, "evenly spaced"},
		{"slurm without count", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_MIN": "1"}, batch.Shard{}, "SLURM_ARRAY_TASK_COUNT is not"},
		{"both schedulers", map[string]string{"SLURM_ARRAY_TASK_ID": "2", "JOB_COMPLETION_INDEX": "1"}, batch.Shard{}, "--shard"},
	} {
		got, from, err := batch.ShardFromEnv(func(k string) string { return c.env[k] })
		if got != c.want || (err == nil) != (c.err == "") || (err != nil && !strings.Contains(err.Error(), c.err)) {
			t.Errorf("%s: %v, %v; want %v, an error naming %q", c.name, got, err, c.want, c.err)
		}
		if err == nil && c.want.Count > 0 && from == "" {
			t.Errorf("%s: no source named", c.name)
		}
	}
	// The flag wins over the variables.
	env := map[string]string{"JOB_COMPLETION_INDEX": "0", "RIDEMODES_SHARD_COUNT": "4"}
	if s, from, err := batch.ChooseShard("2/3", func(k string) string { return env[k] }); s != (batch.Shard{Index: 2, Count: 3}) || from != "--shard" || err != nil {
		t.Errorf("--shard 2/3 with a Job's index: %v from %q, %v", s, from, err)
	}
	if s, _, err := batch.ChooseShard("", func(k string) string { return env[k] }); s != (batch.Shard{Index: 1, Count: 4}) || err != nil {
		t.Errorf("no flag, a Job's index: %v, %v", s, err)
	}
}
