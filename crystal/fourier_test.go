package crystal

import (
	"math"
	"math/cmplx"
	"testing"
)

// TestFourierExtinctionRelation: 1/ξ_g = λ |U_g| / cos θ_B (Hirsch et al.
// 1965, ch. 4) for several materials, reflections and voltages; the
// absorptive part is r U_g.
func TestFourierExtinctionRelation(t *testing.T) {
	for _, n := range []string{"Cu", "Si", "Ti", "Ni3Al"} {
		c, _ := Preset(n)
		for _, g := range [][3]float64{{1, 1, 1}, {2, 0, 0}, {1, 0, 1}, {1, 0, 0}, {2, 2, 0}} {
			if c.Forbidden(g) {
				continue
			}
			for _, kv := range []float64{100, 300} {
				xi, err := c.ExtinctionDistance(g, kv)
				if err != nil {
					t.Fatal(err)
				}
				u, err := c.Fourier(g, kv, 0.1)
				if err != nil {
					t.Fatal(err)
				}
				u0, _ := c.FourierCoefficient(g, kv)
				lam := Wavelength(kv)
				sin := lam / (2 * c.Cell.DSpacing(g))
				if got := lam * cmplx.Abs(u0) / math.Sqrt(1-sin*sin); math.Abs(got*xi-1) > 1e-12 {
					t.Errorf("%s %v %g kV: λ|U_g|/cosθ = %g, 1/ξ_g = %g", n, g, kv, got, 1/xi)
				}
				if cmplx.Abs(u-u0*complex(1, 0.1)) > 1e-15*cmplx.Abs(u0) {
					t.Errorf("%s %v: U + iU' = %v, want %v", n, g, u, u0*complex(1, 0.1))
				}
			}
		}
	}
	cu, _ := Preset("Cu")
	if u, err := cu.Fourier([3]float64{1, 0, 0}, 200, 0.1); err != nil || u != 0 {
		t.Errorf("forbidden 100: U = %v, %v; want 0", u, err)
	}
	for _, r := range []float64{-0.1, math.NaN(), math.Inf(1)} {
		if _, err := cu.Fourier([3]float64{1, 1, 1}, 200, r); err == nil {
			t.Errorf("absorption ratio %g accepted", r)
		}
	}
	if _, err := cu.Fourier([3]float64{1, 1, 1}, 0, 0.1); err == nil {
		t.Error("0 kV accepted")
	}
	// g = 0: the elastic U_0 only; the mean absorption follows the imaged
	// g (the one convention, ξ'_0 = ξ'_g), not r U_0.
	u0, _ := cu.FourierCoefficient([3]float64{}, 200)
	if u, err := cu.Fourier([3]float64{}, 200, 0.1); err != nil || u != u0 || imag(u) != 0 {
		t.Errorf("U(000) = %v, %v; want the elastic %v alone", u, err, u0)
	}
}

// TestPotentialVolts: V_g = (h²/(2π m0 e)) F_g / V_c with the conversion
// constant h²/(2π m0 e) = 2π a0 e = 47.8780 V Å² (Kirkland, Advanced
// Computing in Electron Microscopy, 2010, ch. 5, from memory), F_g here the
// rest-mass structure factor in Å and V_c in Å³. Tolerance 1e-5 relative
// (the constant's printed digits).
func TestPotentialVolts(t *testing.T) {
	for _, n := range []string{"Si", "Cu", "Au"} {
		c, _ := Preset(n)
		for _, g := range [][3]float64{{0, 0, 0}, {1, 1, 1}, {2, 2, 0}} {
			fA := c.StructureFactor(g, 100) / complex(RelativisticFactor(100), 0) * 10 // Å, rest mass
			want := 47.8780 * fA / complex(c.Cell.Volume()*1000, 0)
			got := c.PotentialVolts(g)
			if cmplx.Abs(got-want) > 1e-5*cmplx.Abs(want) {
				t.Errorf("%s %v: V_g = %v V, want %v V", n, g, got, want)
			}
		}
		t.Logf("%s: mean inner potential from neutral atoms V_0 = %.2f V", n, real(c.PotentialVolts([3]float64{})))
	}
}
