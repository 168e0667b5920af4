package crystal

import (
	"fmt"
	"math"
)

// FourierCoefficient returns the Fourier coefficient of the crystal
// potential for g = (hkl), in 1/nm², in the form the Howie–Whelan and
// Bloch-wave equations use (U_g = 2 m e V_g / h², m the relativistic mass):
//
//	U_g = F_g / (π V_c)
//
// with F_g = StructureFactor(hkl, kv) and V_c the cell volume, so that
// 1/ξ_g = λ |U_g| / cos θ_B (Hirsch et al., Electron Microscopy of Thin
// Crystals, 1965, ch. 4; Humphreys & Hirsch 1968, Phil. Mag. 18, 115 for the
// absorptive part). Any g is allowed, including (000) (U_0 is proportional
// to the mean inner potential) and forbidden reflections (U_g = 0).
func (c *Crystal) FourierCoefficient(hkl [3]float64, kv float64) (complex128, error) {
	if err := checkKV(kv); err != nil {
		return 0, err
	}
	return c.StructureFactor(hkl, kv) / complex(math.Pi*c.Cell.Volume(), 0), nil
}

// PotentialVolts returns the Fourier coefficient V_g of the electrostatic
// crystal potential in volts, V_g = h² U_g / (2 m e) with m = γ m0: the
// electron's mass cancels, so V_g does not depend on the voltage. V_0 is the
// mean inner potential of the crystal built from neutral atoms.
func (c *Crystal) PotentialVolts(hkl [3]float64) complex128 {
	const kv = 100 // any voltage: γ cancels
	u, _ := c.FourierCoefficient(hkl, kv)
	m := electronMassKg * RelativisticFactor(kv)
	perNm2 := 1 / (metresPerNm * metresPerNm)
	return u * complex(perNm2*planckJs*planckJs/(2*m*elementaryC), 0)
}

// Fourier returns the complex Fourier coefficient of the optical potential
// for g, elastic plus absorptive, in 1/nm²:
//
//	U_g + i U'_g,  U'_g = r U_g,  r = absorptionRatio = ξ_g / ξ'_g
//
// The absorptive part by a constant ratio is the phenomenological model of
// anomalous absorption (Hashimoto, Howie & Whelan 1962; r ≈ 0.1 is common
// practice); it follows the phase of U_g, so for a centrosymmetric crystal
// with the origin at the centre both parts are real.
//
// For g = 0 only the elastic U_0 is returned (its absorptive part is 0).
// The mean absorption is not r U_0: Faultline has one convention for every
// model, the two-beam one, ξ'_0 = ξ'_g of the imaged g (U'_0 = U'_g, so the
// transmitted and diffracted beams are damped alike; Hirsch et al. 1965,
// ch. 4), which only the caller that knows the imaged g can apply (package
// scene does, as Setup.Xi0AbsNm).
func (c *Crystal) Fourier(hkl [3]float64, kv, absorptionRatio float64) (complex128, error) {
	if !(absorptionRatio >= 0) || math.IsInf(absorptionRatio, 0) {
		return 0, fmt.Errorf("absorption ratio %g must be finite and non-negative", absorptionRatio)
	}
	u, err := c.FourierCoefficient(hkl, kv)
	if err != nil {
		return 0, err
	}
	if hkl == [3]float64{} {
		return u, nil
	}
	return u * complex(1, absorptionRatio), nil
}
