package ui

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sync/atomic"
	"time"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

// DefaultPreviewPixels is the longer side, in columns, of the coarse grid
// every change is first rendered on.
const DefaultPreviewPixels = 64

// RenderFunc renders the problem of a setup (with the scene's blur).
type RenderFunc func(ctx context.Context, st *scene.Setup, opt sim.Options) (*sim.Image, error)

// Result is one finished render.
type Result struct {
	Setup   *scene.Setup
	Image   *sim.Image
	Preview bool          // the coarse grid
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

	sc        *scene.Scene
	path      string
	savedJSON []byte

	setup    *scene.Setup
	buildErr error

	gen     uint64
	cancel  context.CancelFunc
	running bool
	started time.Time

	last     *Result // newest result shown (preview or full)
	lastFull *Result // newest full render

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
	c.sc = next
	c.fireState()
	return c.rebuild()
}

// Rebuild builds the scene again and renders it (after something outside
// the scene changed, such as a CIF file on disk).
func (c *Controller) Rebuild() error { return c.rebuild() }

func (c *Controller) rebuild() error {
	st, err := scene.Build(c.sc, c.Dir())
	if err != nil {
		// A superseded render would show a scene that is no longer the
		// one edited: stop it.
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
	c.start(st)
	return nil
}

// stop cancels the render in flight, if any.
func (c *Controller) stop() {
	if c.cancel != nil {
		c.cancel()
		c.cancel = nil
	}
	c.gen++
	c.running = false
}

// start cancels the render in flight and starts one of st: the preview,
// then the full grid.
func (c *Controller) start(st *scene.Setup) {
	c.stop()
	ctx, cancel := context.WithCancel(context.Background())
	c.cancel = cancel
	c.running = true
	c.started = time.Now()
	gen, started := c.gen, c.started
	render := c.Render
	if render == nil {
		render = export.Render
	}
	preview := previewSetup(st, c.previewPixels())
	workers := c.Workers
	post := c.Post
	go func() {
		defer cancel()
		if preview != nil {
			t0 := time.Now()
			im, err := render(ctx, preview, sim.Options{Workers: workers})
			if ctx.Err() != nil {
				return
			}
			if err != nil {
				post(func() { c.fail(gen, err) })
				return
			}
			r := &Result{Setup: preview, Image: im, Preview: true, Elapsed: time.Since(t0), Gen: gen}
			post(func() { c.deliver(r, started) })
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
				if gen == c.gen {
					for _, f := range c.onProgress {
						f(done, total)
					}
				}
			})
		}
		if ctx.Err() != nil {
			return
		}
		t0 := time.Now()
		im, err := render(ctx, st, sim.Options{Workers: workers, Progress: progress})
		if ctx.Err() != nil {
			return
		}
		if err != nil {
			post(func() { c.fail(gen, err) })
			return
		}
		r := &Result{Setup: st, Image: im, Elapsed: time.Since(t0), Gen: gen}
		post(func() { c.deliver(r, started) })
	}()
}

func (c *Controller) previewPixels() int {
	if c.PreviewPixels == 0 {
		return DefaultPreviewPixels
	}
	return c.PreviewPixels
}

// deliver shows a result if it belongs to the current change.
func (c *Controller) deliver(r *Result, started time.Time) {
	if r.Gen != c.gen {
		return
	}
	r.Latency = time.Since(started)
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

func (c *Controller) fail(gen uint64, err error) {
	if gen != c.gen {
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

// Close cancels the render in flight.
func (c *Controller) Close() { c.stop() }

// previewSetup returns a copy of st whose grid has the longer side n
// columns over the same field, or nil when the image is no larger than
// that (or n < 1): same physics, fewer columns.
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
