package scene

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

func warningsOf(t *testing.T, text string) []string {
	t.Helper()
	return mustBuild(t, text).Warnings
}

func scn(crystal, g, beam, dev string, thickness float64, defects string) string {
	return fmt.Sprintf(`{"version": 1, "crystal": {"material": %q}, "microscope": {"voltage_kv": 200},
	  "diffraction": {"g": %s, "beam": %s, %s}, "foil": {"thickness_nm": %g},
	  "defects": [%s], "image": {"width_nm": 100, "height_nm": 100, "pixels": [8, 8]}}`, crystal, g, beam, dev, thickness, defects)
}

func hasWarning(ws []string, part string) bool {
	for _, w := range ws {
		if strings.Contains(w, part) {
			return true
		}
	}
	return false
}

// The transmitted fraction exp(−2πt/ξ'_0) (Hirsch et al. 1965, ch. 4: the
// mean absorption damps both beams by exp(−πz/ξ'_0) in amplitude).
func TestWarningOpaque(t *testing.T) {
	text := scn("Cu", "[2, 0, 0]", "[0, 0, 1]", `"s_per_nm": 0`, 2000, "")
	st := mustBuild(t, text)
	want := fmt.Sprintf("leaves %.1e of the beam", math.Exp(-2*math.Pi*2000/(st.XiGNm/DefaultAbsorptionRatio)))
	if ws := st.Warnings; !hasWarning(ws, "opaque foil") || !hasWarning(ws, want) {
		t.Errorf("2 µm Cu: %q, want %q", ws, want)
	}
	if ws := warningsOf(t, scn("Cu", "[2, 0, 0]", "[0, 0, 1]", `"s_per_nm": 0`, 120, "")); hasWarning(ws, "opaque") {
		t.Errorf("120 nm Cu: %q", ws)
	}
}

func TestWarningUnseenDefects(t *testing.T) {
	far := `{"type": "inclusion", "at_nm": [0, 0, 400], "radius_nm": 10, "misfit": 0.01},
	  {"type": "inclusion", "at_nm": [0, 0, 105], "radius_nm": 10, "misfit": 0.01},
	  {"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, -500]},
	  {"type": "dislocation", "b": "1/2[1 1 0]", "line": [1, -1, 0], "at_nm": [0, 0, -20]},
	  {"type": "loop", "at_nm": [0, 0, -100], "normal": [1, 1, 1], "b": "1/3[1 1 1]", "radius_nm": 10}`
	ws := warningsOf(t, scn("Cu", "[2, 0, 0]", "[0, 0, 1]", `"s_per_nm": 0.01`, 100, far))
	for _, want := range []string{"defects[0]: inclusion centred 300 nm outside", "defects[2]: the dislocation runs parallel to the foil 500 nm outside", "defects[4]: loop centred 100 nm outside"} {
		if !hasWarning(ws, want) {
			t.Errorf("missing %q in %q", want, ws)
		}
	}
	for _, not := range []string{"defects[1]", "defects[3]"} {
		if hasWarning(ws, not) {
			t.Errorf("%s is near enough to show: %q", not, ws)
		}
	}
}

// The edge dislocation along [1 1 −1] of copper with g ∥ u has g·b = 0 and
// g·(b×u) = 0 yet shows in anisotropic elasticity (no mirror plane normal
// to <111>; Hirth & Lothe 1982, ch. 13, from memory; see also
// tests.TestInvisibilityOfEdgeDependsOnAnisotropy); along [1 −1 0] it does
// not, and in isotropic elasticity it never does.
func TestWarningAnisotropicResidual(t *testing.T) {
	edge := func(g, beam, b, line, el string) []string {
		return warningsOf(t, scn("Cu", g, beam, `"w": 0.3`, 100,
			fmt.Sprintf(`{"type": "dislocation", "b": %q, "line": %s, "at_nm": [5, -3, 50], "elasticity": %q}`, b, line, el)))
	}
	if ws := edge("[1, 1, -1]", "[0, 1, 1]", "1/2[1 0 1]", "[1, 1, -1]", "anisotropic"); !hasWarning(ws, "isotropic g·b = 0 invisibility rule does not hold") {
		t.Errorf("anisotropic edge along [1 1 -1]: %q", ws)
	}
	if ws := edge("[1, 1, -1]", "[0, 1, 1]", "1/2[1 0 1]", "[1, 1, -1]", "isotropic"); hasWarning(ws, "residual") {
		t.Errorf("isotropic edge: %q", ws)
	}
	if ws := edge("[2, -2, 0]", "[0, 0, 1]", "1/2[1 1 0]", "[1, -1, 0]", "anisotropic"); hasWarning(ws, "residual") {
		t.Errorf("anisotropic edge along [1 -1 0]: %q", ws)
	}
}
