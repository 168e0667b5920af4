package tests

import (
	"fmt"
	"strings"
	"testing"
)

// Small dislocation loops (a few nm, radiation damage) imaged in dark
// field close to s = 0 show black–white lobes whose sense reverses from
// one depth layer to the next near the entrance surface — layers L1, L2,
// L3 about ξ_g/2 apart — and reverses with the loop's nature (Wilkens &
// Rühle 1972, phys. stat. sol. (b) 49, 749; Eyre, Maher & Perrin 1977,
// J. Phys. F 7, 1359 and 1371 — from memory). The nature follows from the
// sense of the black-to-white vector l once the loop's layer is known
// (from a stereo pair or the depth-oscillation itself).
//
// Which sense, in the README's conventions (derived, and read from the
// renders below): a small loop acts on a column, to first order, through
// ∫g·R dz, which on the +g side is positive for an interstitial loop
// (extra matter, like an inclusion of positive misfit) and negative for a
// vacancy loop — for either inclination of the loop, since inverting the
// loop about its centre, which leaves it unchanged, reverses R and x
// together. At the entrance surface this darkens the +g side where
// ∫g·R dz > 0 (the derivation beside TestInclusionMisfitSignFromLobes);
// deeper down, the phase of the Pendellösung at the loop's depth reverses
// it every ξ_g/2. So, in dark field at s = 0:
//
//	L1 (depth ≲ 0.2 ξ_g), L3 (≈ 0.8–1.1 ξ_g): interstitial: l against g;  vacancy: l along g
//	L2 (≈ 0.35–0.7 ξ_g):                        interstitial: l along g;   vacancy: l against g
//
// Rendered for a 2 nm vacancy and interstitial loop b = ±1/2[1 0 1] on
// (1 0 1) and on (−1 0 1) (the mirror inclination, where g·b changes sign
// but the rule must not), at 0.1, 0.5 and 0.95 ξ_g below the entrance
// surface of a 5.5 ξ_g copper foil, g = 2 0 0. Each lobe must differ from
// the perfect crystal by at least 0.01 with the sign the rule gives.
func TestSmallLoopLobesReverseWithDepthAndNature(t *testing.T) {
	layers := []struct {
		name  string
		depth float64 // in ξ_g
		// alongG is the sense of l for a vacancy loop: true when the
		// white lobe is on the side g points to.
		vacancyAlongG bool
	}{
		{"L1", 0.1, true},
		{"L2", 0.5, false},
		{"L3", 0.95, true},
	}
	for _, n := range []vec3{{1, 0, 1}, {-1, 0, 1}} {
		for _, nature := range []string{"vacancy", "interstitial"} {
			b := n.scale(0.5) // b·n > 0: vacancy (README conventions)
			if nature == "interstitial" {
				b = b.scale(-1)
			}
			for _, l := range layers {
				defect := `{"type": "loop", "at_nm": [0, 0, %[1]g], "normal": ` + n.json() + `, "b": "` + burgersText(b) + `", "radius_nm": 2}`
				_, _, dfP, dfM, _, reading := lobes(t, vec3{2, 0, 0}, defect, 5.5, func(xi float64) float64 { return l.depth * xi })
				name := fmt.Sprintf("%s loop n=%v b=%s in %s (%.2f ξ_g)", nature, n, burgersText(b), l.name, l.depth)
				t.Logf("%s: DF +g side %+.3f, −g side %+.3f", name, dfP, dfM)
				want := 1.0 // sign of the +g lobe: bright when l points along g
				if l.vacancyAlongG != (nature == "vacancy") {
					want = -1
				}
				if w := fmt.Sprintf("(layer %s): in dark field near s = 0, l (black → white) %s g", l.name, map[bool]string{true: "along", false: "against"}[want > 0]); !strings.Contains(reading, w) || !strings.Contains(reading, nature) {
					t.Errorf("%s: the program reads %q; want %s … %s", name, reading, nature, w)
				}
				if dfP*want < 0.01 || dfM*want > -0.01 {
					t.Errorf("%s: dark-field lobes %+.3f (+g side) and %+.3f (−g side); the rule puts l %s g",
						name, dfP, dfM, map[bool]string{true: "along", false: "against"}[want > 0])
				}
			}
		}
	}
}
