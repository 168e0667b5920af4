package defects

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// SeparationFromSFE returns the equilibrium width (nm) of a dislocation
// dissociated into parallel partials b1 and b2 (nm) along line, for the
// stacking-fault energy sfeMJm2 (mJ/m²): the separation at which the glide
// force between the partials balances the fault's tension γ.
//
// The glide force per length between two parallel straight dislocations at
// separation d, along the separation, is F = b2ᵀ K b1 / (2π d), K the
// energy-factor matrix of the line direction (Stroh 1958; Hirth & Lothe
// 1982, ch. 13: K = −2i B Bᵀ; Ting 1996 calls it L), so
//
//	d = b2ᵀ K b1 / (2π γ).
//
// Isotropic K gives Hirth & Lothe's (1982, ch. 10) result for partials,
// d = μ/(2πγ) [(b1·u)(b2·u) + (b1×u)·(b2×u)/(1−ν)], which for partials of
// length b_p at ±30° to b is the familiar
// d = μ b_p² (2−ν)/(8πγ(1−ν)) (1 − 2ν cos 2β/(2−ν)), β the angle between b
// and the line. With anisotropic set, K comes from the Stroh solution for
// m.C (which must be set).
func SeparationFromSFE(b1, b2, line r3.Vec, m Medium, sfeMJm2 float64, anisotropic bool) (float64, error) {
	if err := checkPositive("sfe_mj_m2", "stacking-fault energy", sfeMJm2); err != nil {
		return 0, err
	}
	k, err := energyFactor(b1, b2, line, m, anisotropic)
	if err != nil {
		return 0, err
	}
	if !(k > 0) {
		return 0, inputErr("partials", fmt.Sprintf("partials %v and %v attract (b2·K·b1 = %.3g GPa nm²): no equilibrium separation", b1, b2, k))
	}
	// GPa·nm² / (mJ/m²) = 1e-9 N / 1e-3 N/m = 1e-6 m = 1000 nm.
	return 1000 * k / (2 * math.Pi * sfeMJm2), nil
}

// energyFactor returns b2ᵀ K b1 (GPa nm² for b in nm) for the line
// direction line.
func energyFactor(b1, b2, line r3.Vec, m Medium, anisotropic bool) (float64, error) {
	for _, v := range []struct {
		name string
		v    r3.Vec
	}{{"partials[0]", b1}, {"partials[1]", b2}} {
		if err := checkVec(v.name, "partial Burgers vector", v.v, true); err != nil {
			return 0, err
		}
	}
	if err := checkVec("line", "line direction", line, true); err != nil {
		return 0, err
	}
	if err := m.checkIsotropic(); err != nil {
		return 0, err
	}
	u := r3.Unit(line)
	ex := perpendicularUnit(u, r3.Vec{Z: 1}, r3.Vec{X: 1})
	ey := r3.Cross(u, ex)
	var k [3][3]float64
	if anisotropic {
		if err := checkStiffness(m.C); err != nil {
			return 0, err
		}
		s, err := newStrohField(*m.C, m.Stroh, ex, ey, u, r3.Vec{})
		if err != nil {
			return 0, err
		}
		k = s.energy
	} else {
		k = newIsoEdgeScrew(r3.Vec{}, m.Poisson, m.ShearGPa).energyFactor()
	}
	l1 := [3]float64{r3.Dot(b1, ex), r3.Dot(b1, ey), r3.Dot(b1, u)}
	l2 := [3]float64{r3.Dot(b2, ex), r3.Dot(b2, ey), r3.Dot(b2, u)}
	var e float64
	for i := range 3 {
		for j := range 3 {
			e += l2[i] * k[i][j] * l1[j]
		}
	}
	return e, nil
}
