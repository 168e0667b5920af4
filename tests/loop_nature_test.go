package tests

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// loopCase is a circular perfect loop b = ±1/2<1 0 1> on a {1 0 1} plane,
// inclined at 45° in a copper foil imaged along [0 0 1].
type loopCase struct {
	normal, b vec3 // normal [uvw], b in lattice units
	g         vec3
	w         float64
	radiusNm  float64
	// kinematical selects the kinematical model and the dark field;
	// otherwise two-beam bright field.
	kinematical bool
	// nature, if not empty, is given in the scene, with b written with
	// the opposite sign: the program must reverse it.
	nature string
}

// burgersText writes b (in lattice units, halves) as the trade does.
func burgersText(b vec3) string { return fmt.Sprintf("1/2[%g %g %g]", 2*b[0], 2*b[1], 2*b[2]) }

// loopProfile renders the case along a line through the loop's centre,
// along x (the row y = 0) or along y (the column x = 0), 240 pixels over
// 48 nm, in the middle of a 4 ξ_g foil, and returns the positions (nm) and
// the contrast of the bright field (two-beam) or dark field (kinematical).
func loopProfile(t *testing.T, c loopCase, alongY bool) (pos, con []float64, reading string) {
	t.Helper()
	b, nature := c.b, ""
	if c.nature != "" {
		b, nature = b.scale(-1), `, "nature": "`+c.nature+`"`
	}
	model, beam := "", 0
	if c.kinematical {
		model, beam = `, "model": "kinematical"`, 1
	}
	pixels := "[240, 1]"
	w, h := 48.0, 0.2
	if alongY {
		pixels, w, h = "[1, 240]", 0.2, 48.0
	}
	text := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": ` + c.g.json() + `, "beam": [0, 0, 1], "w": ` + fmt.Sprint(c.w) + model + `},
	  "foil": {"thickness_nm": %[1]g},
	  "defects": [{"type": "loop", "at_nm": [0, 0, %[2]g], "normal": ` + c.normal.json() + `, "b": "` + burgersText(b) + `", "radius_nm": ` + fmt.Sprint(c.radiusNm) + nature + `}],
	  "image": {"width_nm": ` + fmt.Sprint(w) + `, "height_nm": ` + fmt.Sprint(h) + `, "pixels": ` + pixels + `}}`
	xi := setup(t, fmt.Sprintf(text, 100.0, 50.0)).XiGNm
	st := setup(t, fmt.Sprintf(text, 4*xi, 2*xi))
	im := render(t, st)
	con = contrast(st, im, beam)
	pos = make([]float64, len(con))
	for k := range pos {
		if alongY {
			pos[k] = pixelY(im, k)
		} else {
			pos[k] = pixelX(im, k)
		}
	}
	return pos, con, st.ReadingLines()[0]
}

// The image of a dislocation loop lies outside its projected line for one
// sign of (g·b)s and inside for the other (Groves & Kelly 1961, Phil. Mag.
// 6, 1527; Hirsch et al. 1965, Electron Microscopy of Thin Crystals,
// ch. 11): it is the image-side rule of a straight dislocation
// (TestDislocationImageSide: the image lies along sign((g·b)s) u × z)
// applied all round the loop. With the line sense u right-handed about the
// loop normal n and ρ̂ the outward direction in the loop plane, u = n × ρ̂
// and at the two ends of the projected loop on its tilt axis (ρ̂ ⊥ z)
// u × z = (n·z) ρ̂: the image lies outside when
//
//	(g·b) s (n·z) > 0,
//
// the textbook "outside for (g·b)s > 0 with the line sense clockwise seen
// from the electron source" (for n·z > 0 a right-handed sense about n is
// clockwise seen from above). The other two ends give the same sign:
// there (ρ̂·z)(n·ρ̂_h) adds (n·z)|ρ̂_h|²'s sign.
//
// The nature enters through b relative to n: R jumps by −b crossing the
// disc along n (Burgers' formula with the README's conventions), so a
// vacancy loop (the two sides of the disc close up) has b·n > 0 and an
// interstitial loop b·n < 0. Hence vacancy loops are outside for
// (g·n)(n·z)s > 0: whether a given loop is seen inside or outside depends
// on which way its normal is inclined to the beam as well as on g and s.
// Maher & Eyre (1971, Phil. Mag. 23, 409) showed that ignoring this
// inclination mislabels loops; it is why the cases below include the
// mirror inclination.
//
// Rendered in two-beam bright field at w = +1.5 (s > 0, as the rule is
// used in practice: in a thick foil with absorption the bright-field image
// at s < 0 is too faint, 0.01 of the background, to read) and in the
// kinematical dark field at w = ±2, for a vacancy and an
// interstitial loop of radius 15 nm on (1 0 1) (45° to the beam), on
// (−1 0 1) (the mirror inclination), and the (1 0 1) loop described with
// the opposite normal (the same loop), with g and s each reversed; in
// bright field also given by its nature with b written the other way
// round (the program must choose the sign of b from the nature). The
// image is read where the loop's line is perpendicular to g, at the two
// ends of the projected loop along g (common practice: the size change on
// reversing g is measured along g): the strongest contrast within 7 nm of
// each end must lie outside (or inside) the projected line by at least
// one nanometre (five pixels) as the rule says.
func TestLoopInsideOutside(t *testing.T) {
	const r = 15.0
	type loopDef struct {
		name   string
		normal vec3
		nature string
	}
	var defs []loopDef
	for _, n := range []vec3{{1, 0, 1}, {-1, 0, 1}, {-1, 0, -1}} {
		for _, nature := range []string{"vacancy", "interstitial"} {
			defs = append(defs, loopDef{fmt.Sprintf("%s n=%v", nature, n), n, nature})
		}
	}
	for _, def := range defs {
		b := def.normal.scale(0.5) // b·n > 0: vacancy
		if def.nature == "interstitial" {
			b = b.scale(-1)
		}
		for _, gs := range []float64{1, -1} {
			for _, m := range []struct {
				kin    bool
				w      float64
				nature bool
			}{{false, 1.5, false}, {false, 1.5, true}, {true, 2, false}, {true, -2, false}} {
				ss := math.Copysign(1, m.w)
				c := loopCase{normal: def.normal, b: b, g: vec3{2, 0, 0}.scale(gs), w: m.w, radiusNm: r, kinematical: m.kin}
				if m.nature {
					c.nature = def.nature
				}
				fr := newImageFrame(c.g, vec3{0, 0, 1})
				nz := def.normal.unit().dot(fr.z)
				gb := c.g.dot(b)
				wantOutside := gb*ss*nz > 0
				name := fmt.Sprintf("%s g=%v b=%s w=%+g %s", def.name, c.g, burgersText(b), c.w, map[bool]string{false: "two-beam BF", true: "kinematical DF"}[m.kin])
				if m.nature {
					name += fmt.Sprintf(" (given as nature %s with b = %s)", def.nature, burgersText(b.scale(-1)))
				}
				// Ends of the projected loop along x: the loop plane
				// (±1 0 1) meets y = 0 along [1 0 ∓1], which projects to
				// r/√2 on x.
				for _, along := range []struct {
					y   bool
					rim float64
				}{{false, r / math.Sqrt2}} {
					pos, con, reading := loopProfile(t, c, along.y)
					if want := map[bool]string{true: "outside", false: "inside"}[wantOutside] + " contrast expected"; !strings.Contains(reading, want) || !strings.Contains(reading, def.nature) {
						t.Errorf("%s: the program reads %q; want %s, %s", name, reading, def.nature, want)
					}
					for _, side := range []float64{1, -1} {
						peak := -1
						for k := range pos {
							if d := side*pos[k] - along.rim; math.Abs(d) < 7 && (peak < 0 || math.Abs(con[k]) > math.Abs(con[peak])) {
								peak = k
							}
						}
						outside := side*pos[peak] > along.rim
						if math.Abs(side*pos[peak]-along.rim) < 1 {
							t.Errorf("%s: strongest contrast at %+.1f nm, within 1 nm of the loop's projected line at %+.1f nm: neither inside nor outside", name, pos[peak], side*along.rim)
						}
						axis := map[bool]string{false: "x", true: "y"}[along.y]
						t.Logf("%s: end at %s = %+.1f nm, strongest contrast %+.3f at %+.1f nm (%s)", name, axis, side*along.rim, con[peak], pos[peak], map[bool]string{true: "outside", false: "inside"}[outside])
						if outside != wantOutside {
							t.Errorf("%s: image %s the loop at %s = %+.1f nm (strongest contrast at %+.1f nm); (g·b)s(n·z) = %+g puts it %s",
								name, map[bool]string{true: "outside", false: "inside"}[outside], axis, side*along.rim, pos[peak], gb*ss*nz, map[bool]string{true: "outside", false: "inside"}[wantOutside])
						}
					}
				}
			}
		}
	}
}
