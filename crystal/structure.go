package crystal

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/spatial/r3"
)

// angstromPerNm converts scattering factors (Å) to nm and s (1/nm) to 1/Å.
const angstromPerNm = 10

// ErrForbidden is wrapped by errors about kinematically forbidden
// reflections (|F_g| ≈ 0 for the ideal structure).
var ErrForbidden = errors.New("kinematically forbidden reflection")

// forbiddenRel is the |F_g| / Σ|f_j| below which a reflection counts as
// forbidden: far below any real reflection (even superlattice reflections of
// an ordered alloy are a few percent) and far above rounding (1e-15).
const forbiddenRel = 1e-6

// atomTerms returns, for reflection g, Σ_j occ_j f_j(s) e^{−B_j s²} e^{−2πi g·r_j}
// and Σ_j |occ_j f_j(s) e^{−B_j s²}|, both in Å, with s = |g|/2.
func (c *Crystal) atomTerms(hkl [3]float64) (complex128, float64) {
	sNm := r3.Norm(c.Cell.Reciprocal(hkl)) / 2
	sA := sNm / angstromPerNm
	var sum complex128
	var abs float64
	for _, at := range c.Atoms {
		z, err := AtomicNumber(at.Element)
		if err != nil {
			panic("crystal: atom not checked by New: " + err.Error())
		}
		amp := at.Occupancy * peng1996[z].f(sA) * math.Exp(-at.BIsoNm2*sNm*sNm)
		phase := -2 * math.Pi * (hkl[0]*at.XYZ[0] + hkl[1]*at.XYZ[1] + hkl[2]*at.XYZ[2])
		sum += complex(amp, 0) * cmplx.Exp(complex(0, phase))
		abs += amp
	}
	return sum, abs
}

// StructureFactor returns the electron structure factor of g = (hkl) in nm,
//
//	F_g = γ Σ_j occ_j f_j(s) exp(−B_j s²) exp(−2πi g·r_j),  s = |g|/2,
//
// over every atom of the cell, with f_j from ScatteringFactor (converted
// from Å to nm), the Debye–Waller factor B_j = 8π²⟨u_j²⟩ and
// γ = RelativisticFactor(kv) (Hirsch, Howie, Nicholson, Pashley & Whelan,
// Electron Microscopy of Thin Crystals, 1965, ch. 4 and appendix).
//
// Sums that cancel to rounding level (|F| < 1e-12 Σ|f_j|) are returned as
// exactly 0, so forbidden reflections read as zero.
func (c *Crystal) StructureFactor(hkl [3]float64, kv float64) complex128 {
	sum, abs := c.atomTerms(hkl)
	if cmplx.Abs(sum) < 1e-12*abs {
		return 0
	}
	return complex(RelativisticFactor(kv)/angstromPerNm, 0) * sum
}

// Forbidden reports whether g is kinematically forbidden: |F_g| below 1e-6
// of Σ_j |f_j| (the value all atoms would give scattering in phase). (000)
// is never forbidden.
func (c *Crystal) Forbidden(hkl [3]float64) bool {
	if hkl == [3]float64{} {
		return false
	}
	sum, abs := c.atomTerms(hkl)
	return cmplx.Abs(sum) < forbiddenRel*abs
}

func checkKV(kv float64) error {
	if !(kv > 0) || math.IsInf(kv, 0) {
		return fmt.Errorf("accelerating voltage %g kV must be positive and finite", kv)
	}
	return nil
}

// braggCos returns cos θ_B for g at wavelength λ (sin θ_B = λ |g| / 2).
func (c *Crystal) braggCos(hkl [3]float64, lambda float64) (float64, error) {
	sin := lambda * r3.Norm(c.Cell.Reciprocal(hkl)) / 2
	if sin >= 1 {
		return 0, fmt.Errorf("reflection %s cannot be reached at λ = %.4g nm (d = %.4g nm < λ/2)", c.Cell.FormatPlane(hkl), lambda, c.Cell.DSpacing(hkl))
	}
	return math.Sqrt(1 - sin*sin), nil
}

// ExtinctionDistance returns the two-beam extinction distance of g in nm,
//
//	ξ_g = π V_c cos θ_B / (λ |F_g|)
//
// (Hirsch et al., Electron Microscopy of Thin Crystals, 1965, eq. 4.2), V_c
// the cell volume, λ = Wavelength(kv), sin θ_B = λ/(2d). A forbidden g gives
// an error wrapping ErrForbidden; (000) and unreachable g are errors too.
func (c *Crystal) ExtinctionDistance(hkl [3]float64, kv float64) (float64, error) {
	if err := checkKV(kv); err != nil {
		return 0, err
	}
	if hkl == [3]float64{} {
		return 0, fmt.Errorf("g = (0 0 0) is the transmitted beam, it has no extinction distance")
	}
	if c.Forbidden(hkl) {
		return 0, fmt.Errorf("%s of %s: %w (|F_g| = 0 for this structure); give the extinction distance explicitly to image it anyway", c.Cell.FormatPlane(hkl), c.Name, ErrForbidden)
	}
	lambda := Wavelength(kv)
	cos, err := c.braggCos(hkl, lambda)
	if err != nil {
		return 0, err
	}
	return math.Pi * c.Cell.Volume() * cos / (lambda * cmplx.Abs(c.StructureFactor(hkl, kv))), nil
}
