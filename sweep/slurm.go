package sweep

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"faultline/internal/atomicfile"
)

// SlurmOptions describe the job array that runs a sweep.
type SlurmOptions struct {
	// Tasks is the number of array tasks (shards).
	Tasks int
	// Partition, Time (HH:MM:SS, or D-HH:MM:SS) and CPUsPerTask are passed
	// to sbatch when set; each task runs CPUsPerTask workers.
	Partition   string
	Time        string
	CPUsPerTask int
	// Executable is the faultline program the tasks run (absolute path).
	Executable string
	// SweepFile is the sweep file (made absolute).
	SweepFile string
	// Force is passed on (--force) for sweeps above MaxJobs.
	Force bool
}

// SlurmScripts are the paths of the two scripts written.
type SlurmScripts struct {
	Array, Merge string
}

var (
	timeRe      = regexp.MustCompile(`^(\d+-)?\d{1,2}:\d{2}:\d{2}$`)
	partitionRe = regexp.MustCompile(`^[A-Za-z0-9_.,-]+$`)
)

// WriteSlurm writes DIR/slurm/array.sh, an sbatch job array of o.Tasks
// tasks each running `faultline sweep SWEEP -o DIR` (the shard comes from
// SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT), and DIR/slurm/merge.sh,
// which runs `faultline sweep merge DIR`; SubmitSlurm submits the second
// with --dependency=afterok on the first. Task output goes to
// DIR/slurm/shard-<task>.out.
func WriteSlurm(sw *Sweep, dir string, o SlurmOptions) (SlurmScripts, error) {
	if o.Tasks < 1 {
		return SlurmScripts{}, errf("--tasks", "%d: give the number of array tasks, at least 1", o.Tasks)
	}
	if o.Tasks > 1_000_000 {
		return SlurmScripts{}, errf("--tasks", "%d: more array tasks than Slurm allows", o.Tasks)
	}
	if o.Time != "" && !timeRe.MatchString(o.Time) {
		return SlurmScripts{}, errf("--time", "%q: write HH:MM:SS or D-HH:MM:SS", o.Time)
	}
	if o.Partition != "" && !partitionRe.MatchString(o.Partition) {
		return SlurmScripts{}, errf("--partition", "%q: a partition name is letters, digits, _ . , -", o.Partition)
	}
	if o.CPUsPerTask < 0 {
		return SlurmScripts{}, errf("--cpus-per-task", "must be positive")
	}
	absDir, err := filepath.Abs(dir)
	if err != nil {
		return SlurmScripts{}, err
	}
	if err := claimDir(absDir, sw); err != nil {
		return SlurmScripts{}, err
	}
	sdir := filepath.Join(absDir, "slurm")
	if err := os.MkdirAll(sdir, 0o755); err != nil {
		return SlurmScripts{}, err
	}
	header := func(name, output string) string {
		var b strings.Builder
		b.WriteString("#!/bin/bash\n")
		fmt.Fprintf(&b, "#SBATCH --job-name=%s\n", name)
		fmt.Fprintf(&b, "#SBATCH --output=%s\n", filepath.Join(sdir, output))
		if o.Partition != "" {
			fmt.Fprintf(&b, "#SBATCH --partition=%s\n", o.Partition)
		}
		if o.Time != "" {
			fmt.Fprintf(&b, "#SBATCH --time=%s\n", o.Time)
		}
		return b.String()
	}
	force := ""
	if o.Force {
		force = " --force"
	}
	var arr strings.Builder
	arr.WriteString(header("faultline-sweep", "shard-%a.out"))
	fmt.Fprintf(&arr, "#SBATCH --array=0-%d\n", o.Tasks-1)
	if o.CPUsPerTask > 0 {
		fmt.Fprintf(&arr, "#SBATCH --cpus-per-task=%d\n", o.CPUsPerTask)
	}
	fmt.Fprintf(&arr, "# Sweep %s (sha256 %.12s…), %d jobs in %d shards: task I runs the jobs k ≡ I (mod %d).\n", o.SweepFile, sw.Hash, sw.Jobs, o.Tasks, o.Tasks)
	arr.WriteString("set -eu\n")
	fmt.Fprintf(&arr, "exec %s sweep %s -o %s --workers \"${SLURM_CPUS_PER_TASK:-1}\"%s\n", shellQuote(o.Executable), shellQuote(o.SweepFile), shellQuote(absDir), force)
	var mrg strings.Builder
	mrg.WriteString(header("faultline-merge", "merge.out"))
	mrg.WriteString("# Runs once every task of the sweep's array has succeeded (sbatch --dependency=afterok).\n")
	mrg.WriteString("set -eu\n")
	fmt.Fprintf(&mrg, "exec %s sweep merge %s\n", shellQuote(o.Executable), shellQuote(absDir))
	s := SlurmScripts{Array: filepath.Join(sdir, "array.sh"), Merge: filepath.Join(sdir, "merge.sh")}
	if err := atomicfile.WriteFile(s.Array, []byte(arr.String())); err != nil {
		return s, err
	}
	if err := atomicfile.WriteFile(s.Merge, []byte(mrg.String())); err != nil {
		return s, err
	}
	for _, p := range []string{s.Array, s.Merge} {
		if err := os.Chmod(p, 0o755); err != nil {
			return s, err
		}
	}
	return s, nil
}

// SubmitSlurm submits the array script, then the merge script with
// --dependency=afterok:<array job> (and --kill-on-invalid-dep=yes, so the
// merge is cancelled rather than left pending when a task fails). It
// returns the two job ids.
func SubmitSlurm(ctx context.Context, s SlurmScripts, env []string) (arrayID, mergeID string, err error) {
	if _, err := exec.LookPath("sbatch"); err != nil {
		return "", "", errors.New("sbatch is not on PATH: submit from a Slurm login node, or run the scripts' commands by hand")
	}
	arrayID, err = sbatch(ctx, env, "--parsable", s.Array)
	if err != nil {
		return "", "", err
	}
	mergeID, err = sbatch(ctx, env, "--parsable", "--dependency=afterok:"+arrayID, "--kill-on-invalid-dep=yes", s.Merge)
	if err != nil {
		return arrayID, "", fmt.Errorf("array job %s submitted, merge not: %w", arrayID, err)
	}
	return arrayID, mergeID, nil
}

func sbatch(ctx context.Context, env []string, args ...string) (string, error) {
	cmd := exec.CommandContext(ctx, "sbatch", args...)
	cmd.Env = env
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		return "", fmt.Errorf("sbatch %s: %v: %s", strings.Join(args, " "), err, oneLine(errb.String()))
	}
	// --parsable prints "id" or "id;cluster".
	id, _, _ := strings.Cut(strings.TrimSpace(out.String()), ";")
	if _, err := strconv.Atoi(id); err != nil {
		return "", fmt.Errorf("sbatch %s: unexpected output %q", strings.Join(args, " "), out.String())
	}
	return id, nil
}

// shellQuote quotes s for bash.
func shellQuote(s string) string {
	if s != "" && strings.Trim(s, "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_./-=:") == "" {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}
