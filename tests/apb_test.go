package tests

import (
	"fmt"
	"math"
	"testing"
)

// Antiphase boundaries in an ordered L1₂ alloy (Ni3Al, γ′): the shift
// R = 1/2[1 1 0] is a lattice vector of the fcc parent but not of the
// ordered structure, so g·R is a half-integer for superlattice reflections
// (g = 100: α = π) and an integer for fundamental ones (g = 200): the APB
// shows in a superlattice dark field and vanishes in a fundamental one
// (common practice; Marcinkowski, Brown & Fisher 1961; Hirsch et al. 1965,
// ch. 10 — cited from memory).
func TestAntiphaseBoundaryOnlyInSuperlatticeReflections(t *testing.T) {
	contrast := func(g string) float64 {
		st := setup(t, fmt.Sprintf(`{"version": 1, "crystal": {"material": "Ni3Al"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": %s, "beam": [0, 0, 1], "s_per_nm": 0},
		  "foil": {"thickness_nm": 100},
		  "defects": [{"type": "fault", "plane": [1, 0, 1], "shift": "1/2[1 1 0]", "at_nm": [0, 0, 50]}],
		  "image": {"width_nm": 200, "height_nm": 4, "pixels": [100, 2]}}`, g))
		ref := perfect(st)
		worst := 0.0
		g2 := st.Problem.Grid
		for i := 0; i < g2.NX; i++ {
			worst = math.Max(worst, math.Abs(st.Problem.Column(g2.X(i), 0)[1]-ref[1]))
		}
		return worst
	}
	super, fundamental := contrast("[1, 0, 0]"), contrast("[2, 0, 0]")
	t.Logf("APB dark-field contrast: g = 100: %.3f, g = 200: %.1e", super, fundamental)
	if fundamental > 1e-9 {
		t.Errorf("APB visible in the fundamental reflection 200: %g", fundamental)
	}
	if super < 0.05 {
		t.Errorf("APB not visible in the superlattice reflection 100: %g", super)
	}
}
