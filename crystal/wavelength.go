package crystal

import "math"

// CODATA 2018 values (Tiesinga et al., Rev. Mod. Phys. 93, 025010, 2021);
// h, e and c are exact in the SI since 2019.
const (
	planckJs         = 6.62607015e-34   // h, J s
	elementaryC      = 1.602176634e-19  // e, C
	electronMassKg   = 9.1093837015e-31 // m0, kg
	speedOfLightMps  = 299792458        // c, m/s
	electronRestEnJ  = electronMassKg * speedOfLightMps * speedOfLightMps
	metresPerNm      = 1e-9
	voltsPerKilovolt = 1e3
)

// Wavelength returns the relativistic electron wavelength in nm for an
// accelerating voltage in kV:
//
//	λ = h / sqrt(2 m0 e E (1 + e E / (2 m0 c²)))
//
// (Williams & Carter, Transmission Electron Microscopy, 2009, eq. 1.6).
// It returns NaN for a non-positive voltage.
func Wavelength(kv float64) float64 {
	if !(kv > 0) {
		return math.NaN()
	}
	eE := elementaryC * kv * voltsPerKilovolt
	p := math.Sqrt(2 * electronMassKg * eE * (1 + eE/(2*electronRestEnJ)))
	return planckJs / p / metresPerNm
}

// RelativisticFactor returns γ = 1 + eE/(m0 c²) at an accelerating voltage
// in kV: the ratio of the electron's mass to its rest mass, by which the
// (rest-mass) electron scattering factors are multiplied.
func RelativisticFactor(kv float64) float64 {
	return 1 + elementaryC*kv*voltsPerKilovolt/electronRestEnJ
}
