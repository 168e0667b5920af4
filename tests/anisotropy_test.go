package tests

import (
	"fmt"
	"math"
	"testing"
)

// An edge dislocation seen with g parallel to its line has g·b = 0 and
// g·(b × u) = 0. In an isotropic medium its displacement lies in the plane
// normal to the line, so g·R = 0 and it is invisible. In an anisotropic
// crystal the same holds where a mirror plane is normal to the line (the
// in-plane and antiplane problems decouple; Hirth & Lothe 1982, ch. 13),
// but along a direction without one, such as <111> of a cubic crystal, the
// edge dislocation also displaces along its line and stays visible: the
// invisibility rule is an isotropic result (Hirth & Lothe ch. 13; from
// memory). Copper, Zener ratio 3.2.
func TestInvisibilityOfEdgeDependsOnAnisotropy(t *testing.T) {
	contrast := func(g, beam, b, line, elasticity string) float64 {
		st := setup(t, fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": %s, "beam": %s, "w": 0.3},
		  "foil": {"thickness_nm": 100},
		  "defects": [{"type": "dislocation", "b": "%s", "line": %s, "at_nm": [0, 0, 50], "elasticity": "%s"}],
		  "image": {"width_nm": 2, "height_nm": 80, "pixels": [4, 160]}}`, g, beam, b, line, elasticity))
		ref := perfect(st)
		worst := 0.0
		gr := st.Problem.Grid
		for j := 0; j < gr.NY; j++ {
			worst = math.Max(worst, math.Abs(st.Problem.Column(0, gr.Y(j))[0]-ref[0]))
		}
		return worst
	}
	// Along <111>: no mirror plane normal to the line.
	iso111 := contrast("[1, 1, -1]", "[0, 1, 1]", "1/2[1 0 1]", "[1, 1, -1]", "isotropic")
	aniso111 := contrast("[1, 1, -1]", "[0, 1, 1]", "1/2[1 0 1]", "[1, 1, -1]", "anisotropic")
	// Along <110>: (1 -1 0) is a mirror plane normal to the line.
	aniso110 := contrast("[2, -2, 0]", "[0, 0, 1]", "1/2[1 1 0]", "[1, -1, 0]", "anisotropic")
	t.Logf("edge with g ∥ u: isotropic [1 1 −1] %.1e, anisotropic [1 1 −1] %.3f, anisotropic [1 −1 0] %.1e", iso111, aniso111, aniso110)
	if iso111 > 1e-9 || aniso110 > 1e-9 {
		t.Errorf("edge with g·b = 0 and g·(b×u) = 0 visible where it must not be: isotropic %g, anisotropic along [1 −1 0] %g", iso111, aniso110)
	}
	if aniso111 < 0.02 {
		t.Errorf("anisotropic edge along [1 1 −1] shows no contrast (%g); its displacement along the line should show", aniso111)
	}
}
