package export

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"faultline/scene"
	"faultline/sim"
)

func testImage() *sim.Image {
	g := sim.Grid{NX: 8, NY: 4, WidthNm: 16, HeightNm: 8}
	im := &sim.Image{Grid: g, Beams: []int{0, 1}, Intensity: [][]float64{make([]float64, 32), make([]float64, 32)}}
	for j := 0; j < 4; j++ {
		for i := 0; i < 8; i++ {
			im.Intensity[0][j*8+i] = 0.1*float64(i) + 0.01*float64(j) // linear: bilinear is exact
			im.Intensity[1][j*8+i] = 1 - im.Intensity[0][j*8+i]
		}
	}
	return im
}

func TestRowAndProfile(t *testing.T) {
	im := testImage()
	// Pixel centres y = (j + 0.5 − 2)·2 nm = −3, −1, 1, 3: y = 1.4 is row 2.
	for _, c := range []struct {
		y float64
		j int
	}{{1.4, 2}, {-3.9, 0}, {3.99, 3}, {0, 2}} {
		if j, err := Row(im.Grid, c.y); err != nil || j != c.j {
			t.Errorf("Row(%g) = %d, %v; want %d", c.y, j, err, c.j)
		}
	}
	if _, err := Row(im.Grid, 5); err == nil {
		t.Error("y outside the image accepted")
	}
	var buf bytes.Buffer
	if err := WriteProfile(&buf, im, 1.4); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	if lines[0] != "x_nm,bf,df" || len(lines) != 9 || lines[1] != "-7,0.02,0.98" {
		t.Errorf("profile CSV:\n%s", buf.String())
	}
}

func TestSampleLineInterpolatesBetweenCentres(t *testing.T) {
	im := testImage()
	p := SampleLine(im, Line{X0: -5, Y0: -2, X1: 5, Y1: 2})
	for k := range p.DistNm {
		// The test image is linear in the pixel indices, so bilinear
		// interpolation reproduces it exactly inside the centres.
		fi := p.XNm[k]/2 + 3.5
		fj := p.YNm[k]/2 + 1.5
		want := 0.1*fi + 0.01*fj
		if math.Abs(p.BF[k]-want) > 1e-12 || math.Abs(p.DF[k]-(1-want)) > 1e-12 {
			t.Fatalf("sample %d at (%g, %g): %g, want %g", k, p.XNm[k], p.YNm[k], p.BF[k], want)
		}
	}
	if n := len(p.DistNm); n < 10 || math.Abs(p.DistNm[n-1]-math.Hypot(10, 4)) > 1e-12 {
		t.Errorf("%d samples, last at %g nm", n, p.DistNm[len(p.DistNm)-1])
	}
	var buf bytes.Buffer
	WriteLineProfile(&buf, p)
	if !strings.HasPrefix(buf.String(), "distance_nm,x_nm,y_nm,bf,df\n") {
		t.Errorf("header: %q", buf.String()[:40])
	}
}

func TestCaptionCarriesTheConditions(t *testing.T) {
	sc, err := scene.Parse([]byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 300},
	  "diffraction": {"g": [2, 2, 0], "beam": [0, 0, 1], "weak_beam": {"n": 3}},
	  "foil": {"thickness_nm": 85}, "defects": [], "image": {"width_nm": 100, "height_nm": 100, "pixels": [10, 10]}}`))
	if err != nil {
		t.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	c := Caption(st)
	text := c.G + " | " + strings.Join(c.Lines, " | ")
	for _, want := range []string{"g = 2 2 0", "B = [0 0 1]", "g(3g)", "t = 85 nm", "300 kV", "systematic row, 7 beams", "Cu"} {
		if !strings.Contains(text, want) {
			t.Errorf("caption %q lacks %q", text, want)
		}
	}
}

// ScaleToRange is the linear map of [min, max] onto the reference's
// [min, max]; NaN stays NaN.
func TestScaleToRange(t *testing.T) {
	got, ok := ScaleToRange([]float64{10, math.NaN(), 20, 15}, []float64{0.2, 0.6, 0.4})
	if !ok || got[0] != 0.2 || !math.IsNaN(got[1]) || got[2] != 0.6 || math.Abs(got[3]-0.4) > 1e-15 {
		t.Errorf("ScaleToRange = %v, %v", got, ok)
	}
	if _, ok := ScaleToRange([]float64{3, 3}, []float64{0, 1}); ok {
		t.Error("a flat profile was scaled")
	}
}

// A figure's caption lists the defects (type, b, line or normal, position
// with depth) as well as the conditions, so the figure can be reproduced.
func TestCaptionListsDefects(t *testing.T) {
	sc, err := scene.Parse([]byte(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.01}, "foil": {"thickness_nm": 80},
	  "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, 40]},
	              {"type": "loop", "b": "1/2[1 0 1]", "normal": [1, 0, 1], "radius_nm": 5, "at_nm": [10, 0, 30]}],
	  "image": {"width_nm": 40, "height_nm": 40, "pixels": [8, 8]}}`))
	if err != nil {
		t.Fatal(err)
	}
	st, err := scene.Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Join(Caption(st).Lines, "\n")
	for _, want := range []string{"defects: 1 dislocation", "1/2[1 1 0]", "line [1 -1 0]", "(0, 0, 40) nm", "2 loop", "normal [1 0 1]", "(10, 0, 30) nm"} {
		if !strings.Contains(text, want) {
			t.Errorf("caption lacks %q:\n%s", want, text)
		}
	}
}
