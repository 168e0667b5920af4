package ui

import (
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"faultline/figure"
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

// A micrograph whose file records its pixel size opens at that size, and
// the panel says where the value came from.
func TestOpenMicrographPixelSizeFromFile(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	path := filepath.Join(t.TempDir(), "cal.tiff")
	if err := figure.WriteCalibratedTIFF(path, make([]float64, 12), 4, 3, figure.TIFFMeta{NmPerPx: 0.52}); err != nil {
		t.Fatal(err)
	}
	if err := ws.OpenMicrograph(path); err != nil {
		t.Fatal(err)
	}
	if m := ws.micro; m == nil || math.Abs(m.NmPerPx-0.52) > 1e-9 || m.pixelSizeNote() != "0.52 nm/px, from the file" {
		t.Fatalf("micrograph %+v", m)
	}
}
