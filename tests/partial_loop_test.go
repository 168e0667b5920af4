package tests

import (
	"fmt"
	"math"
	"testing"
)

// lineContrast returns the largest |BF − BF_perfect| along the row
// through the image centre, and the integral of |BF − BF_perfect| along
// it (nm), which also counts the width of the image.
func lineContrast(t *testing.T, text string) (peak, integral float64) {
	st := setup(t, text)
	ref := perfect(st)
	g := st.Problem.Grid
	dx := g.WidthNm / float64(g.NX)
	for i := 0; i < g.NX; i++ {
		d := math.Abs(st.Problem.Column(g.X(i), 0)[0] - ref[0])
		peak = math.Max(peak, d)
		integral += d * dx
	}
	return peak, integral
}

// The visibility rule for Shockley partials (Silcock & Tunstall 1964, Phil.
// Mag. 10, 361; Hirsch et al. 1965, ch. 11 — cited from memory): a partial
// 1/6<112> is visible for g·b = ±2/3, invisible for g·b = 0, and invisible
// or weak for g·b = ±1/3 at small w. A screw partial 1/6[1 1 −2] along
// [1 1 −2] through a copper foil, at w = 0.2; the partial's own strain
// field, its fault cut placed where columns do not cross it. With this
// isolated partial the ±1/3 image is not absent but about a third of the
// ±2/3 one (the full rule concerns partials bounding their faults).
func TestShockleyPartialVisibility(t *testing.T) {
	contrast := func(g, beam string) float64 {
		peak, integral := lineContrast(t, fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": %s, "beam": %s, "w": 0.2},
		  "foil": {"thickness_nm": 150},
		  "defects": [{"type": "dislocation", "b": "1/6[1 1 -2]", "line": [1, 1, -2], "at_nm": [0, 0, 75], "elasticity": "isotropic"}],
		  "image": {"width_nm": 80, "height_nm": 10, "pixels": [160, 20]}}`, g, beam))
		t.Logf("g = %s: peak contrast %.3f, integrated contrast %.2f nm", g, peak, integral)
		return integral
	}
	// All g of the {220} family, so ξ_g, w and t/ξ_g are the same.
	c23 := contrast("[2, 2, 0]", "[0, 0, 1]")    // g·b = 2/3
	c23n := contrast("[-2, -2, 0]", "[0, 0, 1]") // g·b = −2/3
	c13 := contrast("[0, -2, -2]", "[1, 0, 0]")  // g·b = 1/3
	c13n := contrast("[2, 0, 2]", "[0, 1, 0]")   // g·b = −1/3
	c0 := contrast("[2, -2, 0]", "[0, 0, 1]")    // g·b = 0
	// The integrated contrast ∫|ΔI| dx measures how much of a line image
	// there is: for a partial of g·b = 1/3 the image is narrow and faint.
	if c0 > 1e-9 {
		t.Errorf("g·b = 0 screw partial visible: %g", c0)
	}
	if c23 < 5 || c23n < 5 {
		t.Errorf("g·b = ±2/3 partial not clearly visible: %g, %g", c23, c23n)
	}
	if c13 > c23/2 || c13n > c23/2 {
		t.Errorf("g·b = ±1/3 partial (%g, %g) not weak beside g·b = 2/3 (%g)", c13, c13n, c23)
	}
}

// Inside–outside contrast of dislocation loops (common practice, e.g.
// Hirsch et al. 1965, ch. 11; Jenkins & Kirk 2001, Characterisation of
// Radiation Damage by TEM): the image of a loop lies inside or outside its
// true projection according to the sign of (g·b)s, so reversing g at the
// same s changes the size of the image. A prismatic loop 1/2[1 1 0] on
// (110), radius 15 nm, at s = +0.02 /nm.
func TestLoopImageSizeChangesWithSignOfG(t *testing.T) {
	width := func(g string) float64 {
		st := setup(t, fmt.Sprintf(`{"version": 1, "crystal": {"material": "Cu"}, "microscope": {"voltage_kv": 200},
		  "diffraction": {"g": %s, "beam": [0, 1, 1], "s_per_nm": 0.02},
		  "foil": {"thickness_nm": 120},
		  "defects": [{"type": "loop", "at_nm": [0, 0, 60], "normal": [1, 1, 0], "b": "1/2[1 1 0]", "radius_nm": 15}],
		  "image": {"width_nm": 80, "height_nm": 2, "pixels": [320, 8]}}`, g))
		ref := perfect(st)
		g2 := st.Problem.Grid
		// The extent of the dark-field image along g: the distance between
		// the outermost columns whose dark field exceeds the perfect
		// crystal's by a tenth of the peak excess.
		df := make([]float64, g2.NX)
		peak := 0.0
		for i := range df {
			df[i] = st.Problem.Column(g2.X(i), 0)[1] - ref[1]
			peak = math.Max(peak, df[i])
		}
		lo, hi := -1, -1
		for i, v := range df {
			if v > peak/10 {
				if lo < 0 {
					lo = i
				}
				hi = i
			}
		}
		return g2.X(hi) - g2.X(lo)
	}
	plus, minus := width("[2, 0, 0]"), width("[-2, 0, 0]")
	t.Logf("dark-field image extent along g: g = 200: %.1f nm, g = −200: %.1f nm (loop diameter 30 nm)", plus, minus)
	if math.Abs(plus-minus) < 0.1*math.Max(plus, minus) {
		t.Errorf("image size does not change with the sign of g: %g vs %g nm", plus, minus)
	}
}
