package export

import (
	"context"
	"math"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

// stableScene is a small two-beam scene with a dislocation and a blur.
const stableScene = `{"version": 1, "crystal": {"material": "Ni"}, "microscope": {"voltage_kv": 200},
  "diffraction": {"g": [2, 0, 0], "beam": [0, 1, 1], "s_per_nm": 0.004, "model": "two-beam", "absorption_ratio": 0.1},
  "foil": {"thickness_nm": 100},
  "defects": [{"type": "dislocation", "b": "1/2[0 1 1]", "line": [1, 1, 1], "at_nm": [0, 0, 50]}],
  "image": {"width_nm": 160, "height_nm": 160, "pixels": [40, 40], "blur_nm": 2}}`

// The export glue of the s table: SOnly tells a change of s alone from
// others; FromTable serves a setup whose s lies in the table, with the
// scene's blur applied as Render applies it (within 1e-4 of the incident
// beam of a fresh render), and refuses others.
func TestSTableGlue(t *testing.T) {
	sc, err := scene.Parse([]byte(stableScene))
	if err != nil {
		t.Fatal(err)
	}
	var b scene.Builder
	st, err := b.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	at := func(change func(sc *scene.Scene)) *scene.Setup {
		next := *sc
		d := sc.Diffraction
		next.Diffraction = d
		f := sc.Foil
		next.Foil = f
		change(&next)
		s, err := b.Build(&next, ".")
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	s2 := 0.0093
	moved := at(func(sc *scene.Scene) { sc.Diffraction.SPerNm = &s2 })
	thinner := at(func(sc *scene.Scene) { sc.Foil.ThicknessNm = 90 })
	if !SOnly(st, moved) {
		t.Error("SOnly: a change of s alone not recognised")
	}
	if SOnly(st, thinner) {
		t.Error("SOnly: a change of thickness taken for one of s")
	}
	ctx := context.Background()
	_, smp, err := Record(ctx, st, sim.Options{}, 125, NearbyModels(st))
	if err != nil || smp == nil {
		t.Fatalf("record: %v", err)
	}
	lo, hi, ok := NearbyRange(st)
	if !ok || lo != 0.004-0.01 || hi != 0.004+0.01 {
		t.Fatalf("NearbyRange: [%g, %g] %v, want s ± 0.01 /nm", lo, hi, ok)
	}
	tab, err := TabulateS(ctx, smp, st, lo, hi, sim.STableOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !TableServes(tab, moved) || TableServes(tab, thinner) {
		t.Errorf("TableServes: s move %v (want true), thickness move %v (want false)", TableServes(tab, moved), TableServes(tab, thinner))
	}
	got, err := FromTable(ctx, tab, moved, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := Render(ctx, moved, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	worst := sim.MaxDifference(want, got)
	t.Logf("blurred image from the table within %.2g of a fresh blurred render", worst)
	if worst > 1e-4 {
		t.Errorf("blurred image from the table differs from a fresh render by %.3g", worst)
	}
	// The blur matters here: the table's unblurred image is far from it.
	raw, err := tab.Image(ctx, s2, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	diff := 0.0
	for n := range raw.Intensity[0] {
		diff = math.Max(diff, math.Abs(raw.Intensity[0][n]-want.Intensity[0][n]))
	}
	if diff < 1e-3 {
		t.Errorf("the blur of 2 nm changes the image by only %.3g: the test does not see it", diff)
	}
	if _, err := FromTable(ctx, tab, thinner, sim.Options{}); err == nil {
		t.Error("FromTable served a thickness move")
	}
	far := 0.05
	if _, err := FromTable(ctx, tab, at(func(sc *scene.Scene) { sc.Diffraction.SPerNm = &far }), sim.Options{}); err == nil {
		t.Error("FromTable served an s outside the table")
	}
}
