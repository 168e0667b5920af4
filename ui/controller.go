package ui

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sync/atomic"
	"time"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

// Preview settings. Every change is first rendered on a coarse grid over
// the same field, with the same physics, and with the integrator's phase
// tolerance loosened from sim.DefaultTolerance to PreviewTolerance (1e-3
// cycles): on the demo scene the largest error of any pixel is then 9.2e-4
// of the incident beam (the maximum over renders at 64², 128², 256² and
// 512² measured against converged ones; TestPreviewToleranceAccuracy
// bounds it by 1e-3 at 128²), at about half the cost of the default
// tolerance. The grid's longer side starts at
// startPreviewPixels and then follows the measured cost per column so that
// a preview takes about PreviewBudget, between minPreviewPixels and
// DefaultPreviewPixels.
const (
	DefaultPreviewPixels = 64
	startPreviewPixels   = 48
	minPreviewPixels     = 24
	PreviewTolerance     = 1e-3
	PreviewBudget        = 60 * time.Millisecond
)

// RenderFunc renders the problem of a setup (with the scene's blur).
type RenderFunc func(ctx context.Context, st *scene.Setup, opt sim.Options) (*sim.Image, error)

// Where a full-resolution image came from.
const (
	SourceRender = "render" // integrated from the field
	SourceReplay = "replay" // replayed from the field samples of an earlier render
	SourceTable  = "table"  // evaluated from the s table (see Controller.STable)
)

// Result is one finished render.
type Result struct {
	Setup   *scene.Setup
	Image   *sim.Image
	Preview bool // the coarse grid
	// Source is SourceRender, SourceReplay or SourceTable.
	Source string
	// Table is the s table the image was evaluated from (SourceTable).
	Table   *sim.STable
	Elapsed time.Duration // time spent rendering this image
	// Latency is the time from the change that started the render to the
	// moment the result was handed to the UI goroutine.
	Latency time.Duration
	Gen     uint64 // the change this render belongs to
}

// Controller holds the scene being edited and schedules its renders.
//
// Every method must be called on the UI goroutine; the renders run on
// goroutines of their own and hand their results back through Post. A
// Controller with Post set to a function that calls its argument directly
// is usable in tests with no display.
type Controller struct {
	// Post runs f on the UI goroutine (fyne.Do in the program).
	Post func(f func())
	// Render renders a setup; nil means export.Render.
	Render RenderFunc
	// PreviewPixels is the longer side of the preview grid; 0 means
	// DefaultPreviewPixels, a negative value turns the preview off.
	PreviewPixels int
	// Workers is passed to the renderer (0: one per CPU).
	Workers int

	previewSide int // longer side of the next preview, adapted to its cost

	sc        *scene.Scene
	path      string
	savedJSON []byte
	hist      history // undo and redo

	builder  scene.Builder // keeps the stages a change leaves alone
	setup    *scene.Setup
	buildErr error

	gen uint64 // number of the newest change

	// The job in flight: one change rendered as a preview, then in full.
	job        uint64 // id of the job whose results are wanted
	jobGen     uint64 // the change it renders
	cancel     context.CancelFunc
	running    bool
	previewing bool      // in its preview phase
	jobStarted time.Time // when its preview started

	// A change made while a preview is being rendered waits for that
	// preview (so a slider dragged without pause still shows a new image
	// every preview), up to maxPreviewWait.
	pending    *scene.Setup
	pendingGen uint64
	pendingAt  time.Time
	// proceed lets the job go on from its preview to the full render once
	// previewDone has seen no change waiting (otherwise the job is
	// cancelled and its full render never competes with the next preview).
	proceed chan struct{}

	shownGen uint64 // change of the newest result shown

	last     *Result // newest result shown (preview or full)
	lastFull *Result // newest full render

	// samples are the field samples of the newest full render with the
	// default renderer: a change that leaves the field, g and grid alone
	// (s, w, thickness, absorption, model constants) is replayed from
	// them at full resolution, with no preview (see replayable).
	samples *sim.Samples
	// samplesSetup is the setup the samples were recorded for.
	samplesSetup *scene.Setup

	// The s table: after a change of s alone replayed from the samples,
	// a table of the exit intensities over the s range the samples serve
	// (export.NearbyRange) is built in the background; later changes of s
	// alone inside it are evaluated from it (see launch). Any other change
	// drops it, and cancels its build.
	table       *sim.STable
	tableSetup  *scene.Setup // the setup the table (or its build) is for
	tableCancel context.CancelFunc
	tableJob    uint64 // id of the build whose result is wanted
	tableErr    error  // why the last build gave no table
	tableBuild  time.Duration
	onTable     []func()
	// busy counts the renders, replays and table evaluations in flight:
	// the table's build waits while any runs, so that what the user asked
	// for gets the processors first.
	busy atomic.Int32

	onReplaced []func()
	onBuilt    []func(st *scene.Setup, err error)
	onResult   []func(r *Result)
	onProgress []func(done, total int)
	onFailed   []func(err error)
	onState    []func()
}

// NewController returns a controller holding sc (not yet built: call
// Replace or Open to start).
func NewController(post func(func())) *Controller {
	return &Controller{Post: post}
}

// Listeners. Each is called on the UI goroutine.

// OnReplaced registers f to run when the whole scene is replaced (new,
// open): the panels read their fields again.
func (c *Controller) OnReplaced(f func()) { c.onReplaced = append(c.onReplaced, f) }

// OnBuilt registers f to run after every change with the built setup, or
// the error that stopped it (a *scene.FieldError naming the field).
func (c *Controller) OnBuilt(f func(st *scene.Setup, err error)) {
	c.onBuilt = append(c.onBuilt, f)
}

// OnResult registers f to run when a render finishes (preview or full).
func (c *Controller) OnResult(f func(r *Result)) { c.onResult = append(c.onResult, f) }

// OnProgress registers f to run as the full render advances.
func (c *Controller) OnProgress(f func(done, total int)) { c.onProgress = append(c.onProgress, f) }

// OnFailed registers f to run when a render fails for a reason other than
// being superseded.
func (c *Controller) OnFailed(f func(err error)) { c.onFailed = append(c.onFailed, f) }

// OnState registers f to run when the file name or the saved state changes.
func (c *Controller) OnState(f func()) { c.onState = append(c.onState, f) }

// OnTable registers f to run when an s table is built, fails or is
// dropped (see STable).
func (c *Controller) OnTable(f func()) { c.onTable = append(c.onTable, f) }

// STable returns the s table of the current conditions, nil while none
// is built; building reports a build in flight, and err why the last build
// gave no table (nil if it did, or none was tried).
func (c *Controller) STable() (t *sim.STable, building bool, err error) {
	return c.table, c.tableCancel != nil, c.tableErr
}

// STableBuildTime returns the wall time the current s table took to build.
func (c *Controller) STableBuildTime() time.Duration { return c.tableBuild }

// Scene returns the scene being edited. Change it only through Edit.
func (c *Controller) Scene() *scene.Scene { return c.sc }

// Path returns the scene's file, or "" for a scene never saved.
func (c *Controller) Path() string { return c.path }

// Setup returns the setup of the last change that built, or nil.
func (c *Controller) Setup() *scene.Setup {
	if c.buildErr != nil {
		return nil
	}
	return c.setup
}

// LastGoodSetup returns the newest setup that built, even if later changes
// did not.
func (c *Controller) LastGoodSetup() *scene.Setup { return c.setup }

// Err returns the error of the last change, or nil if it built.
func (c *Controller) Err() error { return c.buildErr }

// Rendering reports whether a render is in flight.
func (c *Controller) Rendering() bool { return c.running }

// Last returns the newest result shown, or nil.
func (c *Controller) Last() *Result { return c.last }

// LastFull returns the newest full render, or nil. It belongs to the
// current scene when LastFull().Gen == Gen().
func (c *Controller) LastFull() *Result { return c.lastFull }

// Gen returns the number of the current change.
func (c *Controller) Gen() uint64 { return c.gen }

// Dirty reports whether the scene differs from the file it came from (a
// scene never saved is dirty once it is changed).
func (c *Controller) Dirty() bool {
	data, err := scene.Marshal(c.sc)
	return err != nil || !bytes.Equal(data, c.savedJSON)
}

// Dir is the directory relative paths of the scene (a CIF file) are
// relative to: that of its file, or the working directory.
func (c *Controller) Dir() string {
	if c.path != "" {
		return filepath.Dir(c.path)
	}
	if wd, err := os.Getwd(); err == nil {
		return wd
	}
	return "."
}

// Replace makes sc the scene, from file path ("" for none) and, if saved,
// as it is on disk. It builds and renders it.
func (c *Controller) Replace(sc *scene.Scene, path string, saved bool) {
	c.hist.clear()
	c.sc = sc
	c.path = path
	c.savedJSON = nil
	if saved {
		c.savedJSON, _ = scene.Marshal(sc)
	}
	for _, f := range c.onReplaced {
		f()
	}
	c.fireState()
	c.rebuild()
}

// Open reads the scene file at path. On an error the current scene stays.
func (c *Controller) Open(path string) error {
	sc, err := scene.Load(path)
	if err != nil {
		return err
	}
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	c.Replace(sc, path, true)
	return nil
}

// Save writes the scene to its file. The write is atomic (scene.Save): if
// it fails part way the old file stays as it was.
func (c *Controller) Save() error {
	if c.path == "" {
		return errors.New("the scene has no file yet; use Save as")
	}
	return c.SaveAs(c.path)
}

// SaveAs writes the scene to path and makes that its file.
func (c *Controller) SaveAs(path string) error {
	if err := scene.Save(path, c.sc); err != nil {
		return err
	}
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	c.path = path
	c.savedJSON, _ = scene.Marshal(c.sc)
	c.fireState()
	return nil
}

// Edit applies change to a copy of the scene, makes the copy the scene,
// and builds it: if it builds, a render starts (cancelling the one in
// flight); if not, the error is returned (and sent to the OnBuilt
// listeners) and nothing is rendered.
func (c *Controller) Edit(change func(sc *scene.Scene)) error {
	next := cloneScene(c.sc)
	change(next)
	c.hist.record(c.sc, "")
	c.sc = next
	c.fireState()
	return c.rebuild()
}

// Set applies the edits to a copy of the scene with scene.SetAll and, if
// the scene takes them, makes the copy the scene and builds it (see Edit).
// If not, the scene stays as it was, the error is returned and sent to the
// OnBuilt listeners, and the render in flight is stopped: what is shown no
// longer answers what was asked.
func (c *Controller) Set(edits ...scene.Edit) error {
	next := cloneScene(c.sc)
	if err := scene.SetAll(next, edits...); err != nil {
		c.gen++
		c.stop()
		c.buildErr = err
		for _, f := range c.onBuilt {
			f(nil, err)
		}
		return err
	}
	c.hist.record(c.sc, editKey(edits))
	c.sc = next
	c.fireState()
	return c.rebuild()
}

// Rebuild builds the scene again and renders it (after something outside
// the scene changed, such as a CIF file on disk).
func (c *Controller) Rebuild() error { return c.rebuild() }

func (c *Controller) rebuild() error {
	changed := time.Now()
	c.gen++
	st, err := c.builder.Build(c.sc, c.Dir())
	if err != nil {
		// A render in flight would show a scene that is no longer the one
		// edited: stop it.
		c.stop()
		c.buildErr = err
		for _, f := range c.onBuilt {
			f(nil, err)
		}
		return err
	}
	c.setup, c.buildErr = st, nil
	for _, f := range c.onBuilt {
		f(st, nil)
	}
	c.start(st, c.gen, changed)
	return nil
}

// maxPreviewWait is the longest a change waits for the preview in flight
// before that preview is cancelled.
const maxPreviewWait = 3 * PreviewBudget

// stop cancels the job in flight and any waiting change; results of the
// job still on their way are dropped.
func (c *Controller) stop() {
	if c.cancel != nil {
		c.cancel()
		c.cancel = nil
	}
	c.job++
	c.running, c.previewing = false, false
	c.pending = nil
}

// start renders change gen (made at t) of st: at once, cancelling the job
// in flight, unless that job is rendering its preview, which the change
// then waits for (see pending).
func (c *Controller) start(st *scene.Setup, gen uint64, t time.Time) {
	if !c.previewing {
		c.launch(st, gen, t)
		return
	}
	first := c.pending == nil
	// The latency of what is shown counts from the change it shows.
	c.pending, c.pendingGen, c.pendingAt = st, gen, t
	if first {
		job := c.job
		wait := maxPreviewWait - time.Since(c.jobStarted)
		time.AfterFunc(max(wait, 0), func() {
			c.Post(func() {
				if c.job == job && c.pending != nil {
					c.launchPending()
				}
			})
		})
	}
}

func (c *Controller) launchPending() {
	st, gen, t := c.pending, c.pendingGen, c.pendingAt
	c.pending = nil
	c.launch(st, gen, t)
}

// launch cancels the job in flight and starts one for change gen (made at
// changed): the preview, then the full grid.
func (c *Controller) launch(st *scene.Setup, gen uint64, changed time.Time) {
	c.stop()
	ctx, cancel := context.WithCancel(context.Background())
	c.cancel = cancel
	c.running = true
	c.jobGen = gen
	c.jobStarted = time.Now()
	job := c.job
	render := c.Render
	if render == nil {
		if t := c.table; t != nil && export.TableServes(t, st) {
			c.previewing = false
			c.fromTable(ctx, job, t, st, gen, changed)
			return
		}
		if c.tableSetup != nil && !export.SOnly(c.tableSetup, st) {
			c.dropTable()
		}
	}
	if s := c.samples; s != nil && render == nil && s.Serves(st.Problem) {
		c.previewing = false
		// A change of s alone from the image shown: build the s table for
		// the next ones.
		sMove := c.lastFull != nil && export.SOnly(c.lastFull.Setup, st)
		c.replay(ctx, job, s, st, gen, changed, sMove)
		return
	}
	record := render == nil
	if render == nil {
		render = export.Render
	}
	preview := previewSetup(st, c.previewSize())
	c.previewing = preview != nil
	proceed := make(chan struct{})
	c.proceed = proceed
	workers := c.Workers
	post := c.Post
	c.busy.Add(1)
	go func() {
		defer cancel()
		defer c.busy.Add(-1)
		if preview != nil {
			t0 := time.Now()
			im, err := render(ctx, preview, sim.Options{Workers: workers})
			var r *Result
			if err == nil {
				r = &Result{Setup: preview, Image: im, Preview: true, Source: SourceRender, Elapsed: time.Since(t0), Gen: gen}
			}
			post(func() { c.previewDone(job, r, err, changed) })
			if err != nil {
				return
			}
			select {
			case <-proceed:
			case <-ctx.Done():
				return
			}
		}
		if ctx.Err() != nil {
			return
		}
		var shown atomic.Int64
		shown.Store(-1)
		progress := func(done, total int) {
			// Hand back at most about a hundred updates per render.
			step := int64(done * 100 / total)
			if step <= shown.Load() {
				return
			}
			shown.Store(step)
			post(func() {
				if job == c.job {
					for _, f := range c.onProgress {
						f(done, total)
					}
				}
			})
		}
		t0 := time.Now()
		opt := sim.Options{Workers: workers, Progress: progress}
		var (
			im      *sim.Image
			err     error
			samples *sim.Samples
		)
		if record {
			im, samples, err = export.Record(ctx, st, opt, recordThickness(st), export.NearbyModels(st))
		} else {
			im, err = render(ctx, st, opt)
		}
		if ctx.Err() != nil {
			return
		}
		if err != nil {
			post(func() { c.fail(job, err) })
			return
		}
		r := &Result{Setup: st, Image: im, Source: SourceRender, Elapsed: time.Since(t0), Gen: gen}
		post(func() {
			if job == c.job {
				c.samples, c.samplesSetup = samples, st
			}
			c.deliver(job, r, changed)
		})
	}()
}

// replay renders change gen of st from the field samples of an earlier
// full render, at full resolution; with sMove (a change of s alone) it
// then starts building the s table, unless one is built or building.
func (c *Controller) replay(ctx context.Context, job uint64, s *sim.Samples, st *scene.Setup, gen uint64, changed time.Time, sMove bool) {
	c.inBackground(ctx, job, gen, changed, func(opt sim.Options) (*Result, error) {
		im, err := export.Replay(ctx, s, st, opt)
		return &Result{Setup: st, Image: im, Source: SourceReplay}, err
	}, func() {
		// Not again after a build for these conditions failed (its
		// error stays until a change other than s drops it).
		if sMove && job == c.job && c.table == nil && c.tableCancel == nil && c.tableErr == nil && c.samples == s {
			c.buildTable(s, st)
		}
	})
}

// fromTable renders change gen of st from the s table, at full
// resolution.
func (c *Controller) fromTable(ctx context.Context, job uint64, t *sim.STable, st *scene.Setup, gen uint64, changed time.Time) {
	c.inBackground(ctx, job, gen, changed, func(opt sim.Options) (*Result, error) {
		im, err := export.FromTable(ctx, t, st, opt)
		return &Result{Setup: st, Image: im, Source: SourceTable, Table: t}, err
	}, nil)
}

// inBackground runs render off the UI goroutine with the window's
// workers and delivers its result as change gen of job, timed; then, on
// the UI goroutine, runs after (if not nil). A cancelled job delivers
// nothing; an error is reported.
func (c *Controller) inBackground(ctx context.Context, job, gen uint64, changed time.Time, render func(sim.Options) (*Result, error), after func()) {
	workers, post := c.Workers, c.Post
	cancel := c.cancel
	c.busy.Add(1)
	go func() {
		defer cancel()
		defer c.busy.Add(-1)
		t0 := time.Now()
		r, err := render(sim.Options{Workers: workers})
		if ctx.Err() != nil {
			return
		}
		if err != nil {
			post(func() { c.fail(job, err) })
			return
		}
		r.Elapsed, r.Gen = time.Since(t0), gen
		post(func() {
			c.deliver(job, r, changed)
			if after != nil {
				after()
			}
		})
	}()
}

// buildTable starts building, off the UI goroutine, the s table of st's
// conditions over the s range the samples serve (export.NearbyRange of
// the setup they were recorded for), if st's s lies inside it. The build
// pauses between rows while a render, replay or table evaluation is in
// flight (see busy).
func (c *Controller) buildTable(s *sim.Samples, st *scene.Setup) {
	lo, hi, ok := export.NearbyRange(c.samplesSetup)
	cur, _, ok2 := export.SModel(st)
	if !ok || !ok2 || cur < lo || cur > hi {
		return
	}
	ctx, cancel := context.WithCancel(context.Background())
	c.tableJob++
	id := c.tableJob
	c.tableSetup, c.tableCancel, c.tableErr = st, cancel, nil
	for _, f := range c.onTable {
		f()
	}
	workers, post := c.Workers, c.Post
	wait := func() {
		for c.busy.Load() > 0 && ctx.Err() == nil {
			time.Sleep(2 * time.Millisecond)
		}
	}
	go func() {
		defer cancel()
		t0 := time.Now()
		t, err := export.TabulateS(ctx, s, st, lo, hi, sim.STableOptions{Options: sim.Options{Workers: workers}, Wait: wait})
		took := time.Since(t0)
		if ctx.Err() != nil {
			return
		}
		post(func() {
			if id != c.tableJob {
				return
			}
			c.tableCancel = nil
			c.table, c.tableErr, c.tableBuild = t, err, took
			for _, f := range c.onTable {
				f()
			}
		})
	}()
}

// dropTable drops the s table and cancels its build.
func (c *Controller) dropTable() {
	if c.tableCancel != nil {
		c.tableCancel()
	}
	had := c.table != nil || c.tableCancel != nil || c.tableErr != nil
	c.tableJob++
	c.table, c.tableSetup, c.tableCancel, c.tableErr = nil, nil, nil, nil
	if had {
		for _, f := range c.onTable {
			f()
		}
	}
}

// recordThickness is the thickness the samples of a full render reach: a
// quarter more than the scene's (within the slider's range), so the
// thickness slider can be dragged that far up, and anywhere down, before a
// fresh render is needed; recording that deeper costs the full render
// about a fifth more.
func recordThickness(st *scene.Setup) float64 {
	return math.Max(st.Problem.ThicknessNm, math.Min(thicknessMaxNm, 1.25*st.Problem.ThicknessNm))
}

// previewDone takes the preview of a job: it is shown, and a change that
// waited for it starts (cancelling this job's full render).
func (c *Controller) previewDone(job uint64, r *Result, err error, changed time.Time) {
	if job != c.job {
		return
	}
	c.previewing = false
	switch {
	case r != nil:
		c.deliver(job, r, changed)
	case !errors.Is(err, context.Canceled):
		c.fail(job, err)
	}
	if c.pending != nil {
		c.launchPending()
		return
	}
	close(c.proceed)
}

func (c *Controller) previewMax() int {
	if c.PreviewPixels == 0 {
		return DefaultPreviewPixels
	}
	return c.PreviewPixels
}

// previewSize is the longer side of the next preview (< 1: none).
func (c *Controller) previewSize() int {
	m := c.previewMax()
	if m < 1 {
		return m
	}
	if c.previewSide == 0 {
		return min(startPreviewPixels, m)
	}
	return min(c.previewSide, m)
}

// adaptPreview sets the next preview size from the cost per column of the
// preview r: the side whose square grid takes about PreviewBudget.
func (c *Controller) adaptPreview(r *Result) {
	g := r.Image.Grid
	cols := g.NX * g.NY
	if cols == 0 || r.Elapsed <= 0 {
		return
	}
	perCol := float64(r.Elapsed) / float64(cols)
	side := int(math.Sqrt(float64(PreviewBudget) / perCol))
	c.previewSide = max(minPreviewPixels, min(side, c.previewMax()))
}

// deliver shows a result of the current job: a preview whenever it is
// newer than what is shown, a full render only if no change came after
// it.
func (c *Controller) deliver(job uint64, r *Result, changed time.Time) {
	if job != c.job || r.Gen < c.shownGen || (!r.Preview && r.Gen != c.gen) {
		return
	}
	r.Latency = time.Since(changed)
	if r.Preview {
		c.adaptPreview(r)
	}
	c.shownGen = r.Gen
	c.last = r
	if !r.Preview {
		c.lastFull = r
		c.running = false
		c.cancel = nil
	}
	for _, f := range c.onResult {
		f(r)
	}
}

func (c *Controller) fail(job uint64, err error) {
	if job != c.job {
		return
	}
	c.running = false
	for _, f := range c.onFailed {
		f(err)
	}
}

func (c *Controller) fireState() {
	for _, f := range c.onState {
		f()
	}
}

// Close cancels the render in flight and the s table's build.
func (c *Controller) Close() {
	c.stop()
	c.dropTable()
}

// previewSetup returns a copy of st whose grid has the longer side n
// columns over the same field, integrated to PreviewTolerance, or nil when
// the image is no larger than that (or n < 1): same physics, fewer columns.
func previewSetup(st *scene.Setup, n int) *scene.Setup {
	g := st.Problem.Grid
	if n < 1 || (g.NX <= n && g.NY <= n) {
		return nil
	}
	f := float64(n) / float64(max(g.NX, g.NY))
	nx := max(1, int(float64(g.NX)*f+0.5))
	ny := max(1, int(float64(g.NY)*f+0.5))
	p := *st.Problem
	p.Grid = sim.Grid{NX: nx, NY: ny, WidthNm: g.WidthNm, HeightNm: g.HeightNm}
	if p.Tolerance == 0 || p.Tolerance < PreviewTolerance {
		p.Tolerance = PreviewTolerance
	}
	cp := *st
	cp.Problem = &p
	return &cp
}

// cloneScene returns a deep copy of sc.
func cloneScene(sc *scene.Scene) *scene.Scene {
	data, err := json.Marshal(sc)
	if err != nil {
		panic(fmt.Sprintf("ui: scene does not marshal: %v", err))
	}
	var out scene.Scene
	if err := json.Unmarshal(data, &out); err != nil {
		panic(fmt.Sprintf("ui: scene does not unmarshal: %v", err))
	}
	return &out
}
