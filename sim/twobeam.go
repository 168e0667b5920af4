package sim

import (
	"fmt"
	"math"
	"math/cmplx"
)

// TwoBeam is the two-beam dynamical model: the Howie–Whelan equations with
// anomalous absorption (Howie & Whelan 1961; Hirsch et al. 1965, ch. 8).
type TwoBeam struct {
	SPerNm float64 // excitation error s of g, 1/nm
	XiGNm  float64 // extinction distance ξ_g, nm
	// XiGAbsNm is the absorption length ξ'_g of the coupling (ξ_g divided by
	// the absorption ratio); +Inf or 0 means no anomalous absorption.
	XiGAbsNm float64
	// Xi0AbsNm is the mean absorption length ξ'_0; +Inf or 0 means none.
	Xi0AbsNm float64
}

// Name implements Model.
func (m TwoBeam) Name() string { return "two-beam" }

// Beams implements Model: the transmitted beam and g.
func (m TwoBeam) Beams() []int { return []int{0, 1} }

// Validate implements Model.
func (m TwoBeam) Validate() error {
	if !(m.XiGNm > 0) || math.IsInf(m.XiGNm, 0) {
		return fmt.Errorf("extinction distance %g nm: must be positive and finite", m.XiGNm)
	}
	if math.IsNaN(m.SPerNm) || math.IsInf(m.SPerNm, 0) {
		return fmt.Errorf("excitation error %g /nm: must be finite", m.SPerNm)
	}
	if m.XiGAbsNm < 0 || math.IsNaN(m.XiGAbsNm) {
		return fmt.Errorf("absorption length ξ'_g %g nm: must be positive", m.XiGAbsNm)
	}
	if m.Xi0AbsNm < 0 || math.IsNaN(m.Xi0AbsNm) {
		return fmt.Errorf("mean absorption length ξ'_0 %g nm: must be positive", m.Xi0AbsNm)
	}
	return nil
}

// inverse returns 1/l, with 0 and +Inf both meaning "none".
func inverse(l float64) float64 {
	if l == 0 || math.IsInf(l, 1) {
		return 0
	}
	return 1 / l
}

// NewStepper implements Model.
func (m TwoBeam) NewStepper() Stepper {
	return &twoBeamStepper{
		q:      complex(-math.Pi*inverse(m.XiGAbsNm), math.Pi/m.XiGNm),
		mu:     math.Pi * inverse(m.Xi0AbsNm),
		s:      m.SPerNm,
		invXi2: 1 / (m.XiGNm * m.XiGNm),
	}
}

type twoBeamStepper struct {
	q  complex128 // coupling iπ/ξ_g − π/ξ'_g
	mu float64    // mean absorption π/ξ'_0
	s  float64
	// invXi2 is 1/ξ_g².
	invXi2 float64
}

func (st *twoBeamStepper) Start(psi []complex128) { psi[0], psi[1] = 1, 0 }

// Crystal advances psi through a slab. With the chord of g·R taken out,
// the column equations of the slab are dχ/dz = M(z) χ with
//
//	M(z) = [ −μ                  q·e^{+2πiδ(z)} ]
//	       [ q·e^{−2πiδ(z)}   −μ + 2πi(s + β)   ]
//
// where β is the chord slope and δ the departure of g·R from the chord
// (zero at both ends of the slab). For δ ≡ 0 the slab is exp(h·M), exact.
// Otherwise the fourth-order commutator-free Magnus integrator
//
//	χ(h) = exp(h(α2 M1 + α1 M2)) · exp(h(α1 M1 + α2 M2)) · χ(0),
//	α1,2 = 1/4 ± √3/6, M1,2 = M(h(1/2 ∓ √3/6))
//
// is used (Blanes & Moan 2006, J. Comput. Appl. Math. 184, 13; Alvermann
// & Fehske 2011, J. Comput. Phys. 230, 5930).
func (st *twoBeamStepper) Crystal(psi []complex128, h, slope, d1, d2 float64) {
	kappa := 2 * math.Pi * (st.s + slope)
	if d1 == 0 && d2 == 0 {
		expm2Apply(psi, h, -st.mu, kappa, st.q, st.q)
		return
	}
	e1, e2 := phase(d1), phase(d2)
	up1 := st.q * (complex(cf4a1, 0)*e1 + complex(cf4a2, 0)*e2)
	lo1 := st.q * (complex(cf4a1, 0)/e1 + complex(cf4a2, 0)/e2)
	up2 := st.q * (complex(cf4a2, 0)*e1 + complex(cf4a1, 0)*e2)
	lo2 := st.q * (complex(cf4a2, 0)/e1 + complex(cf4a1, 0)/e2)
	// α1 + α2 = 1/2 for each factor, hence h/2 with the weights doubled.
	expm2Apply(psi, h/2, -st.mu, kappa, 2*up1, 2*lo1)
	expm2Apply(psi, h/2, -st.mu, kappa, 2*up2, 2*lo2)
}

// Weights of the fourth-order commutator-free Magnus integrator.
var (
	cf4a1 = 0.25 + math.Sqrt(3)/6
	cf4a2 = 0.25 - math.Sqrt(3)/6
	// gaussNodes are the two-point Gauss–Legendre nodes on [0, 1].
	gaussNodes = [2]float64{0.5 - math.Sqrt(3)/6, 0.5 + math.Sqrt(3)/6}
)

// expm2Apply replaces psi by exp(h·M)·psi for
//
//	M = [ m   b      ]
//	    [ c   m + iκ ]
//
// written as exp(h·tr/2)·(cosh(λh)·I + sinh(λh)/λ·(M − tr/2·I)) with
// λ² = ((M00 − M11)/2)² + b·c, which is even in λ so the branch of the
// square root does not matter.
func expm2Apply(psi []complex128, h, m, kappa float64, b, c complex128) {
	half := complex(m, kappa/2)   // tr/2
	delta := complex(0, -kappa/2) // (M00 − M11)/2
	lam := cmplx.Sqrt(delta*delta + b*c)
	x := lam * complex(h, 0)
	var ch, shOverLam complex128
	if cmplx.Abs(x) < 1e-3 {
		x2 := x * x
		ch = 1 + x2/2 + x2*x2/24
		shOverLam = complex(h, 0) * (1 + x2/6 + x2*x2/120)
	} else {
		ep := cmplx.Exp(x)
		em := 1 / ep
		ch = (ep + em) / 2
		shOverLam = (ep - em) / (2 * lam)
	}
	f := cmplx.Exp(half * complex(h, 0))
	p0, p1 := psi[0], psi[1]
	psi[0] = f * (ch*p0 + shOverLam*(delta*p0+b*p1))
	psi[1] = f * (ch*p1 + shOverLam*(c*p0-delta*p1))
}

// Beat is the Pendellösung frequency sqrt((s + β)² + 1/ξ_g²).
func (st *twoBeamStepper) Beat(slope float64) float64 {
	k := st.s + slope
	return math.Sqrt(k*k + st.invXi2)
}

func (st *twoBeamStepper) Vacuum(psi []complex128, h float64) {
	psi[1] *= phase(st.s * h)
}

func (st *twoBeamStepper) Shift(psi []complex128, dGamma float64) {
	psi[1] *= phase(dGamma)
}

func (st *twoBeamStepper) Intensities(psi []complex128, out []float64) {
	out[0] = sq(psi[0])
	out[1] = sq(psi[1])
}

// phase returns exp(2πi c).
func phase(c float64) complex128 {
	s, co := math.Sincos(2 * math.Pi * c)
	return complex(co, s)
}

func sq(c complex128) float64 { return real(c)*real(c) + imag(c)*imag(c) }
