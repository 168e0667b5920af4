package sweep

import (
	"context"
	"encoding/json"
	"runtime"
	"strings"
	"sync"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

// Replay over a sweep's conditions.
//
// Jobs that differ only in their conditions (the deviation in any of its
// forms, the thickness, the model, the number of beams, the extinction
// distance, the absorption) share their displacement field; their images
// are replayed from field samples recorded once (sim.Record, sim.Samples.Replay)
// instead of each evaluating the field afresh.
//
// So that a job's image does not depend on which worker or shard ran it,
// or on what ran before, every job of such a group is replayed — none is
// rendered directly — from samples recorded on the group's canonical
// scene: the job's scene with those condition fields taken from the base
// scene and the thickness the largest of any job in the group. Whether a
// job belongs to a group of two or more is decided over the whole sweep
// before any job runs. A replay agrees with a fresh render within 1e-4 of
// the incident beam (sim.TestReplayAgreesWithRender), and is bit for bit
// the same whoever runs it.

// conditionPaths are the scene paths whose change leaves the displacement
// field alone.
var conditionPaths = []string{
	"diffraction.s_per_nm", "diffraction.w", "diffraction.weak_beam",
	"diffraction.deviation_from_kikuchi", "diffraction.model", "diffraction.beams",
	"diffraction.extinction_nm", "diffraction.absorption_ratio", "foil.thickness_nm",
}

// replayConditions turns the replay over conditions on; off only to
// measure what it saves (BenchmarkSweepJobs).
var replayConditions = true

// isCondition reports whether the axis path p is, or lies within, a
// condition path.
func isCondition(p string) bool {
	for _, c := range conditionPaths {
		if p == c || strings.HasPrefix(p, c+".") {
			return true
		}
	}
	return false
}

// replayPlan holds, for every job of the sweep, the signature of its
// group ("" for a job rendered directly) and, per group, the largest
// thickness.
type replayPlan struct {
	sig  []string
	maxT map[string]float64
}

// planReplay groups the jobs that differ only in their conditions. It
// returns nil when no axis varies a condition (every job then renders
// directly).
func (sw *Sweep) planReplay() *replayPlan {
	if !replayConditions {
		return nil
	}
	any := false
	for _, a := range sw.File.Axes {
		if isCondition(a.Path) {
			any = true
		}
	}
	if !any {
		return nil
	}
	p := &replayPlan{sig: make([]string, sw.Jobs), maxT: map[string]float64{}}
	count := map[string]int{}
	for k := 0; k < sw.Jobs; k++ {
		sc, _, err := sw.Scene(k)
		if err != nil {
			continue // the job fails on its own
		}
		c := sw.canonical(sc)
		c.Foil.ThicknessNm = 0
		b, err := json.Marshal(c)
		if err != nil {
			continue
		}
		s := string(b)
		p.sig[k] = s
		count[s]++
		if sc.Foil.ThicknessNm > p.maxT[s] {
			p.maxT[s] = sc.Foil.ThicknessNm
		}
	}
	for k, s := range p.sig {
		if count[s] < 2 {
			p.sig[k] = ""
		}
	}
	return p
}

// canonical returns sc with its condition fields taken from the base
// scene.
func (sw *Sweep) canonical(sc *scene.Scene) *scene.Scene {
	c := cloneScene(sc)
	b := sw.Base.Diffraction
	d := &c.Diffraction
	d.SPerNm, d.W, d.WeakBeam, d.Kikuchi = b.SPerNm, b.W, b.WeakBeam, b.Kikuchi
	d.Model, d.Beams, d.ExtinctionNm, d.AbsorptionRatio = b.Model, b.Beams, b.ExtinctionNm, b.AbsorptionRatio
	c.Foil.ThicknessNm = sw.Base.Foil.ThicknessNm
	return c
}

// sampleCache holds the recorded samples of the most recent groups,
// shared by the workers; each group is recorded once while it is held.
type sampleCache struct {
	mu    sync.Mutex
	m     map[string]*cacheEntry
	order []string
	max   int
}

type cacheEntry struct {
	once sync.Once
	s    *sim.Samples
}

func newSampleCache(max int) *sampleCache {
	return &sampleCache{m: map[string]*cacheEntry{}, max: max}
}

// get returns the samples of group sig, recording them with record the
// first time; nil when they could not be recorded (over the memory cap,
// or the canonical scene fails), and the job then renders directly.
func (c *sampleCache) get(sig string, record func() *sim.Samples) *sim.Samples {
	c.mu.Lock()
	e := c.m[sig]
	if e == nil {
		e = &cacheEntry{}
		c.m[sig] = e
		c.order = append(c.order, sig)
		for len(c.order) > c.max {
			delete(c.m, c.order[0])
			c.order = c.order[1:]
		}
	}
	c.mu.Unlock()
	e.once.Do(func() { e.s = record() })
	return e.s
}

// replayJob renders job k (scene sc, built as st) by replaying its
// group's samples; ok is false when the job is not in a group or its
// group's samples could not be recorded (the caller then renders it
// directly, which is also what every other run of the sweep does for it).
func (sw *Sweep) replayJob(ctx context.Context, plan *replayPlan, cache *sampleCache, k int, sc *scene.Scene, st *scene.Setup) (*sim.Image, bool, error) {
	if plan == nil || plan.sig[k] == "" {
		return nil, false, nil
	}
	sig := plan.sig[k]
	s := cache.get(sig, func() *sim.Samples {
		c := sw.canonical(sc)
		c.Foil.ThicknessNm = plan.maxT[sig]
		cst, err := scene.Build(c, sw.SceneDir)
		if err != nil {
			return nil
		}
		// The other workers wait for this group: record with every core.
		_, s, err := sim.Record(ctx, cst.Problem, sim.RecordOptions{Options: sim.Options{Workers: runtime.GOMAXPROCS(0)}})
		if err != nil {
			return nil
		}
		return s
	})
	if s == nil || !s.ServesGeometry(st.Problem) {
		return nil, false, nil
	}
	im, err := export.ReplaySameGeometry(ctx, s, st, sim.Options{Workers: 1})
	return im, true, err
}
