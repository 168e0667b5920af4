package crystal

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"
)

// TestExtinctionHirschTable compares ξ_g at 100 kV with the classic
// tabulation of Hirsch, Howie, Nicholson, Pashley & Whelan, Electron
// Microscopy of Thin Crystals (1965), all values from memory. Those tables
// were computed with the older (pre-1968) electron scattering factors and
// no Debye–Waller factor, so agreement is expected to a few percent, not
// better: tolerance 15 %.
//
// For Cu and Au two memories of the table disagree: 24/28 nm (Cu 111/200)
// and 16/18 nm (Au 111/200) on one hand, 28.6/32.5 and 18.3/20.2 nm as the
// table is reprinted in Williams & Carter, Transmission Electron Microscopy
// (2009), Table 13.1, on the other. The first set lies 20–25 % below what
// the International Tables factors give (checked against gemmi in
// TestExtinctionMatchesGemmi); the second is used here.
func TestExtinctionHirschTable(t *testing.T) {
	for _, tc := range []struct {
		material string
		g        [3]float64
		xiNm     float64
	}{
		{"Al", [3]float64{1, 1, 1}, 56},   // Hirsch et al. 1965, from memory
		{"Al", [3]float64{2, 0, 0}, 68},   // Hirsch et al. 1965, from memory
		{"Cu", [3]float64{1, 1, 1}, 28.6}, // Williams & Carter 2009 Table 13.1, from memory
		{"Cu", [3]float64{2, 0, 0}, 32.5}, // Williams & Carter 2009 Table 13.1, from memory
		{"Au", [3]float64{1, 1, 1}, 18.3}, // Williams & Carter 2009 Table 13.1, from memory
		{"Au", [3]float64{2, 0, 0}, 20.2}, // Williams & Carter 2009 Table 13.1, from memory
		{"Fe", [3]float64{1, 1, 0}, 27},   // Hirsch et al. 1965, from memory
		{"Si", [3]float64{1, 1, 1}, 60},   // Hirsch et al. 1965, from memory
		{"Si", [3]float64{2, 2, 0}, 76},   // Hirsch et al. 1965, from memory
	} {
		c, err := Preset(tc.material)
		if err != nil {
			t.Fatal(err)
		}
		xi, err := c.ExtinctionDistance(tc.g, 100)
		if err != nil {
			t.Fatalf("%s %v: %v", tc.material, tc.g, err)
		}
		if rel := math.Abs(xi-tc.xiNm) / tc.xiNm; rel > 0.15 {
			t.Errorf("%s %v at 100 kV: ξ_g = %.1f nm, table %.1f nm (%.0f %% off, tolerance 15 %%)", tc.material, tc.g, xi, tc.xiNm, 100*rel)
		}
	}
}

// TestForbiddenRefused checks the extinction rules of the structures
// (International Tables Vol. A, reflection conditions): fcc needs h, k, l
// unmixed; bcc h+k+l even; diamond additionally h+k+l ≠ 4n+2 when all even.
func TestForbiddenRefused(t *testing.T) {
	for _, tc := range []struct {
		material  string
		g         [3]float64
		forbidden bool
	}{
		{"Cu", [3]float64{1, 0, 0}, true},
		{"Cu", [3]float64{1, 1, 0}, true},
		{"Cu", [3]float64{2, 1, 0}, true},
		{"Cu", [3]float64{1, 1, 1}, false},
		{"Cu", [3]float64{2, 0, 0}, false},
		{"Al", [3]float64{1, 1, 0}, true},
		{"Fe", [3]float64{1, 0, 0}, true},
		{"Fe", [3]float64{1, 1, 1}, true},
		{"Fe", [3]float64{2, 0, 0}, false},
		{"W", [3]float64{2, 1, 0}, true},
		{"Si", [3]float64{2, 0, 0}, true},
		{"Si", [3]float64{2, 2, 2}, true},
		{"Si", [3]float64{1, 1, 0}, true},
		{"Si", [3]float64{4, 0, 0}, false},
		{"Si", [3]float64{3, 1, 1}, false},
	} {
		c, err := Preset(tc.material)
		if err != nil {
			t.Fatal(err)
		}
		if got := c.Forbidden(tc.g); got != tc.forbidden {
			t.Errorf("%s %v: Forbidden = %v, want %v", tc.material, tc.g, got, tc.forbidden)
		}
		_, err = c.ExtinctionDistance(tc.g, 200)
		if tc.forbidden != errors.Is(err, ErrForbidden) {
			t.Errorf("%s %v: ExtinctionDistance error %v, want ErrForbidden = %v", tc.material, tc.g, err, tc.forbidden)
		}
	}
}

func TestExtinctionBadInput(t *testing.T) {
	cu, _ := Preset("Cu")
	for _, tc := range []struct {
		g  [3]float64
		kv float64
	}{
		{[3]float64{1, 1, 1}, 0},
		{[3]float64{1, 1, 1}, -100},
		{[3]float64{1, 1, 1}, math.NaN()},
		{[3]float64{0, 0, 0}, 200},
		{[3]float64{400, 0, 0}, 1}, // d = 0.9 pm < λ/2 at 1 kV: unreachable
	} {
		if xi, err := cu.ExtinctionDistance(tc.g, tc.kv); err == nil {
			t.Errorf("ExtinctionDistance(%v, %g) = %g, want an error", tc.g, tc.kv, xi)
		}
	}
}

// TestStructureFactorFCC checks F_g against the closed form for an fcc
// crystal of one element: F = 4 γ f(s) e^{−Bs²} for unmixed hkl
// (Hirsch et al. 1965, ch. 4), with f from the table directly.
func TestStructureFactorFCC(t *testing.T) {
	ni, _ := Preset("Ni")
	for _, g := range [][3]float64{{1, 1, 1}, {2, 0, 0}, {2, 2, 0}, {3, 1, 1}, {4, 2, 0}} {
		sNm := 0.5 / ni.Cell.DSpacing(g)
		f, err := ScatteringFactor("Ni", sNm/10)
		if err != nil {
			t.Fatal(err)
		}
		want := 4 * RelativisticFactor(300) * f / 10 * math.Exp(-ni.Atoms[0].BIsoNm2*sNm*sNm)
		got := ni.StructureFactor(g, 300)
		if cmplx.Abs(got-complex(want, 0)) > 1e-12*want {
			t.Errorf("Ni %v: F = %v nm, closed form %g nm", g, got, want)
		}
	}
}
