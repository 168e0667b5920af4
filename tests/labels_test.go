package tests

import (
	"math"
	"testing"

	"faultline/sweep"
)

// The label geometry agrees with the rendered image: the projected line of
// a dislocation parallel to the foil (line [1 -1 0] ⊥ the beam [001], at
// mid-depth) passes through its image's contrast. Across the line, the
// bright-field contrast |I − I_perfect| of each perpendicular profile
// peaks within ξ_g/2 of the labelled line: at s = 0 the two-beam image of
// a dislocation lies within a fraction of ξ_g of the core (Hirsch, Howie,
// Nicholson, Pashley & Whelan, Electron Microscopy of Thin Crystals, ch.
// 11; bound from memory). The pixels the label marks carry on average
// several times the contrast of the pixels it leaves out.
func TestLabelLineThroughContrast(t *testing.T) {
	st := setup(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	 "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], "s_per_nm": 0},
	 "foil": {"thickness_nm": 120},
	 "defects": [{"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [10, -5, 60]}],
	 "image": {"width_nm": 128, "height_nm": 128, "pixels": [64, 64]}}`)
	im := render(t, st)
	lab, img, err := sweep.MakeLabels(st, 2)
	if err != nil {
		t.Fatal(err)
	}
	if len(lab.Defects) != 1 || len(lab.Defects[0].Polylines) != 1 {
		t.Fatalf("labels: %+v", lab.Defects)
	}
	pl := lab.Defects[0].Polylines[0]
	bg := perfect(st)[0]
	bf := im.BF()
	nx, ny := im.Grid.NX, im.Grid.NY
	contrast := func(i, j int) float64 {
		if i < 0 || j < 0 || i >= nx || j >= ny {
			return math.NaN()
		}
		return math.Abs(bf[j*nx+i] - bg)
	}
	// Along the line, every 4 pixels away from its ends, the profile
	// across it (direction (1, 1)/√2 in pixels).
	a, b := pl[0], pl[1]
	L := math.Hypot(b[0]-a[0], b[1]-a[1])
	ux, uy := (b[0]-a[0])/L, (b[1]-a[1])/L
	nxp, nyp := -uy, ux
	pxNm := lab.NmPerPx
	bound := st.XiGNm / 2 / pxNm // in pixels
	checked := 0
	for s := 8.0; s < L-8; s += 4 {
		cx, cy := a[0]+s*ux, a[1]+s*uy
		best, bestD := -1.0, 0.0
		for d := -20.0; d <= 20; d += 0.5 {
			x, y := cx+d*nxp, cy+d*nyp
			c := contrast(int(math.Floor(x)), int(math.Floor(y)))
			if !math.IsNaN(c) && c > best {
				best, bestD = c, d
			}
		}
		checked++
		if math.Abs(bestD) > bound {
			t.Errorf("at %.1f px along the line the contrast peaks %.1f px (%.1f nm) from it; want within ξg/2 = %.1f nm", s, bestD, bestD*pxNm, st.XiGNm/2)
		}
	}
	if checked < 5 {
		t.Fatalf("only %d profiles checked", checked)
	}
	var in, out float64
	var nIn, nOut int
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			if img.Gray16At(i, j).Y == 1 {
				in += contrast(i, j)
				nIn++
			} else {
				out += contrast(i, j)
				nOut++
			}
		}
	}
	if nIn == 0 || lab.Defects[0].LabelPixels != nIn {
		t.Fatalf("%d labelled pixels, labels.json says %d", nIn, lab.Defects[0].LabelPixels)
	}
	if in/float64(nIn) < 3*out/float64(nOut) {
		t.Errorf("mean contrast on the label %.4f, off it %.4f: want at least 3 times", in/float64(nIn), out/float64(nOut))
	}
	t.Logf("ξg = %.1f nm; mean contrast on the label %.4f, off it %.4f", st.XiGNm, in/float64(nIn), out/float64(nOut))
}
