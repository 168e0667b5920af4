package ui

import (
	"bytes"
	"context"
	"errors"
	"faultline/assets"
	"os"
	"path/filepath"
	"testing"
	"time"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

// A newer change cancels the render in flight through its context, and
// the superseded render's result never reaches the display.
func TestSupersededRenderIsCancelled(t *testing.T) {
	p := newPump()
	fr := &fakeRender{block: true}
	c := NewController(p.post)
	c.Render = fr.render
	c.PreviewPixels = -1 // one render per change, so the count is exact
	var delivered []*Result
	c.OnResult(func(r *Result) { delivered = append(delivered, r) })

	c.Replace(testScene(t), "", true)
	p.until(t, 5*time.Second, "the first render to start", func() bool { return fr.calls() == 1 })
	_, first := fr.last()

	if err := c.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = 80 }); err != nil {
		t.Fatalf("edit: %v", err)
	}
	select {
	case <-first.Done():
	case <-time.After(5 * time.Second):
		t.Fatal("the superseded render's context was not cancelled")
	}
	if !errors.Is(first.Err(), context.Canceled) {
		t.Errorf("superseded context: err = %v, want context.Canceled", first.Err())
	}
	p.until(t, 5*time.Second, "the second render to start", func() bool { return fr.calls() == 2 })
	st, second := fr.last()
	if st.Scene.Foil.ThicknessNm != 80 {
		t.Errorf("second render: thickness %g nm, want 80", st.Scene.Foil.ThicknessNm)
	}
	if second.Err() != nil {
		t.Errorf("the newest render was cancelled too: %v", second.Err())
	}
	p.drain(50 * time.Millisecond)
	if len(delivered) != 0 {
		t.Errorf("%d results delivered from blocked renders, want 0", len(delivered))
	}
	c.Close()
	if second.Err() == nil {
		select {
		case <-second.Done():
		case <-time.After(5 * time.Second):
			t.Error("Close did not cancel the render in flight")
		}
	}
}

// Every change renders a coarse preview of the same field first, then the
// full grid; both are delivered, in that order.
func TestPreviewThenFull(t *testing.T) {
	p := newPump()
	fr := &fakeRender{}
	c := NewController(p.post)
	c.Render = fr.render
	var got []*Result
	c.OnResult(func(r *Result) { got = append(got, r) })
	c.Replace(testScene(t), "", true)
	p.until(t, 5*time.Second, "the full render", func() bool { return c.LastFull() != nil })
	if len(got) != 2 || !got[0].Preview || got[1].Preview {
		t.Fatalf("results %d (preview flags %v), want a preview then a full render", len(got), flags(got))
	}
	pg, fg := got[0].Image.Grid, got[1].Image.Grid
	// The test scene is 100 × 100 pixels over a square field; the first preview
	// has startPreviewPixels on a side, over the same field.
	if pg.NX != startPreviewPixels || pg.NY != startPreviewPixels {
		t.Errorf("preview grid %d × %d, want %d × %d", pg.NX, pg.NY, startPreviewPixels, startPreviewPixels)
	}
	if tol := got[0].Setup.Problem.Tolerance; tol != PreviewTolerance {
		t.Errorf("preview tolerance %g, want %g", tol, PreviewTolerance)
	}
	if tol := got[1].Setup.Problem.Tolerance; tol != 0 {
		t.Errorf("full render tolerance %g, want the default (0)", tol)
	}
	if fg.NX != 100 || fg.NY != 100 {
		t.Errorf("full grid %d × %d, want 100 × 100 (the scene's pixels)", fg.NX, fg.NY)
	}
	if pg.WidthNm != fg.WidthNm || pg.HeightNm != fg.HeightNm {
		t.Errorf("preview field %g × %g nm, full %g × %g nm: want the same field", pg.WidthNm, pg.HeightNm, fg.WidthNm, fg.HeightNm)
	}
}

func flags(rs []*Result) []bool {
	out := make([]bool, len(rs))
	for i, r := range rs {
		out[i] = r.Preview
	}
	return out
}

// An invalid change is refused by scene.Build with the field named, and
// no render starts.
func TestInvalidEditStartsNoRender(t *testing.T) {
	p := newPump()
	fr := &fakeRender{}
	c := NewController(p.post)
	c.Render = fr.render
	c.Replace(testScene(t), "", true)
	p.until(t, 5*time.Second, "the first full render", func() bool { return c.LastFull() != nil })
	n := fr.calls()
	err := c.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = -5 })
	var fe *scene.FieldError
	if !errors.As(err, &fe) || fe.Path != "foil.thickness_nm" {
		t.Fatalf("edit thickness −5 nm: err = %v, want a FieldError at foil.thickness_nm", err)
	}
	p.drain(100 * time.Millisecond)
	if k := fr.started(n); k != 0 {
		t.Errorf("%d renders started after an invalid change, want 0", k)
	}
	if c.Setup() != nil {
		t.Error("Setup() should be nil while the scene does not build")
	}
}

// Opening a file and saving it writes exactly scene.Marshal of what was
// read, whatever the layout of the file opened; the saved file opens to
// the same scene.
func TestOpenSaveRoundTrip(t *testing.T) {
	dir := t.TempDir()
	// A scene written by hand: other spacing, other key order, and
	// optional fields (foil normal, blur, weak beam).
	hand := `{"version":1,
	  "image": {"pixels": [64, 32], "width_nm": 200, "height_nm": 100, "blur_nm": 1.5},
	  "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 300},
	  "diffraction": {"beam": [0,0,1], "g": [2,2,0], "weak_beam": {"n": 3}, "model": "two-beam"},
	  "foil": {"thickness_nm": 85, "normal": [0, 1, 10]},
	  "defects": [{"type": "dislocation", "b": "1/2[1 -1 0]", "line": [1, 1, 2], "at_nm": [0, 0, 40]}]}`
	src := filepath.Join(dir, "hand.json")
	if err := os.WriteFile(src, []byte(hand), 0o644); err != nil {
		t.Fatal(err)
	}
	want, err := scene.Parse([]byte(hand))
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	wantBytes, err := scene.Marshal(want)
	if err != nil {
		t.Fatal(err)
	}

	p := newPump()
	c := NewController(p.post)
	c.Render = (&fakeRender{}).render
	if err := c.Open(src); err != nil {
		t.Fatalf("open: %v", err)
	}
	if c.Dirty() {
		t.Error("a scene just opened is dirty")
	}
	out := filepath.Join(dir, "saved.json")
	if err := c.SaveAs(out); err != nil {
		t.Fatalf("save as: %v", err)
	}
	got, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, wantBytes) {
		t.Errorf("saved file differs from scene.Marshal of the opened scene:\n got %s\nwant %s", got, wantBytes)
	}
	// Open the saved file and save again: byte for byte the same.
	c2 := NewController(p.post)
	c2.Render = (&fakeRender{}).render
	if err := c2.Open(out); err != nil {
		t.Fatalf("reopen: %v", err)
	}
	again := filepath.Join(dir, "again.json")
	if err := c2.SaveAs(again); err != nil {
		t.Fatal(err)
	}
	got2, _ := os.ReadFile(again)
	if !bytes.Equal(got2, got) {
		t.Errorf("second round trip changed the file:\n got %s\nwant %s", got2, got)
	}
	if c2.Path() != again {
		t.Errorf("path after save as = %q, want %q", c2.Path(), again)
	}

	// A change makes it dirty; saving clears that.
	c2.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = 90 })
	if !c2.Dirty() {
		t.Error("not dirty after a change")
	}
	if err := c2.Save(); err != nil {
		t.Fatal(err)
	}
	if c2.Dirty() {
		t.Error("dirty after saving")
	}
	c.Close()
	c2.Close()
}

// A failed save leaves the file on disk as it was: a scene that does not
// validate is refused before anything is written.
func TestFailedSaveKeepsFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "s.json")
	p := newPump()
	c := NewController(p.post)
	c.Render = (&fakeRender{}).render
	c.Replace(testScene(t), "", true)
	if err := c.SaveAs(path); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(path)
	c.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = 0 })
	if err := c.Save(); err == nil {
		t.Fatal("saving a scene with thickness 0 succeeded")
	}
	after, _ := os.ReadFile(path)
	if !bytes.Equal(before, after) {
		t.Error("the failed save changed the file on disk")
	}
	c.Close()
}

func TestPreviewSetup(t *testing.T) {
	sc := testScene(t)
	sc.Image = scene.Image{WidthNm: 300, HeightNm: 150, Pixels: []int{400, 200}}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	pv := previewSetup(st, 64)
	g := pv.Problem.Grid
	if g.NX != 64 || g.NY != 32 || g.WidthNm != 300 || g.HeightNm != 150 {
		t.Errorf("preview grid %+v, want 64 × 32 over 300 × 150 nm", g)
	}
	if st.Problem.Grid.NX != 400 {
		t.Error("previewSetup changed the full setup")
	}
	if previewSetup(st, 500) != nil {
		t.Error("a preview larger than the image was made")
	}
}

// Changes made while a preview is being rendered wait for it: the preview
// is shown, the changes in between are skipped, and the newest change is
// rendered next, preview and full.
func TestChangesDuringPreviewAreCoalesced(t *testing.T) {
	p := newPump()
	fr := &fakeRender{delay: 40 * time.Millisecond}
	c := NewController(p.post)
	c.Render = fr.render
	var shown []*Result
	c.OnResult(func(r *Result) { shown = append(shown, r) })
	c.Replace(testScene(t), "", true)
	p.until(t, 5*time.Second, "the first full render", func() bool { return c.LastFull() != nil })
	shown = nil
	n := fr.calls()

	// Five moves within the first preview's 40 ms.
	var gens []uint64
	for k := 0; k < 5; k++ {
		tNm := 90 + float64(k)
		c.Edit(func(sc *scene.Scene) { sc.Foil.ThicknessNm = tNm })
		gens = append(gens, c.Gen())
	}
	p.until(t, 5*time.Second, "the full render of the last move", func() bool {
		r := c.LastFull()
		return r != nil && r.Gen == gens[4]
	})
	if len(shown) != 3 || !shown[0].Preview || shown[0].Gen != gens[0] || !shown[1].Preview || shown[1].Gen != gens[4] || shown[2].Preview {
		for _, r := range shown {
			t.Logf("shown: change %d preview %v thickness %g", r.Gen, r.Preview, r.Setup.Scene.Foil.ThicknessNm)
		}
		t.Fatalf("want the preview of the first move, then the preview and full render of the last (changes %v)", gens)
	}
	if got := shown[2].Setup.Scene.Foil.ThicknessNm; got != 94 {
		t.Errorf("full render of thickness %g, want 94", got)
	}
	// Renders asked for: the first preview, then the last preview and
	// full render; neither the moves in between nor the first move's full
	// render.
	var got []float64
	for _, st := range fr.setup[n:] {
		got = append(got, st.Scene.Foil.ThicknessNm)
	}
	if len(got) != 3 || got[0] != 90 || got[1] != 94 || got[2] != 94 {
		t.Errorf("renders of thicknesses %v, want [90 94 94]", got)
	}
}

// The preview's looser phase tolerance keeps every intensity of the demo
// scene within 1e-3 of the incident beam of a converged render (the claim
// of PreviewTolerance; the reference is integrated at a hundredth of
// sim.DefaultTolerance, itself within 1e-4 of converged).
func TestPreviewToleranceAccuracy(t *testing.T) {
	sc, err := scene.Parse(assets.DemoScene)
	if err != nil {
		t.Fatal(err)
	}
	sc.Image.Pixels = []int{128, 128}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	conv := *st
	cp := *st.Problem
	cp.Tolerance = sim.DefaultTolerance / 100
	conv.Problem = &cp
	ref, err := export.Render(context.Background(), &conv, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	loose := *st
	p := *st.Problem
	p.Tolerance = PreviewTolerance
	loose.Problem = &p
	got, err := export.Render(context.Background(), &loose, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	worst := sim.MaxDifference(got, ref)
	t.Logf("largest difference at tolerance %g: %.2g of the incident beam", PreviewTolerance, worst)
	if worst > 1e-3 {
		t.Errorf("preview tolerance changes an intensity by %.3g, want ≤ 1e-3", worst)
	}
}
