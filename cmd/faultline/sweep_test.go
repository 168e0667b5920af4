package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const sweepBase = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
 "foil": {"thickness_nm": 100},
 "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 50]}],
 "image": {"width_nm": 40, "height_nm": 40, "pixels": [4, 4]}}`

// Bad input to the sweep commands: each case is exit status 2 and one
// line naming what is wrong, before any job runs.
func TestSweepBadInput(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "base.json"), []byte(sweepBase), 0o644)
	write := func(name, axes string, extra string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(`{"version": 1, "scene": "base.json", "axes": [`+axes+`], "combine": "grid", "outputs": ["png"], "labels": false`+extra+`}`), 0o644)
		return p
	}
	good := write("good.json", `{"path": "foil.thickness_nm", "values": [80, 100]}`, "")
	other := write("other.json", `{"path": "foil.thickness_nm", "values": [80, 120]}`, "")
	out := filepath.Join(dir, "out")
	var so, se bytes.Buffer
	if code := run(context.Background(), []string{"sweep", good, "-o", out}, &so, &se); code != exitOK {
		t.Fatalf("good sweep: exit %d: %s", code, se.String())
	}
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"unknown path", []string{"sweep", write("a.json", `{"path": "foil.thicknes_nm", "values": [80]}`, ""), "-o", dir + "/a"},
			"error: axes[0].values[0]: foil.thicknes_nm = 80: foil.thicknes_nm: unknown field"},
		{"wrong type", []string{"sweep", write("b.json", `{"path": "foil.thickness_nm", "values": [80, "thick"]}`, ""), "-o", dir + "/b"},
			`error: axes[0].values[1]: foil.thickness_nm = "thick": foil.thickness_nm: is string, want a number`},
		{"empty axis", []string{"sweep", write("c.json", `{"path": "foil.thickness_nm", "values": []}`, ""), "-o", dir + "/c"},
			"error: axes[0].values: empty"},
		{"zero step", []string{"sweep", write("d.json", `{"path": "diffraction.s_per_nm", "range": [-0.01, 0.01, 0]}`, ""), "-o", dir + "/d"},
			"error: axes[0].range: step is zero"},
		{"too many jobs", []string{"sweep", write("e.json", `{"path": "foil.thickness_nm", "range": [50, 150, 0.01]}`, ""), "-o", dir + "/e"},
			"error: axes: the sweep has more than 10000 jobs (axes[0].range alone has 10001 values); give --force"},
		{"shard out of range", []string{"sweep", good, "-o", dir + "/f", "--shard", "3/3"},
			"error: --shard: shard 3 of 3: shards are numbered 0 to 2"},
		{"another sweep's directory", []string{"sweep", other, "-o", out},
			"error: -o: " + out + " belongs to a different sweep"},
		{"unknown field", []string{"sweep", write("g.json", `{"path": "foil.thickness_nm", "values": [80]}`, `, "colour": 1`), "-o", dir + "/g"},
			"error: colour: unknown field"},
		{"kubernetes index without shards", []string{"sweep", good, "-o", dir + "/h", "--shards", "2"},
			"error: --shards: given, but no JOB_COMPLETION_INDEX"},
		{"slurm without tasks", []string{"sweep", "slurm", good, "-o", dir + "/i"},
			"error: sweep slurm: give the number of array tasks with --tasks N"},
		{"slurm bad time", []string{"sweep", "slurm", good, "-o", dir + "/i", "--tasks", "2", "--time", "1h"},
			`error: --time: "1h": write HH:MM:SS`},
		{"merge of no sweep", []string{"sweep", "merge", dir},
			"error: " + dir + ": no sweep.json"},
		{"merge of two directories", []string{"sweep", "merge", dir, dir},
			"error: sweep merge: give one sweep output directory (got 2 arguments;"},
		{"sweep of no file", []string{"sweep", "-o", dir + "/j"},
			"error: sweep: give one sweep file (got 0 arguments;"},
	} {
		var stdout, stderr bytes.Buffer
		code := run(context.Background(), c.args, &stdout, &stderr)
		if code != exitBadInput || !strings.HasPrefix(stderr.String(), c.want) || strings.Count(stderr.String(), "\n") != 1 {
			t.Errorf("%s: exit %d, stderr %q; want %d and one line starting %q", c.name, code, stderr.String(), exitBadInput, c.want)
		}
	}
}

// A job whose scene is invalid only in combination fails alone; the
// others are done, and the exit status says some failed.
func TestSweepFailedJobExitStatus(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "base.json"), []byte(sweepBase), 0o644)
	p := filepath.Join(dir, "s.json")
	os.WriteFile(p, []byte(`{"version": 1, "scene": "base.json", "axes": [{"path": "diffraction.g", "values": [[2,0,0],[0,0,2],[0,2,0]]}], "combine": "grid", "outputs": ["tiff"], "labels": false}`), 0o644)
	var so, se bytes.Buffer
	out := filepath.Join(dir, "out")
	code := run(context.Background(), []string{"sweep", p, "-o", out, "--workers", "2"}, &so, &se)
	if code != exitJobsFailed || !strings.Contains(se.String(), "error: shard 0/1: 1 of 3 jobs failed (first: job 1: diffraction.g: [0 0 2] is not perpendicular to the beam") {
		t.Fatalf("exit %d, stderr %q", code, se.String())
	}
	so.Reset()
	se.Reset()
	code = run(context.Background(), []string{"sweep", "merge", out}, &so, &se)
	if code != exitJobsFailed || !strings.Contains(se.String(), "2 of 3 jobs done; 1 failed (jobs 1)") {
		t.Fatalf("merge: exit %d, stderr %q", code, se.String())
	}
}
