package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Inclusion is a coherent spherical inclusion of radius r0 whose
// constrained strain is ε (Ashby & Brown 1963, Phil. Mag. 8, 1083):
//
//	R = ε r             (|r| ≤ r0)
//	R = ε r0³ r / |r|³  (|r| > r0)
//
// with r measured from the centre; R is continuous at r0. The matrix and the
// inclusion share isotropic elastic constants; there is no surface term.
type Inclusion struct {
	at      r3.Vec
	r0, eps float64
}

// NewInclusion returns the inclusion centred at at (nm) with radius radiusNm
// and constrained strain (dimensionless, either sign; see StrainFromMisfit).
func NewInclusion(at r3.Vec, radiusNm, strain float64) (*Inclusion, error) {
	if err := checkVec("at_nm", "centre", at, false); err != nil {
		return nil, err
	}
	if err := checkPositive("radius_nm", "inclusion radius", radiusNm); err != nil {
		return nil, err
	}
	if math.IsNaN(strain) || math.IsInf(strain, 0) {
		return nil, inputErr("strain", "strain is not a finite number")
	}
	if math.Abs(strain) >= 1 {
		return nil, inputErr("strain", fmt.Sprintf("strain %g is not small (|ε| must be < 1 for linear elasticity)", strain))
	}
	return &Inclusion{at: at, r0: radiusNm, eps: strain}, nil
}

// R returns the Ashby–Brown displacement at p (nm).
func (c *Inclusion) R(p r3.Vec) r3.Vec {
	r := r3.Sub(p, c.at)
	d2 := r3.Norm2(r)
	if d2 <= c.r0*c.r0 {
		return r3.Scale(c.eps, r)
	}
	d := math.Sqrt(d2)
	return r3.Scale(c.eps*c.r0*c.r0*c.r0/(d2*d), r)
}

// StrainFromMisfit returns the constrained strain of a coherent inclusion
// whose free (unconstrained) lattice misfit is δ, for equal isotropic
// constants of matrix and inclusion (Ashby & Brown 1963; Eshelby 1957):
//
//	ε = δ (1 + ν) / (3 (1 − ν))
//
// It returns NaN for ν outside (−1, 1/2) or a non-finite misfit; callers
// validate the inputs first (scene does).
func StrainFromMisfit(misfit, poisson float64) float64 {
	if math.IsNaN(misfit) || math.IsInf(misfit, 0) || !(poisson > -1 && poisson < 0.5) {
		return math.NaN()
	}
	return misfit * (1 + poisson) / (3 * (1 - poisson))
}
