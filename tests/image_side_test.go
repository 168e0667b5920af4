package tests

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// dislocationCase is a straight dislocation lying in the foil plane of a
// copper foil imaged along [0 0 1], isotropic elasticity.
type dislocationCase struct {
	b     string
	line  vec3
	g     vec3
	diffr string // the deviation and model fields of "diffraction"
	useDF bool
	// thickNm is the foil thickness; 0 means 4.5 ξ_g.
	thickNm float64
	// widthNm is the length of the row, 240 pixels; 0 means 48 nm.
	widthNm float64
}

// renderDislocation renders the row y = 0 of the case in 240 pixels, with the dislocation in the middle of the foil (the
// image of a straight line in the foil plane is the same on every row, up
// to the shift along the line) and returns, for each pixel, its distance d
// from the line's projection measured along ŝ = u × z (u the line sense in
// the image frame), and the contrast (intensity minus the perfect
// crystal's) of the chosen beam.
func renderDislocation(t *testing.T, c dislocationCase) (d, con []float64, reading string) {
	t.Helper()
	beam := vec3{0, 0, 1}
	text := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": ` + c.g.json() + `, "beam": ` + beam.json() + `, ` + c.diffr + `},
	  "foil": {"thickness_nm": %[1]g},
	  "defects": [{"type": "dislocation", "b": "` + c.b + `", "line": ` + c.line.json() + `, "at_nm": [0, 0, %[2]g], "elasticity": "isotropic"}],
	  "image": {"width_nm": %[3]g, "height_nm": %[4]g, "pixels": [240, 1]}}`
	width := 48.0
	if c.widthNm > 0 {
		width = c.widthNm
	}
	xi := setup(t, fmt.Sprintf(text, 100.0, 50.0, width, width/240)).XiGNm
	th := 4.5 * xi
	if c.thickNm > 0 {
		th = c.thickNm
	}
	st := setup(t, fmt.Sprintf(text, th, th/2, width, width/240))
	im := render(t, st)
	k := 0
	if c.useDF {
		k = 1
	}
	con = contrast(st, im, k)
	fr := newImageFrame(c.g, beam)
	u := fr.in(c.line.unit())
	side := u.cross(vec3{0, 0, 1}).unit()
	nx, ny := im.Grid.NX, im.Grid.NY
	d = make([]float64, nx*ny)
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			d[j*nx+i] = pixelX(im, i)*side[0] + pixelY(im, j)*side[1]
		}
	}
	return d, con, st.ReadingLines()[0]
}

// The image of a straight dislocation lies to one side of its core: on the
// side where the lattice planes are bent back towards the Bragg position,
// the effective deviation s + d(g·R)/dz passing through zero (Hirsch, Howie
// & Whelan 1960, Phil. Trans. R. Soc. A 252, 499; Hirsch et al. 1965,
// Electron Microscopy of Thin Crystals, ch. 11). Reversing g, s or b moves
// it to the other side.
//
// Which side, in the README's conventions: with u the line sense, b by
// FS/RH (R gains +b going once round u right-handedly) and
// R·b̂ = |b|θ/2π + … (Hirth & Lothe 1982, ch. 3) with θ right-handed about
// u, take the frame x' = ŝ = u × z, y' = u × x' = −z for a line lying in
// the foil plane; then θ = atan2(−(z − z0), d) and, on the column at
// distance d along ŝ,
//
//	d(g·R)/dz = −(g·b) d / (2π (d² + (z − z0)²)) + (edge terms of the same sign at z = z0),
//
// so s + d(g·R)/dz vanishes at d = (g·b)/(2π s) (times 1 + 1/(2(1−ν)) for
// the edge part): the image lies along sign((g·b) s) ŝ, ŝ = u × z. (The
// textbook form "image on the side where (g·b)s > 0 puts it" with the beam
// pointing up the column is the same statement with z reversed.)
//
// Shown for an edge and a screw, in the kinematical limit (dark field at
// w = ±2, g, s and b each reversed) and in two-beam bright field at
// w = +0.8 (g and b reversed; s > 0 as the rule is used in practice: in a
// thick foil with absorption the bright-field image at s < 0 is a faint
// 0.02 of the background). The image lies where the contrast is strongest; its distance
// from the core must be at least two pixels (0.4 nm) on the rule's side.
func TestDislocationImageSide(t *testing.T) {
	type disl struct {
		name, b, bNeg string
		bVec, line    vec3
	}
	for _, dl := range []disl{
		{"edge", "1/2[1 0 1]", "1/2[-1 0 -1]", vec3{0.5, 0, 0.5}, vec3{0, 1, 0}},
		{"screw", "1/2[1 1 0]", "1/2[-1 -1 0]", vec3{0.5, 0.5, 0}, vec3{1, 1, 0}},
	} {
		for _, model := range []struct {
			name, diffr string
			w           float64
			df          bool
		}{
			{"kinematical DF", `"model": "kinematical", "w": %g`, 2, true},
			{"two-beam BF", `"model": "two-beam", "w": %g`, 0.8, false},
		} {
			for _, gs := range []float64{1, -1} {
				for _, ss := range []float64{1, -1} {
					if ss < 0 && !model.df {
						continue // see above: s < 0 only kinematically
					}
					for _, bs := range []float64{1, -1} {
						g := vec3{2, 0, 0}.scale(gs)
						b, bv := dl.b, dl.bVec
						if bs < 0 {
							b, bv = dl.bNeg, bv.scale(-1)
						}
						c := dislocationCase{b: b, line: dl.line, g: g, diffr: fmt.Sprintf(model.diffr, ss*model.w), useDF: model.df}
						name := fmt.Sprintf("%s %s g=%v s%s b=%s", dl.name, model.name, g, map[float64]string{1: ">0", -1: "<0"}[ss], b)
						d, con, reading := renderDislocation(t, c)
						peak := 0
						for n := range d {
							if math.Abs(con[n]) > math.Abs(con[peak]) {
								peak = n
							}
						}
						mean := d[peak]
						gb := g.dot(bv)
						want := math.Copysign(1, gb*ss)
						t.Logf("%s: g·b = %g, strongest contrast %+.3f at d = %+.2f nm", name, gb, con[peak], mean)
						// The program's reading names the same side: for a
						// line along y (edge) u × z is ±x; for the screw along
						// [1 1 0] it is the lower right or upper left.
						if side := pictureDirectionOf(sideVec(c, want)); !strings.Contains(reading, "image on the "+side+" side") {
							t.Errorf("%s: the program reads %q; the image lies %s", name, reading, side)
						}
						if mean*want < 0.4 {
							t.Errorf("%s: strongest contrast at d = %+.2f nm along u × z; the rule puts it on the %s side", name, mean, map[float64]string{1: "+", -1: "−"}[want])
						}
					}
				}
			}
		}
	}
}
