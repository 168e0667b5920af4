package ui

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"faultline/scene"
)

// Switching the deviation setting keeps the excitation error where the
// new form can hold it: w = s ξg; the weak-beam g(ng) with
// s = (n − 1) λ g²/2 (Cockayne, Ray & Whelan 1969); the Kikuchi offset
// Δx/x = s / (λ g²) (Hirsch et al. 1965, ch. 4).
func TestDeviationSwitch(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	st := ws.ctrl.Setup()
	s0, xi := st.SPerNm, st.XiGNm
	lg2 := st.WavelengthNm * st.GPerNm * st.GPerNm

	ws.params.Deviation.SetSelected(devName("w"))
	d := ws.ctrl.Scene().Diffraction
	if d.W == nil || d.SPerNm != nil || math.Abs(*d.W-roundTo(s0*xi, wStep)) > 1e-12 {
		t.Fatalf("w mode: w = %v, s = %v; want w = s·ξg = %.4g rounded to %g", d.W, d.SPerNm, s0*xi, wStep)
	}
	if st := ws.ctrl.Setup(); st == nil || math.Abs(st.SPerNm-s0) > wStep/xi {
		t.Errorf("s changed by switching to w beyond the rounding of w")
	}
	if ws.params.W.Entry.Text == "" {
		t.Error("the w entry is empty")
	}

	ws.params.Deviation.SetSelected(devName("weak_beam"))
	d = ws.ctrl.Scene().Diffraction
	if d.WeakBeam == nil || d.WeakBeam.N != 3 || d.W != nil {
		t.Fatalf("weak beam: %+v", d)
	}
	// g(3g): s = λ g² for g = 200 in Ni at 200 kV.
	if st := ws.ctrl.Setup(); st == nil || math.Abs(st.SPerNm-lg2) > 1e-12 {
		t.Errorf("g(3g): s = %v, want λg² = %g", st.SPerNm, lg2)
	}
	test.Type(clearEntry(ws.params.WeakN), "4")
	if n := ws.ctrl.Scene().Diffraction.WeakBeam.N; n != 4 {
		t.Errorf("typed n = 4, scene has %g", n)
	}

	ws.params.Deviation.SetSelected(devName("deviation_from_kikuchi"))
	d = ws.ctrl.Scene().Diffraction
	if d.Kikuchi == nil || d.WeakBeam != nil || d.Kikuchi.Spacing != 1 {
		t.Fatalf("Kikuchi: %+v", d)
	}
	// From g(4g), s = 3λg²/2: the excess line sits 1.5 spacings beyond g.
	if math.Abs(d.Kikuchi.Offset-1.5) > 1e-3 {
		t.Errorf("Kikuchi offset %g spacings, want 1.5 for g(4g)", d.Kikuchi.Offset)
	}

	ws.params.Deviation.SetSelected(devName("s_per_nm"))
	d = ws.ctrl.Scene().Diffraction
	if d.SPerNm == nil || d.Kikuchi != nil || math.Abs(*d.SPerNm-1.5*lg2) > 1e-4 {
		t.Errorf("back to s: %v, want %g", d.SPerNm, 1.5*lg2)
	}
}

// devName is the name in the choice of the deviation form.
func devName(form string) string { return deviationNames[indexOf(scene.DeviationForms, form)] }

// Choosing a reflection of the zone sets g; forbidden ones are offered,
// marked, and refused with the library's message under g.
func TestZoneReflectionChoice(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	opts := ws.params.Reflections.Options
	if len(opts) < 4 {
		t.Fatalf("%d reflections offered for Ni [0 1 1]", len(opts))
	}
	var allowed, forbidden string
	for _, o := range opts[1:] {
		switch {
		case strings.Contains(o, "forbidden") && forbidden == "":
			forbidden = o
		case !strings.Contains(o, "forbidden") && allowed == "":
			allowed = o
		}
	}
	// fcc: h, k, l all even or all odd; [0 1 1] holds 1 1 -1 (allowed)
	// and 1 0 0 (forbidden) (the extinction rules of a face-centred
	// lattice, International Tables Vol. A).
	if allowed == "" || forbidden == "" {
		t.Fatalf("want both allowed and forbidden reflections, got %q", opts)
	}
	ws.params.Reflections.SetSelected(allowed)
	g := ws.ctrl.Scene().Diffraction.G
	if got := formatIndices(g); !strings.HasPrefix(allowed, got+" ") {
		t.Errorf("chose %q, g = %s", allowed, got)
	}
	if ws.params.G.Text != formatIndices(g) {
		t.Errorf("g entry shows %q, want %q", ws.params.G.Text, formatIndices(g))
	}
	if ws.ctrl.Err() != nil {
		t.Errorf("allowed reflection does not build: %v", ws.ctrl.Err())
	}
	ws.params.Reflections.SetSelected(forbidden)
	if l := ws.board.labels["diffraction.g"]; !l.Visible() || !strings.Contains(l.Text, "forbidden") {
		t.Errorf("forbidden reflection: under g %q", l.Text)
	}
}

// A CIF file becomes the scene's crystal; its path is kept.
func TestUseCIF(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "crystal", "testdata", "nacl.cif"))
	if err != nil {
		t.Fatalf("test CIF crystal/testdata/nacl.cif: %v", err)
	}
	dir := t.TempDir()
	cif := filepath.Join(dir, "nacl.cif")
	os.WriteFile(cif, src, 0o644)
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	// A perfect crystal: NaCl has no elastic constants for a dislocation.
	ws.ctrl.Edit(func(sc *scene.Scene) { sc.Defects = nil })
	ws.useCIF(cif)
	if got := ws.ctrl.Scene().Crystal.CIF; got != cif {
		t.Fatalf("crystal.cif = %q, want %q", got, cif)
	}
	if ws.params.Material.Selected != "CIF: nacl.cif" {
		t.Errorf("material shows %q", ws.params.Material.Selected)
	}
	st := ws.ctrl.Setup()
	if st == nil {
		t.Fatalf("NaCl from the CIF does not build: %v", ws.ctrl.Err())
	}
	// a = 5.6402 Å in the file.
	if math.Abs(st.Crystal.Cell.A-0.56402) > 1e-9 {
		t.Errorf("a = %g nm, want 0.56402", st.Crystal.Cell.A)
	}
	// A file that is not a CIF is refused next to the crystal; the
	// crystal stays.
	junk := filepath.Join(dir, "junk.cif")
	os.WriteFile(junk, []byte("this is not a CIF"), 0o644)
	ws.useCIF(junk)
	if ws.ctrl.Scene().Crystal.CIF != cif {
		t.Error("a bad CIF replaced the crystal")
	}
	if l := ws.board.labels["crystal"]; !l.Visible() || !strings.HasPrefix(l.Text, "CIF: ") {
		t.Errorf("under the crystal: %q", l.Text)
	}
}

// Recent files: newest first, no repeats, at most maxRecent; kept in the
// app's preferences.
func TestRecentFiles(t *testing.T) {
	ws, _ := newTestWorkspace(t, (&fakeRender{}).render)
	for i := 0; i < maxRecent+3; i++ {
		ws.addRecent(filepath.Join("/data", string(rune('a'+i))+".json"))
	}
	ws.addRecent("/data/c.json")
	r := ws.Recent()
	if len(r) != maxRecent || r[0] != "/data/c.json" {
		t.Fatalf("recent %v", r)
	}
	seen := map[string]bool{}
	for _, p := range r {
		if seen[p] {
			t.Errorf("%s listed twice", p)
		}
		seen[p] = true
	}
	if got := ws.app.Preferences().StringList(recentKey); len(got) != maxRecent {
		t.Errorf("preferences hold %v", got)
	}
}

// With unsaved changes, New asks first; "Discard changes" goes ahead.
func TestUnsavedChangesPrompt(t *testing.T) {
	a := test.NewApp()
	t.Cleanup(a.Quit)
	p := newPump()
	w := test.NewWindow(nil)
	ws := NewWorkspace(a, w, p.post)
	w.SetContent(ws.Content())
	ws.ctrl.Render = (&fakeRender{}).render
	ws.ctrl.Replace(testScene(t), "", true)
	p.until(t, 5*time.Second, "first render", func() bool { return ws.ctrl.LastFull() != nil })

	ws.NewScene() // not dirty: no question
	if ws.ctrl.Scene().Crystal.Material != "Cu" || len(ws.ctrl.Scene().Defects) != 0 {
		t.Fatalf("New gave %+v", ws.ctrl.Scene().Crystal)
	}
	ws.params.Thickness.Slider.SetValue(77)
	if !ws.ctrl.Dirty() {
		t.Fatal("not dirty after a change")
	}
	ws.ctrl.Replace(testScene(t), "", true)
	ws.params.Thickness.Slider.SetValue(77)
	ws.NewScene()
	if ws.ctrl.Scene().Crystal.Material == "Cu" {
		t.Fatal("New replaced a changed scene without asking")
	}
	top := w.Canvas().Overlays().Top()
	if top == nil {
		t.Fatal("no dialog shown")
	}
	discard := findButton(top, "Discard changes")
	if discard == nil {
		t.Fatal("no Discard changes button in the dialog")
	}
	test.Tap(discard)
	if ws.ctrl.Scene().Crystal.Material != "Cu" {
		t.Error("Discard changes did not go on to the new scene")
	}
}

// findButton finds the button labelled text among the objects laid out
// under o.
func findButton(o fyne.CanvasObject, text string) *widget.Button {
	for _, c := range test.LaidOutObjects(o) {
		if b, ok := c.(*widget.Button); ok && b.Text == text {
			return b
		}
	}
	return nil
}
