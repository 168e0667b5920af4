package tests

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

// The sign conventions of the README's "Conventions" section, each checked
// end to end through a scene as a user writes it. The contrast rules that
// depend on them are checked from rendered images in
// fault_type_test.go, image_side_test.go, weak_beam_peak_test.go,
// loop_nature_test.go, misfit_sign_test.go and small_loop_depth_test.go;
// the checks here pin down each link of the chain on its own so that a
// failure there can be traced.

// fieldOf returns the displacement field of a scene's defects (image
// frame, nm).
func fieldOf(t *testing.T, defects string, g, beam vec3) func(p r3.Vec) r3.Vec {
	t.Helper()
	st := setup(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": `+g.json()+`, "beam": `+beam.json()+`, "s_per_nm": 0.01},
	  "foil": {"thickness_nm": 100}, "defects": [`+defects+`],
	  "image": {"width_nm": 10, "height_nm": 10, "pixels": [1, 1]}}`)
	return st.Problem.Field.R
}

// Burgers vectors by FS/RH (Bilby, Bullough & Smith 1955, Proc. R. Soc. A
// 231, 263): the displacement gains +b going once round the line sense u
// right-handedly. Checked by a numerical Burgers circuit around a mixed
// dislocation written in indices, converted to the image frame by the
// test's own frame.
func TestConventionBurgersSenseFSRH(t *testing.T) {
	g, beam := vec3{2, 0, 0}, vec3{0, 1, 1}
	fr := newImageFrame(g, beam)
	at := r3.Vec{Z: 50}
	R := fieldOf(t, `{"type": "dislocation", "b": "1/2[1 0 1]", "line": [1, -1, 1], "at_nm": [0, 0, 50]}`, g, beam)
	u := fr.in(vec3{1, -1, 1}.unit())
	uv := r3.Vec{X: u[0], Y: u[1], Z: u[2]}
	e1 := r3.Unit(r3.Cross(uv, r3.Vec{X: 1}))
	e2 := r3.Cross(uv, e1) // e1, e2, u right-handed
	// Sum the changes of R along 720 steps of a circle of 3 nm,
	// anticlockwise seen with u pointing at the viewer.
	var sum r3.Vec
	const n = 720
	prev := R(r3.Add(at, r3.Scale(3, e1)))
	for k := 1; k <= n; k++ {
		th := 2 * math.Pi * float64(k) / n
		p := r3.Add(at, r3.Add(r3.Scale(3*math.Cos(th), e1), r3.Scale(3*math.Sin(th), e2)))
		cur := R(p)
		d := r3.Sub(cur, prev)
		// A step across the cut jumps by ∓b; the circuit adds the
		// smooth change only, so drop steps larger than half of |b|.
		if r3.Norm(d) < 0.1 {
			sum = r3.Add(sum, d)
		}
		prev = cur
	}
	a := 0.3615 // Cu lattice parameter (nm), to the 1e-3 nm tolerance below
	b := fr.in(vec3{0.5 * a, 0, 0.5 * a})
	got := vec3{sum.X, sum.Y, sum.Z}
	for i := range b {
		if math.Abs(got[i]-b[i]) > 1e-3 {
			t.Fatalf("∮dR right-handed about u = %v nm, want +b = %v nm (FS/RH)", got, b)
		}
	}
}

// A fault's shift moves the crystal on the side its plane normal points
// to; the other side stays put.
func TestConventionFaultShiftSide(t *testing.T) {
	g, beam := vec3{2, 0, 0}, vec3{0, 1, 1}
	fr := newImageFrame(g, beam)
	R := fieldOf(t, `{"type": "fault", "plane": [1, 1, 1], "shift": "1/3[-1 -1 -1]", "at_nm": [0, 0, 50]}`, g, beam)
	n := fr.in(vec3{1, 1, 1}.unit())
	at := r3.Vec{Z: 50}
	front := R(r3.Add(at, r3.Vec{X: 2 * n[0], Y: 2 * n[1], Z: 2 * n[2]}))
	back := R(r3.Sub(at, r3.Vec{X: 2 * n[0], Y: 2 * n[1], Z: 2 * n[2]}))
	a := 0.3615 // Cu lattice parameter (nm), to the 1e-4 nm tolerance below
	want := fr.in(vec3{-a / 3, -a / 3, -a / 3})
	if math.Abs(front.X-want[0])+math.Abs(front.Y-want[1])+math.Abs(front.Z-want[2]) > 1e-4 || r3.Norm(back) != 0 {
		t.Fatalf("R on the side (1 1 1) points to = %v, other side %v; want %v and 0", front, back, want)
	}
}

// A loop's line sense is right-handed about its normal; with FS/RH, R
// jumps by −b crossing the disc along the normal, so b·n > 0 closes the
// two sides of the disc up (a vacancy loop: R on the normal's side points
// back towards the disc) and b·n < 0 pushes them apart (interstitial).
func TestConventionLoopNature(t *testing.T) {
	g, beam := vec3{2, 0, 0}, vec3{0, 0, 1}
	fr := newImageFrame(g, beam)
	n := fr.in(vec3{1, 0, 1}.unit())
	nv := r3.Vec{X: n[0], Y: n[1], Z: n[2]}
	at := r3.Vec{Z: 50}
	for _, c := range []struct {
		b      string
		vacant bool
	}{{"1/2[1 0 1]", true}, {"1/2[-1 0 -1]", false}} {
		R := fieldOf(t, fmt.Sprintf(`{"type": "loop", "at_nm": [0, 0, 50], "normal": [1, 0, 1], "b": %q, "radius_nm": 5}`, c.b), g, beam)
		above := r3.Dot(R(r3.Add(at, r3.Scale(0.05, nv))), nv)
		below := r3.Dot(R(r3.Sub(at, r3.Scale(0.05, nv))), nv)
		// Vacancy: the side the normal points to moves back (R·n < 0) and
		// the other side forward: the gap closes.
		if closes := above < 0 && below > 0; closes != c.vacant {
			t.Errorf("loop b = %s on (1 0 1): R·n = %+.4f nm just above the disc and %+.4f nm just below; want the %s", c.b, above, below,
				map[bool]string{true: "two sides moving together (vacancy)", false: "two sides moving apart (interstitial)"}[c.vacant])
		}
	}
}

// s > 0 when the reciprocal-lattice point lies inside the Ewald sphere
// (Hirsch et al. 1965, ch. 4; Williams & Carter 2009, ch. 17): the excess
// Kikuchi line then lies beyond the g spot (away from 000), and in the
// weak-beam condition g(3g), with 3g on the sphere, g lies inside it. A
// deviation given either way comes out positive, and with it the image of
// a dislocation lies on the side TestDislocationImageSide gives for s > 0:
// the chain from what the user measures to the picture.
func TestConventionDeviationSign(t *testing.T) {
	for _, diffr := range []string{`"deviation_from_kikuchi": {"offset": 0.2, "spacing": 10}`, `"weak_beam": {"n": 3}`} {
		st := setup(t, `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": [2, 0, 0], "beam": [0, 0, 1], `+diffr+`},
		  "foil": {"thickness_nm": 100}, "defects": [],
		  "image": {"width_nm": 10, "height_nm": 10, "pixels": [1, 1]}}`)
		if !(st.SPerNm > 0) {
			t.Errorf("%s: s = %g, want s > 0", diffr, st.SPerNm)
		}
		c := dislocationCase{b: "1/2[1 0 1]", line: vec3{0, 1, 0}, g: vec3{2, 0, 0}, diffr: `"model": "kinematical", ` + diffr, useDF: true}
		d, con, _ := renderDislocation(t, c)
		peak := 0
		for k := range con {
			if con[k] > con[peak] {
				peak = k
			}
		}
		// g·b = 1 > 0 and s > 0: the image lies along +u × z.
		if d[peak] <= 0 {
			t.Errorf("%s: the image lies at d = %+.2f nm along u × z; with (g·b)s > 0 it belongs on the + side", diffr, d[peak])
		}
	}
}
