package tests

import (
	"bytes"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"
)

// sweepScene is a small scene for sweeps: 32×32 pixels, so a job takes a
// fraction of a second.
const sweepScene = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
 "foil": {"thickness_nm": 100},
 "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 50]}],
 "image": {"width_nm": 100, "height_nm": 100, "pixels": [32, 32]}}`

// sweep12 is a 4 × 3 grid: 12 jobs, two varied axes (so merge writes a
// contact sheet), with noise and labels.
const sweep12 = `{"version": 1, "scene": "base.json", "axes": [
   {"path": "foil.thickness_nm", "values": [60, 80, 100, 120]},
   {"path": "diffraction.s_per_nm", "range": [-0.01, 0.01, 0.01]}],
 "combine": "grid", "outputs": ["tiff", "png"], "labels": true,
 "seed": 7, "noise": {"dose_e_per_px": 400, "blur_nm": 1}}`

// writeSweep writes base.json and the sweep file into a new directory and
// returns the sweep file's path.
func writeSweep(t *testing.T, sweepText string) string {
	t.Helper()
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "base.json"), []byte(sweepScene), 0o644); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "sweep.json")
	if err := os.WriteFile(p, []byte(sweepText), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// sweepFiles reads every file of a sweep's output that does not depend on
// how it was run: the plan, the jobs' files, index.csv and the contact
// sheet (not the manifests, which hold times, nor Slurm's own files).
func sweepFiles(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	files := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		if d.IsDir() {
			if rel == "slurm" {
				return filepath.SkipDir
			}
			return nil
		}
		if strings.HasPrefix(d.Name(), "manifest-") {
			return nil
		}
		data, err := os.ReadFile(p)
		files[filepath.ToSlash(rel)] = data
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

// sameFiles fails the test unless a and b hold the same files, bit for bit.
func sameFiles(t *testing.T, what string, a, b map[string][]byte) {
	t.Helper()
	var names []string
	for n := range a {
		names = append(names, n)
	}
	for n := range b {
		if _, ok := a[n]; !ok {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	bad := 0
	for _, n := range names {
		x, okA := a[n]
		y, okB := b[n]
		switch {
		case !okA || !okB:
			t.Errorf("%s: %s is in one output only (unsharded: %v, other: %v)", what, n, okA, okB)
			bad++
		case !bytes.Equal(x, y):
			t.Errorf("%s: %s differs", what, n)
			bad++
		}
		if bad > 10 {
			t.Fatalf("%s: too many differences", what)
		}
	}
}

// localRun runs a sweep unsharded and merges it, returning the output.
func localRun(t *testing.T, sweepPath string) string {
	t.Helper()
	out := filepath.Join(t.TempDir(), "local")
	if _, stderr, code := cli(t, "sweep", sweepPath, "-o", out, "--workers", "2"); code != 0 {
		t.Fatalf("local sweep: exit %d: %s", code, stderr)
	}
	if _, stderr, code := cli(t, "sweep", "merge", out); code != 0 {
		t.Fatalf("local merge: exit %d: %s", code, stderr)
	}
	return out
}

// TestSweepOnSlurm runs a 12-job sweep as a 3-task Slurm job array plus
// the dependent merge job on a real one-node cluster (Debian's slurm-wlm
// and munge), started here, and checks the result is the local run's, bit
// for bit.
func TestSweepOnSlurm(t *testing.T) {
	c := startSlurm(t)
	sw := writeSweep(t, sweep12)
	out := filepath.Join(t.TempDir(), "onslurm")

	cmd := exec.Command(cliPath, "sweep", "slurm", sw, "-o", out, "--tasks", "3", "--cpus-per-task", "1", "--time", "00:05:00", "--submit")
	cmd.Env = c.env()
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	if err := cmd.Run(); err != nil {
		t.Fatalf("sweep slurm --submit: %v\n%s%s", err, o.String(), e.String())
	}
	// "submitted array job A (3 tasks) and merge job M (...)"
	var arrayID, mergeID string
	for _, line := range strings.Split(o.String(), "\n") {
		if f := strings.Fields(line); len(f) > 9 && f[0] == "submitted" && f[7] == "merge" {
			arrayID, mergeID = f[3], f[9]
		}
	}
	if arrayID == "" || mergeID == "" {
		t.Fatalf("no job ids in the output of sweep slurm --submit:\n%s", o.String())
	}

	// Wait, at most three minutes, for the merge job to finish.
	deadline := time.Now().Add(3 * time.Minute)
	state := ""
	for time.Now().Before(deadline) {
		info, _ := c.command("scontrol", "-o", "show", "job", mergeID)
		for _, f := range strings.Fields(info) {
			if v, ok := strings.CutPrefix(f, "JobState="); ok {
				state = v
			}
		}
		if state == "COMPLETED" || state == "FAILED" || state == "CANCELLED" || state == "TIMEOUT" || state == "NODE_FAIL" || state == "OUT_OF_MEMORY" {
			break
		}
		time.Sleep(time.Second)
	}
	if state != "COMPLETED" {
		shards, _ := c.command("scontrol", "-o", "show", "job", arrayID)
		logs := ""
		for _, n := range []string{"shard-0.out", "shard-1.out", "shard-2.out", "merge.out"} {
			data, _ := os.ReadFile(filepath.Join(out, "slurm", n))
			logs += "--- " + n + "\n" + string(data)
		}
		t.Fatalf("merge job %s ended %q (array job %s):\n%s\n%s\n%s", mergeID, state, arrayID, shards, logs, c.logTails())
	}
	for i := 0; i < 3; i++ {
		if _, err := os.Stat(filepath.Join(out, "manifest-"+string(rune('0'+i))+".jsonl")); err != nil {
			t.Errorf("array task %d wrote no manifest: %v", i, err)
		}
	}
	data, _ := os.ReadFile(filepath.Join(out, "slurm", "shard-1.out"))
	if !strings.Contains(string(data), "SLURM_ARRAY_TASK_ID=1") {
		t.Errorf("shard 1's output does not say the shard came from SLURM_ARRAY_TASK_ID:\n%s", data)
	}

	local := localRun(t, sw)
	got, want := sweepFiles(t, out), sweepFiles(t, local)
	if len(want) < 12*7+3 {
		t.Fatalf("the local run wrote only %d files", len(want))
	}
	sameFiles(t, "Slurm run vs local run", want, got)
}

// Restart: a shard killed (SIGKILL) part way and run again completes with
// no duplicate or missing job, and its files equal an uninterrupted run's.
func TestSweepKilledAndRestarted(t *testing.T) {
	sw := writeSweep(t, strings.Replace(sweep12, `"values": [60, 80, 100, 120]`, `"values": [60, 70, 80, 90, 100, 110, 120]`, 1))
	out := filepath.Join(t.TempDir(), "killed")
	manifest := filepath.Join(out, "manifest-1.jsonl")
	kills := 0
	for attempt := 0; attempt < 3; attempt++ {
		cmd := exec.Command(cliPath, "sweep", sw, "-o", out, "--shard", "1/2", "--workers", "2")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		// Kill once a few more jobs are recorded than before.
		before := countLines(manifest)
		killed := false
		deadline := time.Now().Add(60 * time.Second)
	wait:
		for time.Now().Before(deadline) {
			select {
			case <-done:
				break wait
			default:
			}
			if countLines(manifest) >= before+3 {
				cmd.Process.Kill()
				<-done
				killed = true
				kills++
				break
			}
			time.Sleep(20 * time.Millisecond)
		}
		if !killed {
			break
		}
	}
	if kills == 0 {
		t.Fatal("the shard finished before it could be killed")
	}
	if _, stderr, code := cli(t, "sweep", sw, "-o", out, "--shard", "1/2"); code != 0 {
		t.Fatalf("restart: exit %d: %s", code, stderr)
	}
	if _, stderr, code := cli(t, "sweep", sw, "-o", out, "--shard", "0/2"); code != 0 {
		t.Fatalf("shard 0/2: exit %d: %s", code, stderr)
	}
	stdout, stderr, code := cli(t, "sweep", "merge", out)
	if code != 0 || !strings.Contains(stdout, "all 21 jobs done and verified") {
		t.Fatalf("merge after %d kills: exit %d: %s%s", kills, code, stdout, stderr)
	}
	if n := countLines(manifest); n != 10 {
		t.Errorf("manifest-1 holds %d records after restart, want the shard's 10 jobs once each", n)
	}
	entries, _ := os.ReadDir(filepath.Join(out, "jobs"))
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("jobs/%s: a temporary directory left after the restart", e.Name())
		}
	}
	sameFiles(t, "killed and restarted vs local run", sweepFiles(t, localRun(t, sw)), sweepFiles(t, out))
}

// countLines counts the complete lines of a file (0 if it is missing).
func countLines(path string) int {
	data, err := os.ReadFile(path)
	if err != nil {
		return 0
	}
	return bytes.Count(data, []byte("\n"))
}
