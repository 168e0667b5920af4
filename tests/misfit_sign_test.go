package tests

import (
	"fmt"
	"strings"
	"testing"
)

// lobes renders the row y = 0 through a small defect at depth z0 (nm) in
// a copper foil imaged with g = ±2 0 0 along [0 0 1] at s = 0, 240 pixels
// over 40 nm, and returns the mean contrast (intensity minus the perfect
// crystal's) of the bright and dark field over 1.5–7 nm either side of the
// centre: on the side g points to (plus) and the other (minus). defect is
// the JSON of the defect with %[1]g standing for its depth; thick is the
// foil thickness in units of ξ_g, depth(ξ) the defect's depth.
func lobes(t *testing.T, g vec3, defect string, thick float64, depth func(xi float64) float64) (bfPlus, bfMinus, dfPlus, dfMinus, xi float64, reading string) {
	t.Helper()
	text := `{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": ` + g.json() + `, "beam": [0, 0, 1], "w": 0},
	  "foil": {"thickness_nm": %[2]g},
	  "defects": [` + defect + `],
	  "image": {"width_nm": 40, "height_nm": 0.16666666666666666, "pixels": [240, 1]}}`
	xi = setup(t, fmt.Sprintf(text, 50.0, 100.0)).XiGNm
	st := setup(t, fmt.Sprintf(text, depth(xi), thick*xi))
	im := render(t, st)
	bf, df := contrast(st, im, 0), contrast(st, im, 1)
	var np, nm float64
	for i := range bf {
		x := pixelX(im, i)
		switch {
		case x > 1.5 && x < 7:
			bfPlus += bf[i]
			dfPlus += df[i]
			np++
		case x < -1.5 && x > -7:
			bfMinus += bf[i]
			dfMinus += df[i]
			nm++
		}
	}
	return bfPlus / np, bfMinus / nm, dfPlus / np, dfMinus / nm, xi, st.ReadingLines()[0]
}

// A coherent spherical inclusion close to a foil surface shows a
// black–white pair of lobes along g, whose sense gives the sign of its
// misfit; the sense is the same at both surfaces in dark field and
// reverses between them in bright field (Ashby & Brown 1963, Phil. Mag. 8,
// 1649, "On diffraction contrast from inclusions" — from memory; the
// top/bottom behaviour is that of any thin strained layer, as for the
// fault fringes of Hashimoto, Howie & Whelan 1962).
//
// Which lobe is dark, in the README's conventions (derived here, not
// quoted): to first order in g·R, a thin strained layer at the entrance
// surface adds to φ_g the amplitude −i·q·2π∫g·R dz = (π/ξ_g)·2π∫g·R dz
// (real, while the perfect crystal's own φ_g starts as iπz/ξ_g). In a
// thick absorbing foil at s = 0 only the weakly absorbed Bloch wave, with
// (φ_0, φ_g) ∝ (1, −1), reaches the exit surface, excited with amplitude
// (φ_0 − φ_g)/√2: where ∫g·R dz > 0 it is weakened and both beams are
// darker. For a dilatation (δ > 0, R = ε r radially outward) ∫g·R dz > 0
// on the columns on the side g points to: near the entrance surface the
// +g lobe is dark in bright and dark field alike, and the black-to-white
// vector l points along −g; for δ < 0 the reverse. Near the exit surface
// the dark field keeps that sense and the bright field reverses. (An
// independent RK4 integration of the same equations in numpy, for a 3 nm
// inclusion of ε = 0.01 at 0.13 ξ_g below the entrance surface of a
// 5.5 ξ_g foil, gave −0.076 on the +g side and +0.07 on the −g side in
// both beams.)
//
// Rendered for misfits +0.02 and −0.02, a 3 nm inclusion 0.12 ξ_g below
// the entrance surface or above the exit surface of a 5.5 ξ_g foil, with g
// and −g. Each lobe must differ from the perfect crystal by at least 0.01
// with the sign the rule gives.
func TestInclusionMisfitSignFromLobes(t *testing.T) {
	for _, misfit := range []float64{0.02, -0.02} {
		for _, top := range []bool{true, false} {
			for _, gs := range []float64{1, -1} {
				g := vec3{2, 0, 0}.scale(gs)
				depth := func(xi float64) float64 { return 0.12 * xi }
				if !top {
					depth = func(xi float64) float64 { return 5.5*xi - 0.12*xi }
				}
				defect := fmt.Sprintf(`{"type": "inclusion", "at_nm": [0, 0, %%[1]g], "radius_nm": 3, "misfit": %g}`, misfit)
				bfP, bfM, dfP, dfM, _, reading := lobes(t, g, defect, 5.5, depth)
				where := map[bool]string{true: "near the entrance surface", false: "near the exit surface"}[top]
				name := fmt.Sprintf("misfit %+g %s g=%v", misfit, where, g)
				t.Logf("%s: BF +g side %+.3f, −g side %+.3f; DF +g side %+.3f, −g side %+.3f", name, bfP, bfM, dfP, dfM)
				// Sign of the +g lobe: dark (−1) for δ > 0 in DF at both
				// surfaces and in BF at the entrance surface.
				wantDF := -1.0
				if misfit < 0 {
					wantDF = 1
				}
				wantBF := wantDF
				if !top {
					wantBF = -wantDF
				}
				check := func(beam string, plus, minus, want float64) {
					if plus*want < 0.01 || minus*want > -0.01 {
						t.Errorf("%s: %s lobes %+.3f (+g side) and %+.3f (−g side); the rule makes the +g lobe %s and the other %s",
							name, beam, plus, minus, map[bool]string{true: "bright", false: "dark"}[want > 0], map[bool]string{true: "dark", false: "bright"}[want > 0])
					}
				}
				// The program's reading says the same.
				nature := map[bool]string{true: "(expanding)", false: "(contracting)"}[misfit > 0]
				lobe := map[bool]string{true: "is dark in bright and dark field", false: "is dark in dark field and bright in bright field"}[top]
				if misfit < 0 {
					lobe = map[bool]string{true: "is bright in bright and dark field", false: "is bright in dark field and dark in bright field"}[top]
				}
				if !strings.Contains(reading, nature) || !strings.Contains(reading, lobe) {
					t.Errorf("%s: the program reads %q; want %s and the +g lobe that %s", name, reading, nature, lobe)
				}
				check("bright-field", bfP, bfM, wantBF)
				check("dark-field", dfP, dfM, wantDF)
			}
		}
	}
}
