package ui

import (
	"context"
	"strings"
	"testing"
	"time"

	"faultline/export"
	"faultline/scene"
	"faultline/sim"
)

// The window's s table: built after a change of s alone, it serves later
// changes of s inside its range (the image agrees with a fresh render
// within 1e-4 of the incident beam, and the status line says where the
// image came from); a change of s outside the range is replayed and keeps
// the table; a change of anything else (the thickness) drops it.
func TestSTableInWindow(t *testing.T) {
	p := newPump()
	c := NewController(p.post)
	sc := demoScene(t)
	sc.Image.Pixels = []int{96, 96}
	c.Replace(sc, "", true)
	p.until(t, 120*time.Second, "first full render", func() bool { return c.LastFull() != nil })
	move := func(what string, change func(sc *scene.Scene)) *Result {
		t.Helper()
		if err := c.Edit(change); err != nil {
			t.Fatal(err)
		}
		p.until(t, 120*time.Second, what, func() bool { return c.LastFull() != nil && c.LastFull().Gen == c.Gen() })
		return c.LastFull()
	}
	setS := func(s float64) func(*scene.Scene) { return func(sc *scene.Scene) { sc.Diffraction.SPerNm = &s } }

	if r := move("s = 0.006", setS(0.006)); r.Source != SourceReplay {
		t.Fatalf("first s move: image from %q, want %q", r.Source, SourceReplay)
	}
	p.until(t, 300*time.Second, "the s table", func() bool { _, building, _ := c.STable(); return !building })
	tab, _, err := c.STable()
	if tab == nil {
		t.Fatalf("no s table after an s move: %v", err)
	}
	lo, hi := tab.Range()
	if lo != 0.004-0.01 || hi != 0.004+0.01 {
		t.Errorf("table over [%g, %g], want the recorded s ± 0.01 /nm", lo, hi)
	}
	r := move("s = 0.0083", setS(0.0083))
	if r.Source != SourceTable {
		t.Fatalf("s move inside the table: image from %q, want %q", r.Source, SourceTable)
	}
	want, err := export.Render(context.Background(), r.Setup, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	worst := sim.MaxDifference(want, r.Image)
	t.Logf("image from the table within %.2g of a fresh render; %s", worst, fullText(r))
	if worst > 1e-4 {
		t.Errorf("image from the table differs from a fresh render by %.3g", worst)
	}
	if txt := fullText(r); !strings.Contains(txt, "from the s table") || strings.Contains(txt, "render") {
		t.Errorf("status for an image from the table: %q", txt)
	}

	if r := move("s = 0.03", setS(0.03)); r.Source != SourceReplay {
		t.Errorf("s move outside the table: image from %q, want %q", r.Source, SourceReplay)
	} else if txt := fullText(r); !strings.Contains(txt, "replayed") {
		t.Errorf("status for a replayed image: %q", txt)
	}
	if tab, _, _ := c.STable(); tab == nil {
		t.Error("an s move outside the table dropped it")
	}
	if r := move("back inside", setS(0.001)); r.Source != SourceTable {
		t.Errorf("s move back inside the table: image from %q, want %q", r.Source, SourceTable)
	}
	if r := move("thickness 110 nm", func(sc *scene.Scene) { sc.Foil.ThicknessNm = 110 }); r.Source != SourceReplay {
		t.Errorf("thickness move: image from %q, want %q", r.Source, SourceReplay)
	}
	if tab, building, _ := c.STable(); tab != nil || building {
		t.Error("a thickness move kept the s table")
	}
	c.Close()
}

// The status line says how each full image was made: rendered, replayed
// from the field samples (and the s table being built), or evaluated from
// the s table (with its range and estimated error); never "Full render"
// for an image that was not rendered.
func TestStatusSaysWhereImageCameFrom(t *testing.T) {
	ws, p := newTestWorkspace(t, nil)
	c := ws.ctrl
	timing := func() string { return ws.status.Timing.Text }
	if txt := timing(); !strings.HasPrefix(txt, "Full render 100 × 100") {
		t.Errorf("after the first render: %q", txt)
	}
	setS := func(s float64) {
		t.Helper()
		if err := c.Edit(func(sc *scene.Scene) { sc.Diffraction.SPerNm = &s }); err != nil {
			t.Fatal(err)
		}
		p.until(t, 60*time.Second, "the full image", func() bool { return c.LastFull() != nil && c.LastFull().Gen == c.Gen() })
	}
	setS(0.007)
	if txt := timing(); !strings.HasPrefix(txt, "Full image 100 × 100 replayed from the field samples") ||
		!strings.Contains(txt, "building the s table") {
		t.Errorf("after the first s move: %q", txt)
	}
	p.until(t, 120*time.Second, "the s table", func() bool { _, building, _ := c.STable(); return !building })
	if txt := timing(); !strings.Contains(txt, "s table ready for s -0.0050 to 0.0150 /nm") {
		t.Errorf("once the table is built: %q", txt)
	}
	setS(0.009)
	if txt := timing(); !strings.HasPrefix(txt, "Full image 100 × 100 from the s table (s -0.0050 to 0.0150 /nm, series error estimated at") {
		t.Errorf("after an s move served by the table: %q", txt)
	}
	c.Close()
}
