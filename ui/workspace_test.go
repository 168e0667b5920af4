package ui

import (
	"context"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// Moving the thickness slider changes the scene, writes the entry beside
// it and starts a render of the new scene.
func TestSliderChangesSceneAndRenders(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	n := fr.calls()
	sl := ws.params.Thickness

	sl.Slider.SetValue(150) // what a drag of the slider ends in
	if got := ws.ctrl.Scene().Foil.ThicknessNm; got != 150 {
		t.Fatalf("scene thickness after the slider move = %g nm, want 150", got)
	}
	if sl.Entry.Text != "150" {
		t.Errorf("entry beside the slider shows %q, want \"150\"", sl.Entry.Text)
	}
	p.until(t, 5*time.Second, "a render of the new thickness", func() bool {
		st, _ := fr.last()
		return fr.calls() > n && st.Scene.Foil.ThicknessNm == 150
	})
	p.until(t, 5*time.Second, "the full render", func() bool {
		r := ws.ctrl.LastFull()
		return r != nil && r.Gen == ws.ctrl.Gen()
	})
	if !ws.ctrl.Dirty() {
		t.Error("scene not marked as changed")
	}

	// Typing into the entry moves the slider and renders again.
	n = fr.calls()
	test.Type(clearEntry(sl.Entry), "95")
	if got := ws.ctrl.Scene().Foil.ThicknessNm; got != 95 {
		t.Fatalf("scene thickness after typing 95 = %g nm", got)
	}
	if sl.Slider.Value != 95 {
		t.Errorf("slider at %g after typing 95", sl.Slider.Value)
	}
	p.until(t, 5*time.Second, "a render after typing", func() bool { return fr.calls() > n })

	// The s slider writes s_per_nm.
	ws.params.S.Slider.SetValue(0.02)
	if s := ws.ctrl.Scene().Diffraction.SPerNm; s == nil || math.Abs(*s-0.02) > 1e-12 {
		t.Errorf("s after the slider move = %v, want 0.02", s)
	}
}

// Two slider moves in quick succession: the render of the first is
// cancelled by the second.
func TestSliderMoveCancelsRenderInFlight(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	fr.hold()
	n := fr.calls()
	ws.params.Thickness.Slider.SetValue(120)
	p.until(t, 5*time.Second, "the render of 120 nm", func() bool { return fr.calls() > n })
	_, first := fr.last()
	ws.params.Thickness.Slider.SetValue(121)
	// The first move's render is a preview that never ends: the second
	// move waits for it at most maxPreviewWait, then cancels it.
	t0 := time.Now()
	p.until(t, 5*time.Second, "the render of the first move to be cancelled", func() bool { return first.Err() != nil })
	if d := time.Since(t0); d > maxPreviewWait+time.Second {
		t.Errorf("cancelled after %v, want within about %v", d, maxPreviewWait)
	}
	p.until(t, 5*time.Second, "the render of the second move", func() bool {
		st, _ := fr.last()
		return st.Scene.Foil.ThicknessNm == 121
	})
	if !errors.Is(first.Err(), context.Canceled) {
		t.Errorf("first render's context: %v, want context.Canceled", first.Err())
	}
	ws.ctrl.Close()
}

// Text that is not a number shows its error under the field and changes
// nothing; a number the scene refuses shows scene.Build's message under
// the field; neither starts a render.
func TestInvalidFieldShowsErrorAndDoesNotRender(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	n := fr.calls()
	entry := ws.params.Thickness.Entry
	errl := ws.board.labels["foil.thickness_nm"]

	test.Type(clearEntry(entry), "abc")
	if !errl.Visible() || !strings.Contains(errl.Text, "not a number") {
		t.Errorf("error under thickness: visible %v, %q; want \"... not a number\"", errl.Visible(), errl.Text)
	}
	if got := ws.ctrl.Scene().Foil.ThicknessNm; got != 110 {
		t.Errorf("thickness changed to %g by unparsable text", got)
	}

	test.Type(clearEntry(entry), "-5")
	if !errl.Visible() || !strings.Contains(errl.Text, "must be ≥ 0.1") {
		t.Errorf("error under thickness for −5: visible %v, %q; want the scene's range \"must be ≥ 0.1 …\"", errl.Visible(), errl.Text)
	}
	var fe *scene.FieldError
	if !errors.As(ws.ctrl.Err(), &fe) || fe.Path != "foil.thickness_nm" {
		t.Errorf("controller error %v, want one at foil.thickness_nm", ws.ctrl.Err())
	}
	p.drain(100 * time.Millisecond)
	if k := fr.started(n); k != 0 {
		t.Errorf("%d renders started for invalid input, want 0", k)
	}
	if !strings.HasPrefix(ws.status.Message.Text, "Not rendered: Thickness t (foil.thickness_nm): ") {
		t.Errorf("status line %q, want it to name the field", ws.status.Message.Text)
	}
	if ws.view.BF.tag == "" {
		t.Error("the images are not marked as out of date")
	}

	// A valid value clears the error and renders.
	test.Type(clearEntry(entry), "100")
	if errl.Visible() {
		t.Errorf("error still shown after a valid value: %q", errl.Text)
	}
	p.until(t, 5*time.Second, "the full render after the fix", func() bool {
		r := ws.ctrl.LastFull()
		return r != nil && r.Gen == ws.ctrl.Gen()
	})

	// A forbidden reflection: the error goes under g (Ni is fcc, 1 0 0
	// has F = 0).
	n = fr.calls()
	test.Type(clearEntry(ws.params.G), "1 0 0")
	gl := ws.board.labels["diffraction.g"]
	if !gl.Visible() || !strings.Contains(gl.Text, "forbidden") {
		t.Errorf("error under g for 1 0 0 in Ni: visible %v, %q", gl.Visible(), gl.Text)
	}
	p.drain(50 * time.Millisecond)
	if k := fr.started(n); k != 0 {
		t.Errorf("%d renders started for a forbidden g", k)
	}
}

// The systematic-row model stays on offer and the library's refusal is
// shown under the model, not hidden.
func TestSystematicRowShowsLibraryError(t *testing.T) {
	fr := &fakeRender{}
	ws, _ := newTestWorkspace(t, fr.render)
	ws.params.Model.SetSelected("systematic-row")
	if ws.ctrl.Scene().Diffraction.Model != "systematic-row" || ws.ctrl.Scene().Diffraction.Beams != scene.DefaultRowBeams {
		t.Fatalf("model %q beams %d, want systematic-row with %d beams", ws.ctrl.Scene().Diffraction.Model, ws.ctrl.Scene().Diffraction.Beams, scene.DefaultRowBeams)
	}
	_, err := scene.Build(ws.ctrl.Scene(), ".")
	l := ws.board.labels["diffraction.model"]
	if err == nil {
		if l.Visible() {
			t.Errorf("an error is shown under the model although the scene builds: %q", l.Text)
		}
		return // the library has the model now
	}
	var fe *scene.FieldError
	if errors.As(err, &fe) && fe.Path == "diffraction.model" && (!l.Visible() || l.Text != fe.Msg) {
		t.Errorf("under the model: visible %v %q, want %q", l.Visible(), l.Text, fe.Msg)
	}
}

// Every defect type can be added from its template and builds.
func TestDefectsEditor(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	dp := ws.defects
	n0 := len(ws.ctrl.Scene().Defects)
	for _, kind := range scene.DefectTypes {
		k := len(ws.ctrl.Scene().Defects)
		dp.AddType.SetSelected(kind)
		dp.Add.OnTapped()
		sc := ws.ctrl.Scene()
		if len(sc.Defects) != k+1 || sc.Defects[k].Type != kind {
			t.Fatalf("after adding a %s: %d defects, last %q", kind, len(sc.Defects), sc.Defects[len(sc.Defects)-1].Type)
		}
		if dp.selected != k {
			t.Errorf("the new %s is not selected (selected %d)", kind, dp.selected)
		}
		err := ws.ctrl.Err()
		if err != nil {
			t.Errorf("adding the template %s: %v", kind, err)
		}
	}
	p.drain(20 * time.Millisecond)

	// Edit the Burgers vector of the first defect (the demo's dislocation)
	// as typed text; a malformed one shows its error next to the field.
	dp.List.Select(0)
	var bEntry = findEntry(t, dp, "1/2[0 1 1]")
	test.Type(clearEntry(bEntry), "1/2[1 -1 0]")
	if got := ws.ctrl.Scene().Defects[0].B; got != "1/2[1 -1 0]" {
		t.Errorf("b = %q after typing", got)
	}
	test.Type(clearEntry(bEntry), "1/2[1 -1")
	if l := ws.board.labels["defects[0].b"]; l == nil || !l.Visible() || l.Text == "" {
		t.Error("no error next to a malformed Burgers vector")
	}
	test.Type(clearEntry(bEntry), "1/2[1 -1 0]")

	// Duplicate and remove.
	k := len(ws.ctrl.Scene().Defects)
	dp.Duplicate.OnTapped()
	if len(ws.ctrl.Scene().Defects) != k+1 || ws.ctrl.Scene().Defects[1].B != "1/2[1 -1 0]" {
		t.Errorf("duplicate: %d defects, second b %q", len(ws.ctrl.Scene().Defects), ws.ctrl.Scene().Defects[1].B)
	}
	dp.Remove.OnTapped()
	if len(ws.ctrl.Scene().Defects) != k {
		t.Errorf("remove: %d defects, want %d", len(ws.ctrl.Scene().Defects), k)
	}
	_ = n0
}

func itoa(i int) string { return strconv.Itoa(i) }

// clearEntry empties an entry (as select-all and delete would) and
// returns it for typing.
func clearEntry(e *widget.Entry) *widget.Entry {
	e.SetText("")
	return e
}

// findEntry returns the entry of the defect form showing text.
func findEntry(t *testing.T, dp *defectsPanel, text string) *widget.Entry {
	t.Helper()
	var found *widget.Entry
	var walk func(o fyne.CanvasObject)
	walk = func(o fyne.CanvasObject) {
		switch v := o.(type) {
		case *widget.Entry:
			if v.Text == text && found == nil {
				found = v
			}
		case *fyne.Container:
			for _, c := range v.Objects {
				walk(c)
			}
		}
	}
	walk(dp.Form)
	if found == nil {
		t.Fatalf("no entry showing %q in the defect form", text)
	}
	return found
}

// The capture used by --screenshot draws the window content: it is the
// window's size and not blank.
func TestCaptureIsNotBlank(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	img := ws.Capture()
	if b := img.Bounds(); b.Dx() < 1400 || b.Dy() < 900 {
		t.Fatalf("capture %v, want at least 1400 × 900", b)
	}
	if sd := GreyStdDev(img); sd < 0.05 {
		t.Errorf("capture grey standard deviation %.3f of full scale: looks blank", sd)
	}
}
