package sweep

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"testing"
	"time"
)

// BenchmarkSweepJobs runs a 16-job sweep of 32×32 renders (the test
// scene: a dislocation and a loop in Cu, two-beam; thickness × s, so the
// jobs replay one recording of the field samples) with 1 and 2 workers,
// with the replay and with every job rendered directly, and reports jobs
// per second, every job's files written and hashed.
func BenchmarkSweepJobs(b *testing.B) {
	const sweepText = `{"version": 1, "scene": "base.json", "axes": [
	   {"path": "foil.thickness_nm", "values": [60, 80, 100, 120]},
	   {"path": "diffraction.s_per_nm", "values": [-0.01, 0, 0.01, 0.02]},
	   {"path": "image.pixels", "values": [[32, 32]]}],
	 "combine": "grid", "outputs": ["tiff", "png"], "labels": true}`
	sw := load(b, sweepText)
	defer func() { replayConditions = true }()
	for _, c := range []struct {
		workers int
		replay  bool
	}{{1, true}, {2, true}, {1, false}, {2, false}} {
		b.Run(fmt.Sprintf("workers=%d/replay=%v", c.workers, c.replay), func(b *testing.B) {
			replayConditions = c.replay
			workers := c.workers
			var total time.Duration
			for i := 0; i < b.N; i++ {
				dir := b.TempDir()
				start := time.Now()
				if _, err := Run(context.Background(), sw, dir, RunOptions{Workers: workers}); err != nil {
					b.Fatal(err)
				}
				total += time.Since(start)
			}
			b.ReportMetric(float64(sw.Jobs*b.N)/total.Seconds(), "jobs/s")
		})
	}
}

// BenchmarkMerge100k merges a synthetic sweep of 100 000 jobs in 4
// manifests, each job one small file: the cost of merge itself (reading
// the manifests, checking every file's sha256, writing index.csv).
func BenchmarkMerge100k(b *testing.B) {
	const jobs = 100_000
	sw := load(b, `{"version": 1, "scene": "base.json", "axes": [
	   {"path": "foil.thickness_nm", "range": [1, 100000, 1]}],
	 "combine": "grid", "outputs": ["tiff"], "labels": false}`, true)
	b.StopTimer()
	dir := b.TempDir()
	sw2 := sw
	if sw2.Jobs != jobs {
		b.Fatalf("%d jobs", sw2.Jobs)
	}
	if err := claimDir(dir, sw2); err != nil {
		b.Fatal(err)
	}
	mws := make([]*manifestWriter, 4)
	files := make([][]byte, 4)
	for i := range mws {
		var err error
		if mws[i], err = openManifest(filepath.Join(dir, ManifestName(i))); err != nil {
			b.Fatal(err)
		}
	}
	for k := 0; k < jobs; k++ {
		jd := filepath.Join(dir, JobDir(k))
		if err := os.Mkdir(jd, 0o755); err != nil {
			b.Fatal(err)
		}
		data := []byte("job " + strconv.Itoa(k) + "\n")
		if err := os.WriteFile(filepath.Join(jd, "bf.tiff"), data, 0o644); err != nil {
			b.Fatal(err)
		}
		sum := sha256.Sum256(data)
		r := Record{K: k, Shard: fmt.Sprintf("%d/4", k%4), Sweep: sw2.Hash, Overrides: sw2.Job(k),
			Files: []FileRecord{{Name: "bf.tiff", SHA256: hex.EncodeToString(sum[:]), Bytes: int64(len(data))}}, Status: StatusOK, Version: "bench"}
		line, _ := encodeRecords([]Record{r})
		files[k%4] = append(files[k%4], line...)
	}
	for i, mw := range mws {
		mw.f.Write(files[i])
		mw.close()
	}
	b.StartTimer()
	for i := 0; i < b.N; i++ {
		rep, err := Merge(dir)
		if err != nil {
			b.Fatal(err)
		}
		if rep.OK != jobs {
			b.Fatalf("%d ok", rep.OK)
		}
	}
}
