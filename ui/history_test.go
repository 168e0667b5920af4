package ui

import (
	"testing"
	"time"

	"faultline/scene"
)

// Undo and redo over scene edits: a slider's drag is one step, a typed
// field another, a defect removed a third; undo puts back each scene and
// the fields show it; redo makes the change again; a new edit clears the
// redo list.
func TestUndoRedo(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	c := ws.ctrl
	clock := time.Unix(0, 0)
	c.hist.now = func() time.Time { return clock }
	thick := func() float64 { return c.Scene().Foil.ThicknessNm }
	t0 := thick()

	// A drag: three values in quick succession, one step.
	for _, v := range []float64{90, 91, 92} {
		ws.params.Thickness.Slider.SetValue(v)
		clock = clock.Add(100 * time.Millisecond)
	}
	clock = clock.Add(2 * time.Second)
	if err := c.Set(scene.Edit{Path: "image.width_nm", Value: 150.0}, scene.Edit{Path: "image.height_nm", Value: 150.0}); err != nil {
		t.Fatal(err)
	}
	clock = clock.Add(2 * time.Second)
	if err := c.Set(scene.Edit{Path: "defects[0]", Value: nil}); err != nil {
		t.Fatal(err)
	}
	if thick() != 92 || len(c.Scene().Defects) != 0 || c.Scene().Image.WidthNm != 150 {
		t.Fatalf("edits not applied: t %g, %d defects, width %g", thick(), len(c.Scene().Defects), c.Scene().Image.WidthNm)
	}
	// A refused value changes nothing and is no step.
	if err := c.Set(scene.Edit{Path: "foil.thickness_nm", Value: -1.0}); err == nil {
		t.Fatal("negative thickness accepted")
	}

	if !c.Undo() || len(c.Scene().Defects) != 1 {
		t.Fatalf("undo 1: %d defects, want the removed one back", len(c.Scene().Defects))
	}
	if !c.Undo() || c.Scene().Image.WidthNm != 200 {
		t.Fatalf("undo 2: width %g, want 200", c.Scene().Image.WidthNm)
	}
	if !c.Undo() || thick() != t0 {
		t.Fatalf("undo 3: t = %g, want %g (the whole drag taken back)", thick(), t0)
	}
	if ws.params.Thickness.Slider.Value != t0 {
		t.Errorf("the slider shows %g after undo, want %g", ws.params.Thickness.Slider.Value, t0)
	}
	if c.Undo() {
		t.Error("undo past the first scene")
	}
	if !c.Redo() || thick() != 92 {
		t.Fatalf("redo: t = %g, want 92", thick())
	}
	if c.Setup() == nil || c.Setup().Problem.ThicknessNm != 92 {
		t.Error("redo did not rebuild the scene")
	}
	// A new edit clears what could be redone.
	clock = clock.Add(2 * time.Second)
	ws.params.Thickness.Slider.SetValue(60)
	if c.CanRedo() {
		t.Error("redo still offered after a new edit")
	}
	// Opening or replacing a scene starts a new history.
	c.Replace(testScene(t), "", true)
	if c.CanUndo() || c.CanRedo() {
		t.Error("history kept across a replaced scene")
	}
}
