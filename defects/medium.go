package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Medium is the elastic description of the crystal in the image frame.
// ShearGPa and Poisson are the isotropic constants (always needed: the
// isotropic fields use ν, stacking-fault separations use μ). C, when not
// nil, is the full Voigt stiffness (order 11, 22, 33, 23, 13, 12) in GPa,
// already rotated into the image frame (see RotateStiffness).
type Medium struct {
	ShearGPa, Poisson float64
	C                 *[6][6]float64
	// Stroh, when not nil, keeps the Stroh eigen-solutions of this
	// medium for reuse (see StrohCache).
	Stroh *StrohCache
}

// checkIsotropic validates the isotropic constants: μ > 0 and
// −1 < ν < 1/2 (the range in which the isotropic strain energy is positive
// definite).
func (m Medium) checkIsotropic() error {
	if math.IsNaN(m.ShearGPa) || math.IsInf(m.ShearGPa, 0) || m.ShearGPa <= 0 {
		return inputErr("shear_gpa", fmt.Sprintf("shear modulus %g GPa must be finite and > 0", m.ShearGPa))
	}
	if math.IsNaN(m.Poisson) || !(m.Poisson > -1 && m.Poisson < 0.5) {
		return inputErr("poisson", fmt.Sprintf("Poisson's ratio %g must lie in (-1, 0.5)", m.Poisson))
	}
	return nil
}

// checkStiffness validates a Voigt stiffness: finite, symmetric to 1e-6 of
// its largest entry, and positive definite (Cholesky factorisation), the
// condition for a positive strain energy.
func checkStiffness(c *[6][6]float64) error {
	if c == nil {
		return inputErr("elastic", "anisotropic elasticity needs the full stiffness matrix C, and none is given")
	}
	big := 0.0
	for i := range 6 {
		for j := range 6 {
			v := c[i][j]
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return inputErr("elastic", fmt.Sprintf("C%d%d is not finite", i+1, j+1))
			}
			big = math.Max(big, math.Abs(v))
		}
	}
	for i := range 6 {
		for j := i + 1; j < 6; j++ {
			if math.Abs(c[i][j]-c[j][i]) > 1e-6*big {
				return inputErr("elastic", fmt.Sprintf("stiffness is not symmetric: C%d%d = %g but C%d%d = %g", i+1, j+1, c[i][j], j+1, i+1, c[j][i]))
			}
		}
	}
	s := mat.NewSymDense(6, nil)
	for i := range 6 {
		for j := i; j < 6; j++ {
			s.SetSym(i, j, 0.5*(c[i][j]+c[j][i]))
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(s) {
		return inputErr("elastic", "stiffness matrix is not positive definite (the strain energy would not be positive)")
	}
	return nil
}

// RotateStiffness returns the Voigt stiffness (GPa, order 11, 22, 33, 23,
// 13, 12) in the frame in which vectors are v' = rot·v, rot an orthogonal
// matrix. It uses Bond's 6×6 stress transformation matrix (Bond 1943; Ting,
// Anisotropic Elasticity 1996, §2.8): with Voigt index I ↔ pair (i, j) and
// J ↔ (k, l),
//
//	M_IJ = a_ik a_jl + a_il a_jk   (k ≠ l),   M_IJ = a_ik a_jk   (k = l),
//	C' = M C Mᵀ,
//
// which equals the tensor rule C'_ijkl = a_ip a_jq a_kr a_ls C_pqrs.
func RotateStiffness(c [6][6]float64, rot [3][3]float64) [6][6]float64 {
	m := bondMatrix(rot)
	cm := mat.NewDense(6, 6, nil)
	for i := range 6 {
		for j := range 6 {
			cm.Set(i, j, c[i][j])
		}
	}
	var t, out mat.Dense
	t.Mul(m, cm)
	out.Mul(&t, m.T())
	var r [6][6]float64
	for i := range 6 {
		for j := range 6 {
			r[i][j] = out.At(i, j)
		}
	}
	return r
}

// bondMatrix is Bond's stress transformation matrix for v' = a·v, Voigt
// order (11, 22, 33, 23, 13, 12).
func bondMatrix(a [3][3]float64) *mat.Dense {
	// Voigt pair of each index 0..5.
	pair := [6][2]int{{0, 0}, {1, 1}, {2, 2}, {1, 2}, {0, 2}, {0, 1}}
	m := mat.NewDense(6, 6, nil)
	for I := range 6 {
		i, j := pair[I][0], pair[I][1]
		for J := range 6 {
			k, l := pair[J][0], pair[J][1]
			v := a[i][k] * a[j][l]
			if k != l {
				v += a[i][l] * a[j][k]
			}
			m.Set(I, J, v)
		}
	}
	return m
}
