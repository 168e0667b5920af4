package sweep

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"faultline/export"
	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

const testScene = `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
 "foil": {"thickness_nm": 100},
 "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 50]},
             {"type": "loop", "b": "1/3[1 1 1]", "normal": [1, 1, 1], "radius_nm": 5, "at_nm": [10, 10, 40]}],
 "image": {"width_nm": 60, "height_nm": 60, "pixels": [12, 12]}}`

func load(t testing.TB, sweepText string, force ...bool) *Sweep {
	t.Helper()
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "base.json"), []byte(testScene), 0o644); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "sweep.json")
	if err := os.WriteFile(p, []byte(sweepText), 0o644); err != nil {
		t.Fatal(err)
	}
	sw, err := Load(p, len(force) > 0 && force[0])
	if err != nil {
		t.Fatal(err)
	}
	return sw
}

// outputFiles reads the files of an output directory that do not depend on
// how the sweep was run (all but the manifests).
func outputFiles(t testing.TB, dir string) map[string][]byte {
	t.Helper()
	files := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() || strings.HasPrefix(d.Name(), "manifest-") {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		files[rel], err = os.ReadFile(p)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

func sameOutput(t *testing.T, a, b map[string][]byte) {
	t.Helper()
	for n, x := range a {
		if y, ok := b[n]; !ok {
			t.Errorf("%s only in the first output", n)
		} else if !bytes.Equal(x, y) {
			t.Errorf("%s differs", n)
		}
	}
	for n := range b {
		if _, ok := a[n]; !ok {
			t.Errorf("%s only in the second output", n)
		}
	}
}

const gridSweep = `{"version": 1, "scene": "base.json", "axes": [
   {"path": "foil.thickness_nm", "values": [60, 80, 100]},
   {"path": "diffraction.s_per_nm", "range": [-0.02, 0.02, 0.01]},
   {"path": "defects[1].radius_nm", "values": [4]}],
 "combine": "grid", "outputs": ["tiff", "png", "figure"], "labels": true,
 "seed": 11, "noise": {"dose_e_per_px": 200, "blur_nm": 2}}`

// Shards 0/3, 1/3 and 2/3 followed by merge give the same files, bit for
// bit, as one unsharded run (with noise: each job's generator depends on
// the sweep seed and k only).
func TestShardsEqualUnsharded(t *testing.T) {
	sw := load(t, gridSweep)
	if sw.Jobs != 15 {
		t.Fatalf("%d jobs, want 3 × 5 × 1 = 15", sw.Jobs)
	}
	ctx := context.Background()
	one := filepath.Join(t.TempDir(), "one")
	if _, err := Run(ctx, sw, one, RunOptions{Workers: 2}); err != nil {
		t.Fatal(err)
	}
	if _, err := Merge(one); err != nil {
		t.Fatal(err)
	}
	three := filepath.Join(t.TempDir(), "three")
	for i := 0; i < 3; i++ {
		sum, err := Run(ctx, sw, three, RunOptions{Shard: Shard{I: i, N: 3}, Workers: 1 + i%2})
		if err != nil {
			t.Fatal(err)
		}
		if sum.Jobs != 5 || sum.Done != 5 {
			t.Errorf("shard %d/3: %d jobs, %d done; want 5 and 5", i, sum.Jobs, sum.Done)
		}
	}
	rep, err := Merge(three)
	if err != nil {
		t.Fatal(err)
	}
	if rep.ContactSheet == "" {
		t.Errorf("no contact sheet for a grid of two varied axes: %s", rep.ContactNote)
	}
	a, b := outputFiles(t, one), outputFiles(t, three)
	if len(a) != 1+15*8+2 {
		t.Errorf("%d files, want the plan, 15 × 8 job files, index and contact sheet", len(a))
	}
	sameOutput(t, a, b)

	// index.csv: a header and one row per job, with the axis values.
	idx := string(a["index.csv"])
	lines := strings.Split(strings.TrimSpace(idx), "\n")
	if len(lines) != 16 || !strings.HasPrefix(lines[0], "k,status,foil.thickness_nm,diffraction.s_per_nm,defects[1].radius_nm,") {
		t.Fatalf("index.csv:\n%s", idx)
	}
	// Job 7 of the grid (first axis slowest): thickness index 1, s index 2.
	if !strings.HasPrefix(lines[8], "7,ok,80,0,4,") {
		t.Errorf("index row of job 7 = %q, want 7,ok,80,0,4,...", lines[8])
	}
}

// Restart: a job whose files were damaged, one never recorded and a torn
// manifest line are redone; nothing is done twice.
func TestRestartRedoesOnlyWhatIsNotDone(t *testing.T) {
	sw := load(t, gridSweep)
	ctx := context.Background()
	dir := t.TempDir()
	if _, err := Run(ctx, sw, dir, RunOptions{Workers: 2}); err != nil {
		t.Fatal(err)
	}
	want := outputFiles(t, dir)
	mpath := filepath.Join(dir, ManifestName(0))
	recs, _, err := readManifest(mpath)
	if err != nil {
		t.Fatal(err)
	}
	// Damage job a's file, drop job b's record, leave a torn line.
	a, b := recs[2].K, recs[5].K
	os.WriteFile(filepath.Join(dir, JobDir(a), "bf.tiff"), []byte("truncated"), 0o644)
	var keep []Record
	for _, r := range recs {
		if r.K != b {
			keep = append(keep, r)
		}
	}
	data, _ := encodeRecords(keep)
	data = append(data, []byte(`{"k": 3, "shard": "0/1", "sta`)...)
	os.WriteFile(mpath, data, 0o644)

	sum, err := Run(ctx, sw, dir, RunOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if sum.Skipped != 13 || sum.Done != 2 {
		t.Errorf("restart: %d skipped, %d run; want 13 and 2 (jobs %d and %d)", sum.Skipped, sum.Done, a, b)
	}
	rep, err := Merge(dir)
	if err != nil {
		t.Fatalf("merge after restart: %v", err)
	}
	if rep.OK != 15 {
		t.Errorf("%d jobs ok after restart", rep.OK)
	}
	recs, torn, _ := readManifest(mpath)
	if torn || len(recs) != 15 {
		t.Errorf("manifest after restart: %d records, torn %v; want 15, false", len(recs), torn)
	}
	got := outputFiles(t, dir)
	delete(got, "index.csv")
	delete(got, "contact-sheet.png")
	sameOutput(t, want, got)
}

// Merge names a missing job, a corrupt one and a duplicate.
func TestMergeNamesProblems(t *testing.T) {
	sw := load(t, strings.Replace(gridSweep, `"labels": true,`, `"labels": false,`, 1))
	ctx := context.Background()
	dir := t.TempDir()
	for i := 0; i < 3; i++ {
		if _, err := Run(ctx, sw, dir, RunOptions{Shard: Shard{I: i, N: 3}, Workers: 2}); err != nil {
			t.Fatal(err)
		}
	}
	os.Remove(filepath.Join(dir, ManifestName(2))) // jobs 2, 5, 8, 11, 14 missing
	os.WriteFile(filepath.Join(dir, JobDir(4), "df.png"), []byte("x"), 0o644)
	recs, _, _ := readManifest(filepath.Join(dir, ManifestName(0)))
	data, _ := encodeRecords(recs[:1])
	f, _ := os.OpenFile(filepath.Join(dir, ManifestName(1)), os.O_APPEND|os.O_WRONLY, 0)
	f.Write(data)
	f.Close()
	rep, err := Merge(dir)
	if !errors.Is(err, ErrJobsFailed) {
		t.Fatalf("merge: %v", err)
	}
	s := rep.Summary()
	for _, w := range []string{"9 of 15 jobs done", "5 missing (jobs 2, 5, 8, 11, 14)", "1 corrupt (jobs 4)", "1 duplicate (jobs " + itoa(recs[0].K) + ")"} {
		if !strings.Contains(s, w) {
			t.Errorf("summary %q lacks %q", s, w)
		}
	}
	idx, _ := os.ReadFile(filepath.Join(dir, IndexName))
	if !strings.Contains(string(idx), "\n2,missing,") || !strings.Contains(string(idx), "\n4,corrupt,") {
		t.Errorf("index.csv does not mark the missing and corrupt jobs:\n%s", idx)
	}
}

func itoa(k int) string { return strconv.Itoa(k) }

const randomSweep = `{"version": 1, "scene": "base.json", "axes": [
   {"path": "foil.thickness_nm", "distribution": "uniform", "min": 50, "max": 150},
   {"path": "diffraction.s_per_nm", "distribution": "normal", "mean": 0.01, "sd": 0.005},
   {"path": "diffraction.g", "distribution": "choice", "values": [[2,0,0],[0,2,0],[2,2,0]]}],
 "combine": "random", "count": 2000, "seed": 2024, "outputs": ["tiff"], "labels": false}`

// A random sweep is reproducible from its seed: the same overrides for job
// k from a second load, whatever else was drawn; another seed gives other
// values; and the draws follow their distributions.
func TestRandomSweepReproducible(t *testing.T) {
	a, b := load(t, randomSweep), load(t, randomSweep)
	c := load(t, strings.Replace(randomSweep, `"seed": 2024`, `"seed": 2025`, 1))
	// Draw b's jobs in reverse: job k does not depend on the jobs before.
	bj := make([][]Override, b.Jobs)
	for k := b.Jobs - 1; k >= 0; k-- {
		bj[k] = b.Job(k)
	}
	var sumT, sumS, sumS2 float64
	choices := map[string]int{}
	same := 0
	for k := 0; k < a.Jobs; k++ {
		ja := a.Job(k)
		x, _ := json.Marshal(ja)
		y, _ := json.Marshal(bj[k])
		if !bytes.Equal(x, y) {
			t.Fatalf("job %d: %s then %s", k, x, y)
		}
		z, _ := json.Marshal(c.Job(k))
		if bytes.Equal(x, z) {
			same++
		}
		var th, s float64
		json.Unmarshal(ja[0].Value, &th)
		json.Unmarshal(ja[1].Value, &s)
		if th < 50 || th >= 150 {
			t.Fatalf("job %d: uniform thickness %g outside [50, 150)", k, th)
		}
		sumT += th
		sumS += s
		sumS2 += s * s
		choices[compact(ja[2].Value)]++
	}
	if same > 0 {
		t.Errorf("%d jobs have the same draws under another seed", same)
	}
	n := float64(a.Jobs)
	// Sample means within 4 standard errors (σ/√n) of the distribution
	// means; textbook sampling statistics.
	if m, se := sumT/n, (100/math.Sqrt(12))/math.Sqrt(n); math.Abs(m-100) > 4*se {
		t.Errorf("uniform mean %g, want 100 ± %g", m, 4*se)
	}
	mean := sumS / n
	if se := 0.005 / math.Sqrt(n); math.Abs(mean-0.01) > 4*se {
		t.Errorf("normal mean %g, want 0.01 ± %g", mean, 4*se)
	}
	if sd := math.Sqrt(sumS2/n - mean*mean); math.Abs(sd-0.005) > 0.005*4/math.Sqrt(2*n) {
		t.Errorf("normal sd %g, want 0.005", sd)
	}
	for v, cnt := range choices {
		// Binomial(2000, 1/3): sd ≈ 21.
		if math.Abs(float64(cnt)-n/3) > 4*math.Sqrt(n/3*2/3) {
			t.Errorf("choice %s drawn %d times of %d", v, cnt, a.Jobs)
		}
	}
	if len(choices) != 3 {
		t.Errorf("choices drawn: %v", choices)
	}
}

func TestRangeValues(t *testing.T) {
	vals, err := rangeValues("r", []float64{-0.02, 0.02, 0.005}, false)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, v := range vals {
		got = append(got, string(v))
	}
	want := "-0.02 -0.015 -0.01 -0.005 0 0.005 0.01 0.015 0.02"
	if strings.Join(got, " ") != want {
		t.Errorf("range = %s, want %s", strings.Join(got, " "), want)
	}
	if vals, _ := rangeValues("r", []float64{100, 80, -10}, false); len(vals) != 3 {
		t.Errorf("descending range: %d values", len(vals))
	}
}

func TestShardFromEnv(t *testing.T) {
	env := func(kv ...string) func(string) string {
		m := map[string]string{}
		for i := 0; i+1 < len(kv); i += 2 {
			m[kv[i]] = kv[i+1]
		}
		return func(k string) string { return m[k] }
	}
	for _, c := range []struct {
		flag   string
		shards int
		env    func(string) string
		want   string // "I/N source" or "error: ..."
	}{
		{"1/3", 0, env(), "1/3 --shard 1/3"},
		{"", 0, env(), "0/1 no shard given: the whole sweep"},
		{"", 0, env("SLURM_ARRAY_TASK_ID", "2", "SLURM_ARRAY_TASK_COUNT", "3"), "2/3 Slurm job array: SLURM_ARRAY_TASK_ID=2"},
		{"", 0, env("SLURM_ARRAY_TASK_ID", "5", "SLURM_ARRAY_TASK_MIN", "4", "SLURM_ARRAY_TASK_MAX", "7"), "1/4 Slurm job array: SLURM_ARRAY_TASK_ID=5, SLURM_ARRAY_TASK_MIN=4"},
		{"", 4, env("JOB_COMPLETION_INDEX", "3"), "3/4 Kubernetes Indexed Job: JOB_COMPLETION_INDEX=3"},
		{"", 0, env("JOB_COMPLETION_INDEX", "3"), "error: --shards: JOB_COMPLETION_INDEX is set"},
		{"", 3, env("JOB_COMPLETION_INDEX", "3"), "error: JOB_COMPLETION_INDEX: shard 3 of 3"},
		{"3/3", 0, env(), "error: --shard: shard 3 of 3: shards are numbered 0 to 2"},
		{"a/b", 0, env(), "error: --shard: \"a/b\": write I/N"},
		{"", 0, env("SLURM_ARRAY_TASK_ID", "x"), "error: SLURM_ARRAY_TASK_ID: \"x\" is not a whole number"},
	} {
		sh, err := ShardFromEnv(c.flag, c.shards, c.env)
		got := sh.String() + " " + sh.Source
		if err != nil {
			got = "error: " + err.Error()
		}
		if !strings.HasPrefix(got, c.want) {
			t.Errorf("ShardFromEnv(%q, %d) = %q, want %q", c.flag, c.shards, got, c.want)
		}
	}
}

// The noise: the mean is kept (count/dose) and the variance of a uniform
// image is I/D, as for Poisson counts (textbook: a Poisson variable's
// variance equals its mean).
func TestShotNoiseStatistics(t *testing.T) {
	sw := load(t, `{"version": 1, "scene": "base.json", "axes": [{"path": "defects", "values": [[]]}, {"path": "image.pixels", "values": [[200, 200]]}],
	  "combine": "grid", "seed": 3, "noise": {"dose_e_per_px": 50}, "outputs": ["tiff"], "labels": false}`)
	sc, _, err := sw.Scene(0)
	if err != nil {
		t.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	im, err := renderForTest(st)
	if err != nil {
		t.Fatal(err)
	}
	clean := append([]float64(nil), im.BF()...)
	if err := sw.addNoise(im, 0); err != nil {
		t.Fatal(err)
	}
	var m, v float64
	bf := im.BF()
	for i, x := range bf {
		m += x - clean[i]
	}
	n := float64(len(bf))
	m /= n
	for i, x := range bf {
		d := x - clean[i] - m
		v += d * d
	}
	v /= n - 1
	I := clean[0]
	want := I / 50
	if math.Abs(m) > 4*math.Sqrt(want/n) {
		t.Errorf("noise mean %g, want 0 ± %g", m, 4*math.Sqrt(want/n))
	}
	// The sample variance's standard error is about want·sqrt(2/n).
	if math.Abs(v-want) > 4*want*math.Sqrt(2/n) {
		t.Errorf("noise variance %g, want I/D = %g", v, want)
	}
}

func renderForTest(st *scene.Setup) (*sim.Image, error) {
	return export.Render(context.Background(), st, sim.Options{})
}

// The sweep's hash covers the bytes of the CIF files its scenes name: an
// edited CIF makes a different sweep, so a restart does not mistake the
// old jobs for done.
func TestHashCoversCIF(t *testing.T) {
	dir := t.TempDir()
	cif, err := os.ReadFile("../crystal/testdata/nacl.cif")
	if err != nil {
		t.Fatal(err)
	}
	write := func(name string, data []byte) {
		if err := os.WriteFile(filepath.Join(dir, name), data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("a.cif", cif)
	write("b.cif", cif)
	sc := &scene.Scene{Crystal: scene.Crystal{CIF: "a.cif"}}
	f := File{Version: 1, Scene: "base.json", Combine: "zip", Outputs: []string{"tiff"},
		Axes: []Axis{{Path: "crystal.cif", Values: []json.RawMessage{json.RawMessage(`"b.cif"`)}}}}
	hash := func() string {
		sw, err := expand(f, sc, dir, false)
		if err != nil {
			t.Fatal(err)
		}
		return sw.Hash
	}
	h0 := hash()
	if hash() != h0 {
		t.Fatal("the hash of an unchanged sweep changed")
	}
	write("a.cif", append(append([]byte(nil), cif...), "\n# edited\n"...))
	h1 := hash()
	if h1 == h0 {
		t.Error("editing the base scene's CIF left the sweep's hash unchanged")
	}
	write("b.cif", append(append([]byte(nil), cif...), "\n# edited\n"...))
	if hash() == h1 {
		t.Error("editing an axis's CIF left the sweep's hash unchanged")
	}
}

// Jobs that differ only in thickness and s (and a model, for some) are
// replayed from one recording of their group's field samples, and every
// job's image agrees with a fresh render of its scene within 1e-4 of the
// incident beam (sim.DefaultTolerance's bound); jobs that differ in a
// defect are rendered directly.
func TestConditionJobsReplayed(t *testing.T) {
	sw := load(t, `{"version": 1, "scene": "base.json", "axes": [
	   {"path": "defects[1].radius_nm", "values": [4, 6]},
	   {"path": "foil.thickness_nm", "values": [60, 100, 140]},
	   {"path": "diffraction.s_per_nm", "values": [-0.01, 0.005, 0.02]}],
	 "combine": "grid", "outputs": ["tiff"], "labels": false}`)
	out := filepath.Join(t.TempDir(), "out")
	sum, err := Run(context.Background(), sw, out, RunOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if sum.Done != 18 || sum.Replayed != 18 {
		t.Errorf("%d jobs done, %d replayed; want 18 and 18 (two groups of nine)", sum.Done, sum.Replayed)
	}
	worst := 0.0
	for k := 0; k < sw.Jobs; k++ {
		sc, _, err := sw.Scene(k)
		if err != nil {
			t.Fatal(err)
		}
		st, err := scene.Build(sc, sw.SceneDir)
		if err != nil {
			t.Fatal(err)
		}
		want, err := export.Render(context.Background(), st, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		for b, name := range []string{"bf.tiff", "df.tiff"} {
			f, err := os.Open(filepath.Join(out, JobDir(k), name))
			if err != nil {
				t.Fatal(err)
			}
			got, _, _, err := figure.ReadFloatTIFF(f)
			f.Close()
			if err != nil {
				t.Fatal(err)
			}
			for i, v := range got {
				worst = math.Max(worst, math.Abs(float64(v)-want.Intensity[b][i]))
			}
		}
	}
	t.Logf("largest difference of a replayed job from a fresh render: %.2g", worst)
	if worst > 1e-4 {
		t.Errorf("a replayed job differs from a fresh render by %.3g", worst)
	}

	// A sweep that varies only a defect has no groups: every job renders.
	sw = load(t, `{"version": 1, "scene": "base.json", "axes": [
	   {"path": "defects[1].radius_nm", "values": [4, 6]}],
	 "combine": "grid", "outputs": ["tiff"], "labels": false}`)
	sum, err = Run(context.Background(), sw, filepath.Join(t.TempDir(), "geo"), RunOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if sum.Replayed != 0 {
		t.Errorf("%d jobs of a defect-only sweep replayed", sum.Replayed)
	}
}
