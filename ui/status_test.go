package ui

import (
	"strings"
	"testing"

	"faultline/scene"
)

// The window shows, above the status line, the reading of every defect
// under the current g and s — the same text as `faultline render` — and
// updates it when the scene changes.
func TestStatusShowsReadings(t *testing.T) {
	fr := &fakeRender{}
	ws, _ := newTestWorkspace(t, fr.render)
	r := ws.status.Readings
	if !r.Visible() || !strings.HasPrefix(r.Text, "dislocation 1: g·b = 0") {
		t.Fatalf("readings %q (visible %v), want the dislocation's g·b = 0 reading", r.Text, r.Visible())
	}
	// A loop instead: its nature and inside–outside contrast appear.
	err := ws.ctrl.Edit(func(sc *scene.Scene) {
		radius := 10.0
		sc.Defects = []scene.Defect{{Type: "loop", AtNm: []float64{0, 0, 55}, Normal: []float64{1, 0, 1}, B: "1/2[1 0 1]", RadiusNm: &radius}}
	})
	if err != nil {
		t.Fatal(err)
	}
	want := strings.Join(ws.ctrl.Setup().ReadingLines(), "\n")
	if r.Text != want || !strings.HasPrefix(r.Text, "loop 1: vacancy (b·n > 0)") {
		t.Errorf("readings %q, want %q", r.Text, want)
	}
}
