package export

import (
	"context"
	"strings"
	"testing"

	"faultline/figure"
	"faultline/scene"
	"faultline/sim"
)

// planeImage is a 16 × 16 image whose bright field is f(i, j) and dark
// field 1 − f.
func planeImage(f func(i, j int) float64) *sim.Image {
	g := sim.Grid{NX: 16, NY: 16, WidthNm: 32, HeightNm: 32}
	im := &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{make([]float64, 256), make([]float64, 256)}}
	for j := 0; j < 16; j++ {
		for i := 0; i < 16; i++ {
			im.Intensity[0][j*16+i] = f(i, j)
			im.Intensity[1][j*16+i] = 1 - f(i, j)
		}
	}
	return im
}

// A stretched panel states the range it maps; rounding noise gives a flat
// panel that says it has no contrast; a weak but real contrast of 0.01 is
// still stretched.
func TestGreyNoteRanges(t *testing.T) {
	m := figure.Mapping{Mode: figure.ModeAuto}
	both, labels := []int{0, 1}, []string{"BF", "DF"}
	real := planeImage(func(i, j int) float64 { return 0.412 + 0.175*float64(i)/15 })
	if got, want := GreyNote(real, m, both, labels), "grey: BF stretched over 0.412–0.587; DF stretched over 0.413–0.588"; got != want {
		t.Errorf("GreyNote = %q, want %q", got, want)
	}
	noise := planeImage(func(i, j int) float64 { return 0.6 + 1e-16*float64((i*7+j)%5) })
	note := GreyNote(noise, m, both, labels)
	if !strings.Contains(note, "BF: no contrast") || !strings.Contains(note, "DF: no contrast") || !strings.Contains(note, "drawn flat at 0.600") {
		t.Errorf("noise: %q", note)
	}
	weak := planeImage(func(i, j int) float64 { return 0.5 + 0.01*float64(j)/15 })
	note = GreyNote(weak, figure.Mapping{Mode: figure.ModeAuto, ClipPercent: 0.5, Invert: true}, both[:1], labels[:1])
	if want := "grey: BF stretched over 0.500–0.510 (0.5 % of the pixels clipped at each end, inverted)"; note != want {
		t.Errorf("weak: %q, want %q", note, want)
	}
	bf, _, err := Grays(weak, m)
	if err != nil {
		t.Fatal(err)
	}
	if bf.Pix[0] != 0 || bf.Pix[15*16] != 255 {
		t.Errorf("a contrast of 0.01 is not stretched: top %d, bottom %d", bf.Pix[0], bf.Pix[15*16])
	}
	if got := GreyNote(real, figure.Mapping{}, both, labels); got != MappingNote(figure.Mapping{}) {
		t.Errorf("fixed mapping: %q", got)
	}
}

// g·b = 0: a screw dislocation in Al with b = ½[1 1 0] imaged in
// g = 1 −1 1 is invisible (the isotropic g·b = 0 rule, Hirsch et al. 1965,
// ch. 11; R ∥ b for a screw, so g·R = 0 everywhere). Its panels in the
// stretched figure are uniform and the caption says there is no contrast.
func TestFigureOfInvisibleScrewIsFlat(t *testing.T) {
	sc, err := scene.Parse([]byte(`{"version": 1, "crystal": {"material": "Al"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [1, -1, 1], "beam": [0, 1, 1], "s_per_nm": 0},
	  "foil": {"thickness_nm": 80},
	  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, 1, 0], "at_nm": [0, 0, 40], "elasticity": "isotropic"}],
	  "image": {"width_nm": 60, "height_nm": 60, "pixels": [24, 24]}}`))
	if err != nil {
		t.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	im, err := Render(context.Background(), st, sim.Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	o := DefaultOptions()
	bf, df, err := Grays(im, o.FigureMapping)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range [][]uint8{bf.Pix, df.Pix} {
		for k := range p {
			if p[k] != p[0] {
				t.Fatalf("g·b = 0 panel is not uniform: grey %d and %d", p[0], p[k])
			}
		}
	}
	note := GreyNote(im, o.FigureMapping, []int{0, 1}, []string{"BF", "DF"})
	if !strings.Contains(note, "BF: no contrast") || !strings.Contains(note, "DF: no contrast") {
		t.Errorf("caption line %q does not say the panels have no contrast", note)
	}
	if _, err := Figure(st, im, o); err != nil {
		t.Fatal(err)
	}
}
