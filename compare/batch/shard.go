package batch

import (
	"fmt"
	"strconv"
	"strings"
)

// Shard is the Index-th of Count parts of a campaign (1 <= Index <= Count);
// the zero Shard is the whole campaign.
type Shard struct{ Index, Count int }

func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.Index, s.Count) }

// ParseShard reads "I/N" (1-based: 1/4 ... 4/4).
func ParseShard(text string) (Shard, error) {
	i, n, ok := strings.Cut(text, "/")
	index, err1 := strconv.Atoi(strings.TrimSpace(i))
	count, err2 := strconv.Atoi(strings.TrimSpace(n))
	if !ok || err1 != nil || err2 != nil {
		return Shard{}, fmt.Errorf("shard %q: write I/N, the I-th of N parts counted from 1 (e.g. 2/4)", text)
	}
	return newShard(index, count, "shard "+text)
}

func newShard(index, count int, what string) (Shard, error) {
	if count < 1 || index < 1 || index > count {
		return Shard{}, fmt.Errorf("%s: the part must lie between 1 and the number of parts (%d/%d is not a part)", what, index, count)
	}
	return Shard{Index: index, Count: count}, nil
}

// ChooseShard returns the shard that text ("I/N", a command's flag) names,
// or, when text is empty, the scheduler's (ShardFromEnv), and says from
// where it came ("" for the whole campaign).
func ChooseShard(text string, getenv func(string) string) (s Shard, from string, err error) {
	if text == "" {
		return ShardFromEnv(getenv)
	}
	s, err = ParseShard(text)
	return s, "--shard", err
}

// Scheduler index variables that ShardFromEnv reads.
const (
	// EnvJobIndex is the 0-based completion index that Kubernetes sets in
	// every pod of an indexed Job (completionMode: Indexed).
	EnvJobIndex = "JOB_COMPLETION_INDEX"
	// EnvShardCount is ours: the number of parts, which a pod cannot read
	// from Kubernetes; set it in the Job's pod template to the Job's
	// completions.
	EnvShardCount = "RIDEMODES_SHARD_COUNT"
	// The Slurm job array variables: the task's index, the number of
	// tasks, the lowest index and the step between indexes.
	EnvSlurmID    = "SLURM_ARRAY_TASK_ID"
	EnvSlurmCount = "SLURM_ARRAY_TASK_COUNT"
	EnvSlurmMin   = "SLURM_ARRAY_TASK_MIN"
	EnvSlurmMax   = "SLURM_ARRAY_TASK_MAX"
	EnvSlurmStep  = "SLURM_ARRAY_TASK_STEP"
)

// ShardFromEnv finds the shard of a scheduler's task from its variables,
// read through getenv (os.Getenv): a Kubernetes indexed Job's
// JOB_COMPLETION_INDEX (0-based) with RIDEMODES_SHARD_COUNT, or a Slurm job
// array's SLURM_ARRAY_TASK_ID, counted from SLURM_ARRAY_TASK_MIN in steps of
// SLURM_ARRAY_TASK_STEP (1 when unset), with SLURM_ARRAY_TASK_COUNT parts;
// an array must be an evenly spaced range (--array=A-B or A-B:S), so that
// its tasks number 1..COUNT. It returns the zero Shard when neither
// scheduler's index is set, and says in from which variables it came.
func ShardFromEnv(getenv func(string) string) (s Shard, from string, err error) {
	k8s, slurm := getenv(EnvJobIndex), getenv(EnvSlurmID)
	switch {
	case k8s != "" && slurm != "":
		return Shard{}, "", fmt.Errorf("both %s and %s are set; say which part to run with --shard I/N", EnvJobIndex, EnvSlurmID)
	case k8s != "":
		index, err := envInt(getenv, EnvJobIndex)
		if err != nil {
			return Shard{}, "", err
		}
		if getenv(EnvShardCount) == "" {
			return Shard{}, "", fmt.Errorf("%s is set but %s is not: set it to the Job's completions (the number of parts), or pass --shard I/N", EnvJobIndex, EnvShardCount)
		}
		count, err := envInt(getenv, EnvShardCount)
		if err != nil {
			return Shard{}, "", err
		}
		from = fmt.Sprintf("%s=%d, %s=%d", EnvJobIndex, index, EnvShardCount, count)
		s, err = newShard(index+1, count, from)
		return s, from, err
	case slurm != "":
		return slurmShard(getenv)
	}
	return Shard{}, "", nil
}

func slurmShard(getenv func(string) string) (Shard, string, error) {
	vals := map[string]int{EnvSlurmStep: 1}
	for _, name := range []string{EnvSlurmID, EnvSlurmCount, EnvSlurmMin, EnvSlurmMax, EnvSlurmStep} {
		if getenv(name) == "" {
			if name == EnvSlurmStep || name == EnvSlurmMax {
				continue
			}
			return Shard{}, "", fmt.Errorf("%s is set but %s is not; pass --shard I/N", EnvSlurmID, name)
		}
		v, err := envInt(getenv, name)
		if err != nil {
			return Shard{}, "", err
		}
		vals[name] = v
	}
	id, count, lo, step := vals[EnvSlurmID], vals[EnvSlurmCount], vals[EnvSlurmMin], vals[EnvSlurmStep]
	from := fmt.Sprintf("%s=%d, %s=%d, %s=%d, %s=%d", EnvSlurmID, id, EnvSlurmMin, lo, EnvSlurmStep, step, EnvSlurmCount, count)
	hi, hasMax := vals[EnvSlurmMax]
	if step < 1 || (id-lo)%step != 0 || (hasMax && hi != lo+(count-1)*step) {
		return Shard{}, "", fmt.Errorf("%s: the array's indexes are not an evenly spaced range; submit it with --array=A-B (or A-B:S), or pass --shard I/N", from)
	}
	s, err := newShard((id-lo)/step+1, count, from)
	return s, from, err
}

func envInt(getenv func(string) string, name string) (int, error) {
	v, err := strconv.Atoi(strings.TrimSpace(getenv(name)))
	if err != nil {
		return 0, fmt.Errorf("%s=%q is not a whole number", name, getenv(name))
	}
	return v, nil
}
