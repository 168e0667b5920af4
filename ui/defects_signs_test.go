package ui

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/widget"
)

// formSelects returns the selects of a form, in order.
func formSelects(o fyne.CanvasObject) []*widget.Select {
	var out []*widget.Select
	walkObjects(o, func(o fyne.CanvasObject) {
		if s, ok := o.(*widget.Select); ok {
			out = append(out, s)
		}
	})
	return out
}

// selectWithOption returns the form's select offering option.
func selectWithOption(t *testing.T, o fyne.CanvasObject, option string) *widget.Select {
	t.Helper()
	for _, s := range formSelects(o) {
		for _, x := range s.Options {
			if x == option {
				return s
			}
		}
	}
	t.Fatalf("no select offers %q", option)
	return nil
}

// The defect form offers what the user means instead of a sign: a new
// fault is intrinsic by kind, a choice switches to an explicit shift (and
// back), and a loop's nature is a choice that fixes the sign of b; the
// readings above the status line follow.
func TestDefectFormKindAndNature(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	dp := ws.defects
	dp.AddType.SetSelected("fault")
	dp.Add.OnTapped()
	k := len(ws.ctrl.Scene().Defects) - 1
	if d := ws.ctrl.Scene().Defects[k]; d.Kind != "intrinsic" || d.Shift != "" {
		t.Fatalf("new fault: kind %q shift %q, want intrinsic and no shift", d.Kind, d.Shift)
	}
	if !strings.Contains(ws.status.Readings.Text, "fault 2: intrinsic (R = 1/3[-1 -1 -1] on (1 1 1))") {
		t.Errorf("readings %q", ws.status.Readings.Text)
	}
	// Kind: extrinsic.
	selectWithOption(t, dp.Form, "extrinsic").SetSelected("extrinsic")
	if d := ws.ctrl.Scene().Defects[k]; d.Kind != "extrinsic" {
		t.Errorf("kind %q after choosing extrinsic", d.Kind)
	}
	// Switch to an explicit shift: the shift row appears with its default.
	selectWithOption(t, dp.Form, "shift R").SetSelected("shift R")
	d := ws.ctrl.Scene().Defects[k]
	if d.Kind != "" || d.Shift != "1/3[-1 -1 -1]" {
		t.Errorf("after choosing shift R: kind %q shift %q, want none and 1/3[-1 -1 -1]", d.Kind, d.Shift)
	}
	if !formLabels(dp.Form)["Shift R"] {
		t.Error("no shift row after choosing shift R")
	}
	if ws.ctrl.Err() != nil {
		t.Errorf("scene does not build: %v", ws.ctrl.Err())
	}

	// A loop: choose interstitial; its b (1/3[1 1 1] on (1 1 1)) is
	// reversed by the program, and the reading says interstitial.
	dp.AddType.SetSelected("loop")
	dp.Add.OnTapped()
	k = len(ws.ctrl.Scene().Defects) - 1
	selectWithOption(t, dp.Form, "interstitial").SetSelected("interstitial")
	if d := ws.ctrl.Scene().Defects[k]; d.Nature != "interstitial" {
		t.Fatalf("nature %q after choosing interstitial", d.Nature)
	}
	if !strings.Contains(ws.status.Readings.Text, "loop 3: interstitial (b·n < 0)") {
		t.Errorf("readings %q, want loop 3 interstitial", ws.status.Readings.Text)
	}
}
