package ui

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"

	"faultline/scene"
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

	c.Replace(demoScene(t), "", true)
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
	c.Replace(demoScene(t), "", true)
	p.until(t, 5*time.Second, "the full render", func() bool { return c.LastFull() != nil })
	if len(got) != 2 || !got[0].Preview || got[1].Preview {
		t.Fatalf("results %d (preview flags %v), want a preview then a full render", len(got), flags(got))
	}
	pg, fg := got[0].Image.Grid, got[1].Image.Grid
	// The demo is 200 × 200 pixels; the preview has DefaultPreviewPixels
	// on its longer side, over the same field.
	if pg.NX != DefaultPreviewPixels || pg.NY != DefaultPreviewPixels {
		t.Errorf("preview grid %d × %d, want %d × %d", pg.NX, pg.NY, DefaultPreviewPixels, DefaultPreviewPixels)
	}
	if fg.NX != 200 || fg.NY != 200 {
		t.Errorf("full grid %d × %d, want 200 × 200 (the scene's pixels)", fg.NX, fg.NY)
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
	c.Replace(demoScene(t), "", true)
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
	c.Replace(demoScene(t), "", true)
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
	sc := demoScene(t)
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
