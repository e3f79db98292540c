package main

import (
	"fmt"

	"strconv"

	"fitseal/runner"
)

// ShardCountVariable gives the shard count where the scheduler does not
// (Kubernetes Indexed Jobs, GNU parallel, any other launcher).
const ShardCountVariable = "FITSEAL_SHARD_COUNT"

// parseShardFlag reads --shard: "I/N" (0-based) or "auto", which takes I and
// N from the batch scheduler's environment (see shardFromEnv).
func parseShardFlag(s string, getenv func(string) string) (*runner.Shard, error) {
	if s == "" {
		return nil, nil
	}
	if s == "auto" {
		sh, err := shardFromEnv(getenv)
		if err != nil {
			return nil, err
		}
		return &sh, nil
	}
	sh, err := runner.ParseShard(s)
	if err != nil {
		return nil, fmt.Errorf("--shard: %w", err)
	}
	return &sh, nil
}

// shardFromEnv finds the shard in the environment, first match wins:
//
//   - Slurm job array: I = SLURM_ARRAY_TASK_ID − SLURM_ARRAY_TASK_MIN (0 when
//     MIN is unset), N = SLURM_ARRAY_TASK_COUNT; the array must be a range
//     with step 1, e.g. --array=0-15 or --array=1-16.
//   - Kubernetes Indexed Job: I = JOB_COMPLETION_INDEX, N = FITSEAL_SHARD_COUNT
//     (set it to the Job's completions).
//   - GNU parallel: I = PARALLEL_SEQ − 1 (PARALLEL_SEQ counts from 1),
//     N = FITSEAL_SHARD_COUNT.
//   - Any other launcher: I = FITSEAL_SHARD_INDEX, N = FITSEAL_SHARD_COUNT.
func shardFromEnv(getenv func(string) string) (runner.Shard, error) {
	num := func(name string) (int, error) {
		v, err := strconv.Atoi(getenv(name))
		if err != nil {
			return 0, fmt.Errorf("--shard auto: %s=%q is not a whole number", name, getenv(name))
		}
		return v, nil
	}
	var sh runner.Shard
	var from string
	var err error
	count := func() {
		if getenv(ShardCountVariable) == "" {
			err = fmt.Errorf("--shard auto: %s is set but %s is not; set %s to the number of shards", from, ShardCountVariable, ShardCountVariable)
			return
		}
		sh.Count, err = num(ShardCountVariable)
	}
	switch {
	case getenv("SLURM_ARRAY_TASK_ID") != "":
		from = "SLURM_ARRAY_TASK_ID"
		id, e := num("SLURM_ARRAY_TASK_ID")
		if e != nil {
			return sh, e
		}
		lo := 0
		if getenv("SLURM_ARRAY_TASK_MIN") != "" {
			if lo, e = num("SLURM_ARRAY_TASK_MIN"); e != nil {
				return sh, e
			}
		}
		if getenv("SLURM_ARRAY_TASK_COUNT") == "" {
			return sh, fmt.Errorf("--shard auto: SLURM_ARRAY_TASK_ID is set but SLURM_ARRAY_TASK_COUNT is not; give --shard I/N instead")
		}
		if sh.Count, e = num("SLURM_ARRAY_TASK_COUNT"); e != nil {
			return sh, e
		}
		sh.Index = id - lo
		if sh.Check() != nil {
			return sh, fmt.Errorf("--shard auto: Slurm task %d of an array from %d with %d tasks is not shard I of N with 0 ≤ I < N; submit the array as a range with step 1 (--array=0-%d)", id, lo, sh.Count, sh.Count-1)
		}
		return sh, nil
	case getenv("JOB_COMPLETION_INDEX") != "":
		from = "JOB_COMPLETION_INDEX (Kubernetes Indexed Job)"
		if sh.Index, err = num("JOB_COMPLETION_INDEX"); err != nil {
			return sh, err
		}
		count()
	case getenv("PARALLEL_SEQ") != "":
		from = "PARALLEL_SEQ (GNU parallel)"
		seq, e := num("PARALLEL_SEQ")
		if e != nil {
			return sh, e
		}
		sh.Index = seq - 1
		count()
	case getenv("FITSEAL_SHARD_INDEX") != "":
		from = "FITSEAL_SHARD_INDEX"
		if sh.Index, err = num("FITSEAL_SHARD_INDEX"); err != nil {
			return sh, err
		}
		count()
	default:
		return sh, fmt.Errorf("--shard auto: no scheduler variables found (SLURM_ARRAY_TASK_ID, JOB_COMPLETION_INDEX, PARALLEL_SEQ or FITSEAL_SHARD_INDEX, with %s where the scheduler gives no count); give --shard I/N instead", ShardCountVariable)
	}
	if err != nil {
		return sh, err
	}
	if e := sh.Check(); e != nil {
		return sh, fmt.Errorf("--shard auto (from %s): %w", from, e)
	}
	return sh, nil
}

// shardOutput is the default name of a partial bundle:
// bundles/NAME-TIME-shard-I-of-N.tar.gz beside the project file.
func shardOutput(base string, sh runner.Shard) string {
	const ext = ".tar.gz"
	return base[:len(base)-len(ext)] + fmt.Sprintf("-shard-%d-of-%d", sh.Index, sh.Count) + ext
}
