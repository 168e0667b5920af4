package ui

import (
	"context"
	"sync"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"faultline/assets"
	"faultline/scene"
	"faultline/sim"
)

// pump stands in for the UI goroutine: renders post to it, and the test
// goroutine runs what was posted.
type pump struct{ ch chan func() }

func newPump() *pump { return &pump{ch: make(chan func(), 4096)} }

func (p *pump) post(f func()) { p.ch <- f }

// until runs posted functions until cond holds, failing the test after
// timeout.
func (p *pump) until(t testing.TB, timeout time.Duration, what string, cond func() bool) {
	t.Helper()
	deadline := time.After(timeout)
	tick := time.NewTicker(2 * time.Millisecond)
	defer tick.Stop()
	for !cond() {
		select {
		case f := <-p.ch:
			f()
		case <-tick.C:
		case <-deadline:
			t.Fatalf("timed out after %v waiting for %s", timeout, what)
		}
	}
}

// drain runs what has been posted so far and what arrives within d.
func (p *pump) drain(d time.Duration) {
	deadline := time.After(d)
	for {
		select {
		case f := <-p.ch:
			f()
		case <-deadline:
			return
		}
	}
}

// fakeRender records every render asked for. With block set it waits for
// its context to be cancelled; otherwise it returns a uniform image at
// once (BF 1, DF 0).
type fakeRender struct {
	mu    sync.Mutex
	block bool
	delay time.Duration // time each render takes (unless cancelled)
	setup []*scene.Setup
	ctx   []context.Context
}

// hold makes the renders that start from now on wait for cancellation.
func (f *fakeRender) hold() {
	f.mu.Lock()
	f.block = true
	f.mu.Unlock()
}

func (f *fakeRender) render(ctx context.Context, st *scene.Setup, _ sim.Options) (*sim.Image, error) {
	f.mu.Lock()
	f.setup = append(f.setup, st)
	f.ctx = append(f.ctx, ctx)
	block, delay := f.block, f.delay
	f.mu.Unlock()
	if block {
		<-ctx.Done()
		return nil, ctx.Err()
	}
	if delay > 0 {
		select {
		case <-time.After(delay):
		case <-ctx.Done():
			return nil, ctx.Err()
		}
	}
	g := st.Problem.Grid
	bf, df := make([]float64, g.NX*g.NY), make([]float64, g.NX*g.NY)
	for i := range bf {
		bf[i] = 1
	}
	return &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{bf, df}}, nil
}

func (f *fakeRender) calls() int {
	f.mu.Lock()
	defer f.mu.Unlock()
	return len(f.setup)
}

// started counts the renders asked for after the first n that are still
// wanted (their context not cancelled): a render of an older change may
// start just before that change's cancellation reaches it.
func (f *fakeRender) started(n int) int {
	f.mu.Lock()
	defer f.mu.Unlock()
	k := 0
	for _, c := range f.ctx[n:] {
		if c.Err() == nil {
			k++
		}
	}
	return k
}

func (f *fakeRender) last() (*scene.Setup, context.Context) {
	f.mu.Lock()
	defer f.mu.Unlock()
	if len(f.setup) == 0 {
		return nil, nil
	}
	return f.setup[len(f.setup)-1], f.ctx[len(f.ctx)-1]
}

func demoScene(t testing.TB) *scene.Scene {
	t.Helper()
	sc, err := scene.Parse(assets.DemoScene)
	if err != nil {
		t.Fatalf("demo scene: %v", err)
	}
	return sc
}

// testSceneJSON is the scene of the widget tests (the demo scene may be
// changed for its looks; these tests rely on the values here).
const testSceneJSON = `{
  "version": 1,
  "crystal": {"material": "Ni"},
  "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0.005, "model": "two-beam"},
  "foil": {"thickness_nm": 110},
  "defects": [
    {"type": "dislocation", "b": "1/2[0 1 1]", "line": [1, 1, 1], "at_nm": [0, 0, 55]}
  ],
  "image": {"width_nm": 200, "height_nm": 200, "pixels": [100, 100]}
}`

func testScene(t testing.TB) *scene.Scene {
	t.Helper()
	sc, err := scene.Parse([]byte(testSceneJSON))
	if err != nil {
		t.Fatalf("test scene: %v", err)
	}
	return sc
}

// newTestWorkspace is a workspace on Fyne's test app with the given
// renderer, holding the test scene; the first render has been delivered.
func newTestWorkspace(t *testing.T, r RenderFunc) (*Workspace, *pump) {
	t.Helper()
	a := test.NewApp()
	t.Cleanup(a.Quit)
	p := newPump()
	ws := NewWorkspace(a, nil, p.post)
	ws.ctrl.Render = r
	ws.ctrl.Replace(testScene(t), "", true)
	p.until(t, 10*time.Second, "the first full render", func() bool { return ws.ctrl.LastFull() != nil })
	return ws, p
}

func fyneSize(w, h float32) fyne.Size    { return fyne.NewSize(w, h) }
func fynePos(x, y float32) fyne.Position { return fyne.NewPos(x, y) }
