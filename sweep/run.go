package sweep

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"faultline/export"
	"faultline/figure"
	"faultline/internal/atomicfile"
	"faultline/scene"
	"faultline/sim"
)

// RunOptions control a shard run.
type RunOptions struct {
	Shard Shard
	// Workers is the number of jobs run at once (0: GOMAXPROCS). Each job
	// renders on one goroutine: jobs, not columns, are the unit of
	// parallel work, which keeps every job's result independent of K.
	Workers int
	// Progress, if not nil, receives progress lines.
	Progress io.Writer
	// Version is recorded with every job (Version() if empty).
	Version string
}

// Summary is what a shard run did.
type Summary struct {
	Shard Shard
	// Jobs is the number of jobs in the shard; Skipped were done and
	// verified before; Done ran now and succeeded; Failed ran now and
	// failed.
	Jobs, Skipped, Done, Failed int
	// Replayed counts the jobs done now by replaying field samples.
	Replayed int
	// Failures are the records of the failed jobs, by k.
	Failures []Record
	Elapsed  time.Duration
}

// ErrJobsFailed is returned (wrapped) by Run and Merge when some jobs
// failed; the command line exits with status 3.
var ErrJobsFailed = errors.New("some jobs failed")

// Run runs the jobs of opt.Shard into dir. Jobs already recorded as done
// in the shard's manifest, whose files are present and match their
// hashes, are skipped; the manifest is first rewritten to hold only those,
// so a shard killed part way restarts with no half-written job counted. A
// job whose scene is invalid is recorded as failed with its one-line
// error and the others go on; Run then returns ErrJobsFailed with the
// summary.
func Run(ctx context.Context, sw *Sweep, dir string, opt RunOptions) (*Summary, error) {
	start := time.Now()
	if opt.Shard.N == 0 {
		opt.Shard = Shard{I: 0, N: 1}
	}
	if opt.Workers <= 0 {
		opt.Workers = runtime.GOMAXPROCS(0)
	}
	if opt.Version == "" {
		opt.Version = Version()
	}
	if err := claimDir(dir, sw); err != nil {
		return nil, err
	}
	mpath := filepath.Join(dir, ManifestName(opt.Shard.I))
	done, err := restart(dir, mpath, sw, opt.Shard)
	if err != nil {
		return nil, err
	}
	var todo []int
	sum := &Summary{Shard: opt.Shard}
	for k := opt.Shard.I; k < sw.Jobs; k += opt.Shard.N {
		sum.Jobs++
		if done[k] {
			sum.Skipped++
			continue
		}
		todo = append(todo, k)
	}
	// Jobs that differ only in their conditions replay one group's field
	// samples (see replay.go); each group's jobs run one after another.
	plan := sw.planReplay()
	if plan != nil {
		first := map[string]int{}
		for k := sw.Jobs - 1; k >= 0; k-- {
			if s := plan.sig[k]; s != "" {
				first[s] = k
			}
		}
		group := func(k int) int {
			if s := plan.sig[k]; s != "" {
				return first[s]
			}
			return k
		}
		sort.SliceStable(todo, func(a, b int) bool { return group(todo[a]) < group(todo[b]) })
	}
	cache := newSampleCache(opt.Workers + 1)
	mw, err := openManifest(mpath)
	if err != nil {
		return nil, err
	}
	defer mw.close()
	say := func(format string, args ...any) {
		if opt.Progress != nil {
			fmt.Fprintf(opt.Progress, "sweep: "+format+"\n", args...)
		}
	}
	say("shard %s (%s): %d of %d jobs, %d done before, %d to run with %d workers", opt.Shard, opt.Shard.Source, sum.Jobs, sw.Jobs, sum.Skipped, len(todo), opt.Workers)

	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	jobs := make(chan int)
	var (
		mu       sync.Mutex
		firstErr error
		finished int
		lastSay  time.Time
	)
	runStart := time.Now()
	var wg sync.WaitGroup
	for w := 0; w < opt.Workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			// One builder per worker: consecutive jobs that change only
			// the conditions (t, s) reuse the material and the defects'
			// fields.
			var b scene.Builder
			for k := range jobs {
				r, err := sw.runJob(ctx, &b, plan, cache, dir, k, opt.Shard, opt.Version)
				if err == nil {
					err = mw.append(r)
				}
				mu.Lock()
				if err != nil {
					if firstErr == nil {
						firstErr = err
					}
					cancel()
					mu.Unlock()
					continue
				}
				finished++
				if r.Status == StatusOK {
					sum.Done++
					if r.Replayed {
						sum.Replayed++
					}
				} else {
					sum.Failed++
					sum.Failures = append(sum.Failures, r)
				}
				if now := time.Now(); now.Sub(lastSay) >= time.Second || finished == len(todo) {
					lastSay = now
					el := now.Sub(runStart)
					left := time.Duration(float64(el) / float64(finished) * float64(len(todo)-finished))
					say("%d/%d done (%d failed), %d left, about %s left", sum.Skipped+finished, sum.Jobs, sum.Failed, len(todo)-finished, left.Round(time.Second))
				}
				mu.Unlock()
			}
		}()
	}
feed:
	for _, k := range todo {
		select {
		case jobs <- k:
		case <-ctx.Done():
			break feed
		}
	}
	close(jobs)
	wg.Wait()
	sum.Elapsed = time.Since(start)
	if firstErr != nil {
		return sum, firstErr
	}
	if err := ctx.Err(); err != nil {
		return sum, err
	}
	sort.Slice(sum.Failures, func(a, b int) bool { return sum.Failures[a].K < sum.Failures[b].K })
	if sum.Failed > 0 {
		return sum, fmt.Errorf("shard %s: %d of %d jobs failed (first: job %d: %s): %w", opt.Shard, sum.Failed, sum.Jobs, sum.Failures[0].K, sum.Failures[0].Error, ErrJobsFailed)
	}
	return sum, nil
}

// restart reads the shard's manifest, keeps the records of jobs done whose
// files verify, rewrites the manifest with only those (atomically), and
// returns their ks.
func restart(dir, mpath string, sw *Sweep, sh Shard) (map[int]bool, error) {
	done := map[int]bool{}
	// Temporary directories of this shard's jobs left by a killed run
	// (other shards may be writing theirs now).
	if entries, err := os.ReadDir(filepath.Join(dir, "jobs")); err == nil {
		for _, e := range entries {
			name, _, ok := strings.Cut(strings.TrimPrefix(e.Name(), "."), ".tmp-")
			k, err := strconv.Atoi(name)
			if ok && err == nil && strings.HasPrefix(e.Name(), ".") && sh.Has(k) {
				if err := os.RemoveAll(filepath.Join(dir, "jobs", e.Name())); err != nil {
					return nil, err
				}
			}
		}
	}
	recs, torn, err := readManifest(mpath)
	if errors.Is(err, os.ErrNotExist) {
		return done, nil
	}
	if err != nil {
		return nil, errf("-o", "%v", err)
	}
	var keep []Record
	byK := map[int]int{}
	for _, r := range recs {
		if r.Sweep != sw.Hash {
			return nil, errf("-o", "%s records sweep %.12s…, not this one (%.12s…); use another directory", mpath, r.Sweep, sw.Hash)
		}
		if r.Shard != sh.String() {
			return nil, errf("--shard", "%s was written as shard %s; run it again as %s (the shard count of a directory is fixed)", mpath, r.Shard, r.Shard)
		}
		if r.Status != StatusOK || verify(dir, r) != "" {
			continue
		}
		if i, ok := byK[r.K]; ok {
			keep[i] = r
			continue
		}
		byK[r.K] = len(keep)
		keep = append(keep, r)
		done[r.K] = true
	}
	if torn || len(keep) != len(recs) {
		data, err := encodeRecords(keep)
		if err != nil {
			return nil, err
		}
		if err := atomicfile.WriteFile(mpath, data); err != nil {
			return nil, err
		}
	}
	return done, nil
}

// runJob runs job k: its files are written into a temporary directory
// beside jobs/k, which is renamed into place once complete, so jobs/k is
// either absent or whole. A scene that is invalid, fails to build or
// fails to render gives a failed record; only a failure to write (or a
// cancelled context) is an error.
func (sw *Sweep) runJob(ctx context.Context, b *scene.Builder, plan *replayPlan, cache *sampleCache, dir string, k int, sh Shard, version string) (Record, error) {
	start := time.Now()
	r := Record{K: k, Shard: sh.String(), Sweep: sw.Hash, Version: version}
	fail := func(err error) (Record, error) {
		r.Status = StatusFailed
		r.Error = oneLine(err.Error())
		r.Seconds = roundSeconds(time.Since(start))
		return r, nil
	}
	sc, ov, err := sw.Scene(k)
	r.Overrides = ov
	if err != nil {
		return fail(err)
	}
	st, err := b.Build(sc, sw.SceneDir)
	if err != nil {
		return fail(err)
	}
	im, replayed, err := sw.replayJob(ctx, plan, cache, k, sc, st)
	r.Replayed = replayed
	if err == nil && !replayed {
		im, err = export.Render(ctx, st, sim.Options{Workers: 1})
	}
	if err != nil {
		if ctx.Err() != nil {
			return r, ctx.Err()
		}
		return fail(err)
	}
	if err := sw.addNoise(im, k); err != nil {
		return fail(err)
	}
	files, err := sw.jobFiles(st, im, sc)
	if err != nil {
		return fail(err)
	}
	final := filepath.Join(dir, JobDir(k))
	tmp, err := os.MkdirTemp(filepath.Join(dir, "jobs"), "."+strconv.Itoa(k)+".tmp-")
	if err != nil {
		return r, err
	}
	defer os.RemoveAll(tmp) // only left when something failed
	// The files are written as one set into a fresh directory, and the
	// directory is renamed into place: jobs/k is whole or absent.
	if err := atomicfile.WriteSet(ctx, tmp, files); err != nil {
		return r, err
	}
	for _, f := range files {
		sum, n, err := hashFile(filepath.Join(tmp, f.Name))
		if err != nil {
			return r, err
		}
		r.Files = append(r.Files, FileRecord{Name: f.Name, SHA256: sum, Bytes: n})
	}
	if err := os.Chmod(tmp, 0o755); err != nil {
		return r, err
	}
	// A jobs/k left by an earlier run that was not recorded as done.
	if err := os.RemoveAll(final); err != nil {
		return r, err
	}
	if err := os.Rename(tmp, final); err != nil {
		return r, err
	}
	if d, err := os.Open(filepath.Join(dir, "jobs")); err == nil {
		d.Sync()
		d.Close()
	}
	r.Status = StatusOK
	r.Seconds = roundSeconds(time.Since(start))
	return r, nil
}

func roundSeconds(d time.Duration) float64 {
	return float64(d.Round(time.Millisecond)) / float64(time.Second)
}

// jobFiles lists the files of a job: the asked-for outputs, the job's
// scene, and the labels.
func (sw *Sweep) jobFiles(st *scene.Setup, im *sim.Image, sc *scene.Scene) ([]atomicfile.File, error) {
	sceneJSON, err := scene.Marshal(sc)
	if err != nil {
		return nil, err
	}
	text := map[string]string{export.KeyScene: string(sceneJSON), export.KeySoftware: "Faultline"}
	files := []atomicfile.File{{Name: "scene.json", Encode: func(w io.Writer) error { _, err := w.Write(sceneJSON); return err }}}
	g := im.Grid
	for _, o := range sw.File.Outputs {
		switch o {
		case "png":
			bf, df, err := export.Grays(im, export.Options{}.Mapping)
			if err != nil {
				return nil, err
			}
			files = append(files,
				atomicfile.File{Name: "bf.png", Encode: func(w io.Writer) error { return figure.EncodePNG(w, bf, text) }},
				atomicfile.File{Name: "df.png", Encode: func(w io.Writer) error { return figure.EncodePNG(w, df, text) }})
		case "tiff":
			files = append(files,
				atomicfile.File{Name: "bf.tiff", Encode: func(w io.Writer) error { return figure.EncodeFloatTIFF(w, im.BF(), g.NX, g.NY) }},
				atomicfile.File{Name: "df.tiff", Encode: func(w io.Writer) error { return figure.EncodeFloatTIFF(w, im.DF(), g.NX, g.NY) }})
		case "figure":
			fig, err := export.Figure(st, im, export.DefaultOptions())
			if err != nil {
				return nil, err
			}
			files = append(files, atomicfile.File{Name: "figure.png", Encode: func(w io.Writer) error { return figure.EncodePNG(w, fig, text) }})
		}
	}
	if sw.File.Labels {
		lf, err := sw.labelFiles(st)
		if err != nil {
			return nil, err
		}
		files = append(files, lf...)
	}
	return files, nil
}
