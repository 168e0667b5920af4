package scene

import (
	"context"
	"math"
	"testing"

	"faultline/sim"
)

// frameScene is copper seen along [0 0 1] with a cavity (strong contrast
// for any g) off the centre, in the specimen frame x = [1 0 0].
func frameScene(g string, xAxis bool) string {
	x := ""
	if xAxis {
		x = `, "x_axis": [1, 0, 0]`
	}
	return `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": ` + g + `, "beam": [0, 0, 1], "s_per_nm": 0.02},
	  "foil": {"thickness_nm": 60},
	  "defects": [{"type": "cavity", "at_nm": [20, -10, 30], "radius_nm": 6}],
	  "image": {"width_nm": 80, "height_nm": 80, "pixels": [40, 40]` + x + `}}`
}

func renderScene(t *testing.T, text string) (*Setup, *sim.Image) {
	t.Helper()
	sc, err := Parse([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	st, err := Build(sc, ".")
	if err != nil {
		t.Fatal(err)
	}
	im, err := sim.Render(context.Background(), st.Problem, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return st, im
}

// centroid of the contrast |I − I_background| of the bright field, in nm
// from the picture's centre (x right, y down), by the pixel formula of the
// README.
func centroid(im *sim.Image) (x, y float64) {
	bf := im.BF()
	bg := bf[0]
	var w float64
	for j := 0; j < im.Grid.NY; j++ {
		for i := 0; i < im.Grid.NX; i++ {
			d := math.Abs(bf[j*im.Grid.NX+i] - bg)
			x += d * im.Grid.X(i)
			y += d * im.Grid.Y(j)
			w += d
		}
	}
	return x / w, y / w
}

// With image.x_axis the picture is fixed to the specimen: a defect stays
// where at_nm puts it whichever g images it, and g is drawn at its angle.
// Without it, x follows g and the same defect moves with g.
func TestSpecimenFrame(t *testing.T) {
	// g = 2 0 0 along the specimen's x: the frame of g and the specimen
	// frame coincide, to rounding.
	_, a := renderScene(t, frameScene("[2, 0, 0]", false))
	stb, b := renderScene(t, frameScene("[2, 0, 0]", true))
	if stb.GAngleDeg != 0 {
		t.Errorf("g = 200 along x_axis [100]: angle %v°, want 0", stb.GAngleDeg)
	}
	for k := range a.BF() {
		if math.Abs(a.BF()[k]-b.BF()[k]) > 1e-12 {
			t.Fatalf("pixel %d: %v with x_axis along g, %v without", k, b.BF()[k], a.BF()[k])
		}
	}
	// g = 0 2 0 is crystal y; the picture's y = z × x is crystal y too,
	// and runs down the picture: g points straight down, at −90°.
	stc, c := renderScene(t, frameScene("[0, 2, 0]", true))
	if math.Abs(stc.GAngleDeg+90) > 1e-9 {
		t.Errorf("g = 020 with x_axis [100], beam [001]: angle %v°, want −90", stc.GAngleDeg)
	}
	for _, im := range []*sim.Image{b, c} {
		x, y := centroid(im)
		if math.Hypot(x-20, y+10) > 1.5 {
			t.Errorf("cavity imaged at (%.1f, %.1f) nm, want (20, −10) in the specimen frame", x, y)
		}
	}
	// Without the specimen frame, g = 020 turns the picture: the cavity
	// at at_nm (20, −10) of the frame of g is elsewhere on the specimen.
	_, d := renderScene(t, frameScene("[0, 2, 0]", false))
	x, y := centroid(d)
	if math.Hypot(x-20, y+10) > 1.5 {
		t.Errorf("without x_axis the cavity is at (%.1f, %.1f), want at_nm (20, −10) of the frame of g", x, y)
	}
}

func TestSpecimenFrameErrors(t *testing.T) {
	for _, c := range []struct{ xaxis, want string }{
		{`[0, 0, 1]`, "image.x_axis: [0 0 1] is not perpendicular to the beam"},
		{`[0, 0, 0]`, "image.x_axis: [0, 0, 0]: all indices are zero"},
		{`[1, 0]`, "image.x_axis: [1, 0]: 2 indices; want 3"},
	} {
		text := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0.02}, "foil": {"thickness_nm": 60}, "defects": [],
		  "image": {"width_nm": 80, "height_nm": 80, "pixels": [40, 40], "x_axis": ` + c.xaxis + `}}`
		sc, err := Parse([]byte(text))
		if err == nil {
			_, err = Build(sc, ".")
		}
		if err == nil || len(err.Error()) < len(c.want) || err.Error()[:len(c.want)] != c.want {
			t.Errorf("x_axis %s: %v; want %q", c.xaxis, err, c.want)
		}
	}
}
