package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"faultline/sweep"
)

// exitJobsFailed is the status of a sweep or merge that finished with
// jobs failed, missing or corrupt.
const exitJobsFailed = 3

func cmdSweep(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	if len(args) > 0 {
		switch args[0] {
		case "merge":
			return cmdSweepMerge(args[1:], stdout)
		case "slurm":
			return cmdSweepSlurm(ctx, args[1:], stdout)
		}
	}
	fs := newFlags("sweep")
	out := fs.String("o", "", "output directory")
	shard := fs.String("shard", "", "run shard I of N (I/N)")
	shards := fs.Int("shards", 0, "number of shards, with JOB_COMPLETION_INDEX")
	workers := fs.Int("workers", 0, "jobs run at once (0: all cores)")
	force := fs.Bool("force", false, "run a sweep of more than the maximum number of jobs")
	path, err := parseArg(fs, args, stdout, "sweep file")
	if err != nil {
		return err
	}
	if *out == "" {
		return usageError{"sweep: give the output directory with -o DIR"}
	}
	if *workers < 0 {
		return usageError{"--workers: must be positive (0: all cores)"}
	}
	sh, err := sweep.ShardFromEnv(*shard, *shards, os.Getenv)
	if err != nil {
		return err
	}
	sw, err := sweep.Load(path, *force)
	if err != nil {
		return err
	}
	sum, err := sweep.Run(ctx, sw, *out, sweep.RunOptions{Shard: sh, Workers: *workers, Progress: stderr})
	if sum != nil && err == nil {
		fmt.Fprintf(stderr, "sweep: shard %s finished: %d jobs (%d done before, %d now, %d of them replayed from shared field samples) in %.1f s into %s\n", sh, sum.Jobs, sum.Skipped, sum.Done, sum.Replayed, sum.Elapsed.Seconds(), *out)
	}
	return err
}

func cmdSweepMerge(args []string, stdout io.Writer) error {
	fs := newFlags("sweep merge")
	dir, err := parseArg(fs, args, stdout, "sweep output directory")
	if err != nil {
		return err
	}
	rep, err := sweep.Merge(dir)
	if rep != nil {
		if err == nil {
			fmt.Fprintln(stdout, rep.Summary())
		}
		fmt.Fprintf(stdout, "wrote %s\n", rep.Index)
		if rep.ContactSheet != "" {
			fmt.Fprintf(stdout, "wrote %s\n", rep.ContactSheet)
		} else {
			fmt.Fprintln(stdout, rep.ContactNote)
		}
	}
	return err
}

func cmdSweepSlurm(ctx context.Context, args []string, stdout io.Writer) error {
	fs := newFlags("sweep slurm")
	out := fs.String("o", "", "output directory")
	tasks := fs.Int("tasks", 0, "number of array tasks")
	partition := fs.String("partition", "", "Slurm partition")
	limit := fs.String("time", "", "time limit per task, HH:MM:SS")
	cpus := fs.Int("cpus-per-task", 0, "CPUs (and workers) per task")
	submit := fs.Bool("submit", false, "submit the array and the merge job with sbatch")
	force := fs.Bool("force", false, "allow a sweep of more than the maximum number of jobs")
	path, err := parseArg(fs, args, stdout, "sweep file")
	if err != nil {
		return err
	}
	if *out == "" {
		return usageError{"sweep slurm: give the output directory with -o DIR"}
	}
	if *tasks == 0 {
		return usageError{"sweep slurm: give the number of array tasks with --tasks N"}
	}
	sw, err := sweep.Load(path, *force)
	if err != nil {
		return err
	}
	exe, err := os.Executable()
	if err != nil {
		return fmt.Errorf("finding this program's path for the scripts: %w", err)
	}
	absSweep, err := filepath.Abs(path)
	if err != nil {
		return err
	}
	s, err := sweep.WriteSlurm(sw, *out, sweep.SlurmOptions{Tasks: *tasks, Partition: *partition, Time: *limit, CPUsPerTask: *cpus, Executable: exe, SweepFile: absSweep, Force: *force})
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "wrote %s (%d jobs in %d array tasks) and %s\n", s.Array, sw.Jobs, *tasks, s.Merge)
	if !*submit {
		fmt.Fprintf(stdout, "submit with: merge=$(sbatch --parsable --dependency=afterok:$(sbatch --parsable %s) --kill-on-invalid-dep=yes %s)\n", s.Array, s.Merge)
		return nil
	}
	arrayID, mergeID, err := sweep.SubmitSlurm(ctx, s, os.Environ())
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "submitted array job %s (%d tasks) and merge job %s (runs after every task succeeds)\n", arrayID, *tasks, mergeID)
	return nil
}

// isJobsFailed tells whether err says jobs failed (exit status 3).
func isJobsFailed(err error) bool { return errors.Is(err, sweep.ErrJobsFailed) }

func init() {
	commandUsage["sweep"] = `usage: faultline sweep SWEEP -o DIR [--shard I/N | --shards N] [--workers K] [--force]

Runs the jobs of the sweep file SWEEP (or of one shard of it: the jobs k
with k ≡ I mod N) into DIR/jobs/<k>/, each job's files written as one set,
and records each job as one line of DIR/manifest-<I>.jsonl. Jobs already
done (files present and matching their sha256) are skipped, so a killed
shard restarts where it stopped. The shard comes from --shard, else from
SLURM_ARRAY_TASK_ID (with SLURM_ARRAY_TASK_COUNT or _MIN/_MAX), else from
JOB_COMPLETION_INDEX with --shards N, else it is the whole sweep.
Exit status 3 when some jobs failed (each recorded with its error).

  -o DIR        the output directory (required)
  --shard I/N   run shard I of N (numbered from 0)
  --shards N    the number of shards, with JOB_COMPLETION_INDEX
  --workers K   jobs run at once (default: all cores)
  --force       run a sweep of more than 10000 jobs

  faultline sweep merge DIR     check completeness, write index.csv and a contact sheet
  faultline sweep slurm --help  the Slurm job array
`
	commandUsage["sweep merge"] = `usage: faultline sweep merge DIR

Checks that every job of the sweep in DIR is recorded exactly once, done,
with every file present and matching its sha256, and names any job that is
missing, failed, corrupt or recorded twice (exit status 3). Writes
DIR/index.csv (k, status, the value of every axis, the files, the error)
and, for a grid of one or two varied axes, DIR/contact-sheet.png.
`
	commandUsage["sweep slurm"] = `usage: faultline sweep slurm SWEEP -o DIR --tasks N [--partition P] [--time HH:MM:SS]
                             [--cpus-per-task C] [--force] [--submit]

Writes DIR/slurm/array.sh, an sbatch job array of N tasks that each run
their shard of the sweep, and DIR/slurm/merge.sh, which merges. With
--submit it submits both, the merge with --dependency=afterok on the
array, and prints the two job ids.
`
}
