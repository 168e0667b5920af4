package sweep

import (
	"fmt"
	"strconv"
	"strings"
)

// Shard is one part of a sweep: the jobs k with k ≡ I (mod N).
type Shard struct {
	I, N int
	// Source says where I and N came from, for the output.
	Source string
}

func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.I, s.N) }

// Has tells whether job k belongs to the shard.
func (s Shard) Has(k int) bool { return k%s.N == s.I }

// ParseShard reads "I/N".
func ParseShard(text string) (Shard, error) {
	a, b, ok := strings.Cut(text, "/")
	i, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if !ok || err1 != nil || err2 != nil {
		return Shard{}, errf("--shard", "%q: write I/N, e.g. 0/3 (shards numbered from 0)", text)
	}
	return checkShard(i, n, "--shard "+text, "--shard")
}

func checkShard(i, n int, source, field string) (Shard, error) {
	if n < 1 {
		return Shard{}, errf(field, "%d shards: must be at least 1", n)
	}
	if i < 0 || i >= n {
		return Shard{}, errf(field, "shard %d of %d: shards are numbered 0 to %d", i, n, n-1)
	}
	return Shard{I: i, N: n, Source: source}, nil
}

// ShardFromEnv picks the shard from the flags and the scheduler's
// environment, in this order:
//   - flag (--shard I/N), when given;
//   - a Slurm job array: SLURM_ARRAY_TASK_ID, with N from
//     SLURM_ARRAY_TASK_COUNT, or SLURM_ARRAY_TASK_MAX − MIN + 1 (I counted
//     from SLURM_ARRAY_TASK_MIN);
//   - a Kubernetes Indexed Job: JOB_COMPLETION_INDEX, with shards (the
//     --shards N flag) as N;
//   - otherwise the whole sweep, 0/1.
//
// getenv is os.Getenv in the program.
func ShardFromEnv(flag string, shards int, getenv func(string) string) (Shard, error) {
	if flag != "" {
		if shards != 0 {
			return Shard{}, errf("--shards", "give --shard I/N or --shards N, not both")
		}
		return ParseShard(flag)
	}
	atoi := func(name string) (int, bool, error) {
		v := getenv(name)
		if v == "" {
			return 0, false, nil
		}
		n, err := strconv.Atoi(v)
		if err != nil {
			return 0, true, errf(name, "%q is not a whole number", v)
		}
		return n, true, nil
	}
	if id, ok, err := atoi("SLURM_ARRAY_TASK_ID"); ok || err != nil {
		if err != nil {
			return Shard{}, err
		}
		lo, okMin, err := atoi("SLURM_ARRAY_TASK_MIN")
		if err != nil {
			return Shard{}, err
		}
		count, okCount, err := atoi("SLURM_ARRAY_TASK_COUNT")
		if err != nil {
			return Shard{}, err
		}
		hi, okMax, err := atoi("SLURM_ARRAY_TASK_MAX")
		if err != nil {
			return Shard{}, err
		}
		n := count
		switch {
		case shards != 0:
			n = shards
		case okCount:
		case okMin && okMax:
			n = hi - lo + 1
		default:
			return Shard{}, errf("SLURM_ARRAY_TASK_ID", "set, but neither SLURM_ARRAY_TASK_COUNT nor SLURM_ARRAY_TASK_MIN/MAX is: give --shards N")
		}
		src := fmt.Sprintf("Slurm job array: SLURM_ARRAY_TASK_ID=%d", id)
		if okMin && lo != 0 {
			src += fmt.Sprintf(", SLURM_ARRAY_TASK_MIN=%d", lo)
		}
		return checkShard(id-lo, n, src, "SLURM_ARRAY_TASK_ID")
	}
	if idx, ok, err := atoi("JOB_COMPLETION_INDEX"); ok || err != nil {
		if err != nil {
			return Shard{}, err
		}
		if shards == 0 {
			return Shard{}, errf("--shards", "JOB_COMPLETION_INDEX is set (a Kubernetes Indexed Job): give --shards N, the job's completions")
		}
		return checkShard(idx, shards, fmt.Sprintf("Kubernetes Indexed Job: JOB_COMPLETION_INDEX=%d", idx), "JOB_COMPLETION_INDEX")
	}
	if shards != 0 {
		return Shard{}, errf("--shards", "given, but no JOB_COMPLETION_INDEX or SLURM_ARRAY_TASK_ID says which shard this is; give --shard I/N")
	}
	return Shard{I: 0, N: 1, Source: "no shard given: the whole sweep"}, nil
}
