package ui

import (
	"strings"
	"testing"
	"time"

	"faultline/scene"
)

// The partial separation the library derives from a stacking-fault energy
// is shown beside the defect it belongs to.
func TestDerivedSeparationShown(t *testing.T) {
	fr := &fakeRender{}
	ws, p := newTestWorkspace(t, fr.render)
	sfe := 30.0
	ws.ctrl.Edit(func(sc *scene.Scene) {
		sc.Defects = []scene.Defect{{Type: "dissociated", B: "1/2[1 0 -1]", Line: []float64{1, -1, 0}, Plane: []float64{1, 1, 1},
			AtNm: []float64{0, 0, 50}, Partials: []string{"1/6[2 -1 -1]", "1/6[1 1 -2]"}, SFEmJm2: &sfe}}
	})
	ws.defects.List.Select(0)
	p.until(t, 5*time.Second, "the derived separation", func() bool {
		return strings.Contains(ws.defects.Derived.Text, "partial separation")
	})
	if !strings.Contains(ws.defects.Derived.Text, "30 mJ/m²") {
		t.Errorf("derived text %q", ws.defects.Derived.Text)
	}
}

func TestOpenDemoMicrograph(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	if err := ws.OpenDemoMicrograph(); err != nil {
		t.Fatal(err)
	}
	m := ws.micro
	if m == nil || m.NmPerPx != 1.25 || m.GAngleDeg != 30 || m.img.Width != 240 || m.img.Height != 240 {
		t.Fatalf("demo micrograph %+v", m)
	}
}
