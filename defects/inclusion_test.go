package defects

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func TestInclusionAshbyBrown(t *testing.T) {
	at, r0, eps := r3.Vec{X: 1, Y: 2, Z: 30}, 5.0, 0.01
	c, err := NewInclusion(at, r0, eps)
	if err != nil {
		t.Fatal(err)
	}
	dir := r3.Unit(r3.Vec{X: 1, Y: -2, Z: 0.5})
	// Continuity of R at r0.
	in := c.R(r3.Add(at, r3.Scale(r0*(1-1e-12), dir)))
	out := c.R(r3.Add(at, r3.Scale(r0*(1+1e-12), dir)))
	if !vecClose(in, out, 1e-12) || !vecClose(in, r3.Scale(eps*r0, dir), 1e-12) {
		t.Fatalf("R at r0: inside %v outside %v, want ε r0 = %v", in, out, eps*r0)
	}
	// Outside: |R| = ε r0³/r² (Ashby & Brown 1963), checked at 2 r0.
	if got := r3.Norm(c.R(r3.Add(at, r3.Scale(2*r0, dir)))); math.Abs(got-eps*r0/4) > 1e-15 {
		t.Fatalf("|R(2 r0)| = %g, want ε r0/4 = %g", got, eps*r0/4)
	}
	// The outside field is in equilibrium (Navier) in an isotropic matrix.
	cv := isoVoigt(48, 0.34)
	p := r3.Add(at, r3.Scale(1.7*r0, dir))
	if d := divStress(c, cv, p, 1e-3); r3.Norm(d) > 1e-6*48*eps/r0 {
		t.Fatalf("div σ outside = %v", d)
	}
}

// The misfit relation is checked against the traction balance at the
// interface it comes from: an inclusion of free misfit δ, constrained to
// strain ε, carries pressure 3K(ε − δ) (isotropic, same constants); the
// matrix radial stress at r0 is σ_rr = −4με (from the field itself, by
// finite differences). Equal tractions give ε = δ(1+ν)/(3(1−ν)) (Eshelby
// 1957; Ashby & Brown 1963).
func TestStrainFromMisfitTraction(t *testing.T) {
	for _, nu := range []float64{0.2, 0.34, 0.45} {
		mu, delta, r0 := 48.0, 0.02, 4.0
		eps := StrainFromMisfit(delta, nu)
		c, _ := NewInclusion(r3.Vec{}, r0, eps)
		dir := r3.Unit(r3.Vec{X: 1, Y: 1, Z: 1})
		p := r3.Scale(r0*1.0001, dir) // just outside, so FD stays in the matrix
		s := stress(c, isoVoigt(mu, nu), p, 1e-5)
		var srr float64
		for i := range 3 {
			for j := range 3 {
				srr += comp(dir, i) * s[i][j] * comp(dir, j)
			}
		}
		srr *= math.Pow(1.0001, 3) // back to r0 (σ_rr ∝ 1/r³)
		K := 2 * mu * (1 + nu) / (3 * (1 - 2*nu))
		inside := 3 * K * (eps - delta)
		if math.Abs(srr-inside) > 1e-6*mu*delta {
			t.Errorf("ν=%g: matrix σ_rr(r0) = %g GPa, inclusion %g GPa", nu, srr, inside)
		}
	}
	// ν = 1/3: ε = 2δ/3 exactly.
	if got := StrainFromMisfit(0.03, 1.0/3); math.Abs(got-0.02) > 1e-15 {
		t.Errorf("ν = 1/3: ε = %g, want 2δ/3 = 0.02", got)
	}
	if !math.IsNaN(StrainFromMisfit(0.01, 0.5)) {
		t.Errorf("ν = 0.5 accepted")
	}
}

func TestInclusionErrors(t *testing.T) {
	for _, tc := range []struct {
		r, e  float64
		field string
	}{{0, 0.01, "radius_nm"}, {-1, 0.01, "radius_nm"}, {math.NaN(), 0.01, "radius_nm"}, {2, math.Inf(1), "strain"}, {2, 1.5, "strain"}} {
		_, err := NewInclusion(r3.Vec{}, tc.r, tc.e)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("r=%g ε=%g: error %v, want one on %s", tc.r, tc.e, err, tc.field)
		}
	}
}
