package crystal

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Elastic holds a crystal's elastic constants.
//
// With Full, C is the 6×6 Voigt stiffness in GPa in the crystal Cartesian
// frame (index order xx, yy, zz, yz, xz, xy), and ShearGPa, Poisson hold its
// Voigt average. Without Full the medium is isotropic, described by ShearGPa
// and Poisson alone; C then holds the matching isotropic stiffness for
// convenience.
type Elastic struct {
	C                 [6][6]float64
	Full              bool
	ShearGPa, Poisson float64
}

// CubicElastic returns the stiffness of a cubic crystal from C11, C12, C44
// (GPa), cube axes along x, y, z.
func CubicElastic(c11, c12, c44 float64) (Elastic, error) {
	var e Elastic
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			e.C[i][j] = c12
		}
		e.C[i][i] = c11
		e.C[i+3][i+3] = c44
	}
	return e.complete("cubic")
}

// HexagonalElastic returns the stiffness of a hexagonal crystal from C11,
// C12, C13, C33, C44 (GPa), c along z; C66 = (C11 − C12)/2 (transverse
// isotropy, Nye, Physical Properties of Crystals, 1957, ch. VIII).
func HexagonalElastic(c11, c12, c13, c33, c44 float64) (Elastic, error) {
	var e Elastic
	e.C[0][0], e.C[1][1], e.C[2][2] = c11, c11, c33
	e.C[0][1], e.C[1][0] = c12, c12
	e.C[0][2], e.C[2][0], e.C[1][2], e.C[2][1] = c13, c13, c13, c13
	e.C[3][3], e.C[4][4] = c44, c44
	e.C[5][5] = (c11 - c12) / 2
	return e.complete("hexagonal")
}

// FullElastic returns the stiffness from a full 6×6 Voigt matrix (GPa).
func FullElastic(c [6][6]float64) (Elastic, error) {
	return Elastic{C: c}.complete("general")
}

func (e Elastic) complete(kind string) (Elastic, error) {
	e.Full = true
	e.ShearGPa, e.Poisson = voigtAverage(e.C)
	if err := e.Validate(); err != nil {
		return Elastic{}, fmt.Errorf("%s elastic constants: %w", kind, err)
	}
	return e, nil
}

// IsotropicElastic returns an isotropic medium with shear modulus μ (GPa)
// and Poisson's ratio ν; C is filled with λ + 2μ, λ, μ, λ = 2μν/(1 − 2ν).
func IsotropicElastic(shearGPa, poisson float64) (Elastic, error) {
	e := Elastic{ShearGPa: shearGPa, Poisson: poisson}
	if err := e.Validate(); err != nil {
		return Elastic{}, err
	}
	lam := 2 * shearGPa * poisson / (1 - 2*poisson)
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			e.C[i][j] = lam
		}
		e.C[i][i] = lam + 2*shearGPa
		e.C[i+3][i+3] = shearGPa
	}
	return e, nil
}

// voigtAverage returns the Voigt (1928) averages
//
//	G_V = (C11 + C22 + C33 − C12 − C13 − C23 + 3(C44 + C55 + C66)) / 15
//	K_V = (C11 + C22 + C33 + 2(C12 + C13 + C23)) / 9
//	ν   = (3K − 2G) / (2(3K + G))
//
// (Hirth & Lothe, Theory of Dislocations, 1982, ch. 13).
func voigtAverage(c [6][6]float64) (shear, poisson float64) {
	g := (c[0][0] + c[1][1] + c[2][2] - c[0][1] - c[0][2] - c[1][2] + 3*(c[3][3]+c[4][4]+c[5][5])) / 15
	k := (c[0][0] + c[1][1] + c[2][2] + 2*(c[0][1]+c[0][2]+c[1][2])) / 9
	return g, (3*k - 2*g) / (2 * (3*k + g))
}

// MaxStiffnessGPa bounds every elastic constant: diamond, the stiffest
// crystal, has C11 ≈ 1080 GPa (from memory); 2000 GPa leaves room while
// keeping every sum of the elastic solutions far from overflow.
const MaxStiffnessGPa = 2000

// Validate checks that the constants describe a stable elastic medium: for
// Full, C within ±MaxStiffnessGPa, symmetric (to 1e-9 relative) and
// positive definite (the strain energy ½ εᵀCε > 0 for every strain, Born
// stability); otherwise 0 < μ ≤ MaxStiffnessGPa and −1 < ν < ½.

func (e Elastic) Validate() error {
	if !e.Full {
		if !(e.ShearGPa > 0 && e.ShearGPa <= MaxStiffnessGPa) {
			return fmt.Errorf("shear modulus %g GPa must be positive and at most %g GPa", e.ShearGPa, float64(MaxStiffnessGPa))
		}
		if !(e.Poisson > -1 && e.Poisson < 0.5) {
			return fmt.Errorf("Poisson ratio %g must lie in (−1, 0.5)", e.Poisson)
		}
		return nil
	}
	scale := 0.0
	for i := range e.C {
		for j := range e.C[i] {
			if !(math.Abs(e.C[i][j]) <= MaxStiffnessGPa) {
				return fmt.Errorf("C%d%d = %g GPa: must be finite and within ±%g GPa", i+1, j+1, e.C[i][j], float64(MaxStiffnessGPa))
			}
			scale = math.Max(scale, math.Abs(e.C[i][j]))
		}
	}
	for i := range e.C {
		for j := i + 1; j < 6; j++ {
			if math.Abs(e.C[i][j]-e.C[j][i]) > 1e-9*scale {
				return fmt.Errorf("stiffness not symmetric: C%d%d = %g but C%d%d = %g", i+1, j+1, e.C[i][j], j+1, i+1, e.C[j][i])
			}
		}
	}
	s := mat.NewSymDense(6, nil)
	for i := 0; i < 6; i++ {
		for j := i; j < 6; j++ {
			s.SetSym(i, j, e.C[i][j])
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(s, false) {
		return fmt.Errorf("stiffness eigen-decomposition failed")
	}
	vals := eig.Values(nil)
	if min := vals[0]; !(min > 1e-9*scale) {
		return fmt.Errorf("stiffness is not positive definite (smallest eigenvalue %.4g GPa): the medium would be unstable; check C11 > |C12|, C44 > 0 and the other Born conditions", min)
	}
	return nil
}
