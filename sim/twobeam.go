package sim

import (
	"fmt"
	"math"
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
	// pending is the crystal depth (nm) whose mean absorption e^{−μh}
	// has not yet been applied to the amplitudes (see Crystal).
	pending float64
}

func (st *twoBeamStepper) Start(psi []complex128) {
	psi[0], psi[1] = 1, 0
	st.pending = 0
}

// maxPending bounds μ·pending before the pending mean absorption is
// folded into the amplitudes, far from any overflow of the rest.
const maxPending = 50

// Crystal advances psi through a slab. With the chord of g·R taken out,
// the column equations of the slab are dχ/dz = M(z) χ with
//
//	M(z) = [ −μ                  q·e^{+2πiδ(z)} ]
//	       [ q·e^{−2πiδ(z)}   −μ + 2πi(s + β)   ]
//
// where β is the chord slope and δ the departure of g·R from the chord
// (zero at both ends of the slab). For δ ≡ 0 the slab is exp(h·M), exact.
// Otherwise the classical fourth-order Magnus integrator with the two
// Gauss–Legendre nodes,
//
//	χ(h) = exp(Ω) χ(0),  Ω = h/2 (M1 + M2) + (√3 h²/12) [M2, M1],
//	M1,2 = M(h(1/2 ∓ √3/6))
//
// (Iserles & Nørsett 1999, Phil. Trans. R. Soc. A 357, 983; Blanes, Casas,
// Oteo & Ros 2009, Phys. Rep. 470, 151, §5), one 2×2 exponential per
// slab. With κ = 2π(s + β), b_k = q e_k, c_k = q ē_k, e_k = e^{2πiδ_k},
//
//	[M2, M1] = [ D                −iκ(b1 − b2) ]
//	           [ iκ(c1 − c2)      −D           ],  D = b2 c1 − b1 c2,
//
// so Ω = h(−μ + iκ/2)·I + A with A traceless. The scalar part changes no
// intensity but by e^{−2μh}: its phase is dropped and its absorption is
// kept back (pending) and applied to the intensities once per column
// (Intensities), so the slab is exp(A) = cosh√w·I + (sinh√w/√w)·A,
// w = −det A, by coshSinhc.
func (st *twoBeamStepper) Crystal(psi []complex128, h, slope, d1, d2 float64) {
	kappa := 2 * math.Pi * (st.s + slope)
	if d1 == 0 && d2 == 0 {
		expm2Apply(psi, h, -st.mu, kappa, st.q, st.q)
		return
	}
	e1, e2 := expi(2*math.Pi*d1), expi(2*math.Pi*d2)
	ep, em := e1+e2, e1-e2
	hh := h / 2
	kk := magnusK * h * h * kappa // (√3h²/12)·κ
	// B = q(h/2·(e1+e2) − i k κ (e1−e2)), C the same with ē and +i.
	B := st.q * complex(hh*real(ep)+kk*imag(em), hh*imag(ep)-kk*real(em))
	C := st.q * complex(hh*real(ep)+kk*imag(em), -hh*imag(ep)+kk*real(em))
	// D = q²(e2ē1 − e1ē2) = 2i q² Im(e2ē1).
	im := imag(e2)*real(e1) - real(e2)*imag(e1)
	q2 := st.q * st.q
	dk := 2 * magnusK * h * h * im // (√3h²/12)·D = i·dk·q²
	a := complex(-dk*imag(q2), dk*real(q2)-kappa*hh)
	ch, sh := coshSinhc(a*a + B*C)
	p0, p1 := psi[0], psi[1]
	psi[0] = ch*p0 + sh*(a*p0+B*p1)
	psi[1] = ch*p1 + sh*(C*p0-a*p1)
	if st.pending += h; st.mu*st.pending > maxPending {
		f := complex(math.Exp(-st.mu*st.pending), 0)
		psi[0], psi[1] = psi[0]*f, psi[1]*f
		st.pending = 0
	}
}

// magnusK is √3/12, the weight of the commutator in Ω.
var magnusK = math.Sqrt(3) / 12

// seriesMaxW is the largest |w| for which coshSinhc sums power series.
// The terms omitted after w⁹ sum to at most
// Σ_{n≥10} 1.5ⁿ/(2n)! < 1.5¹⁰/20!·1.01 < 2.5e-17 for cosh√w and less for
// sinh√w/√w, below the rounding of the sum (TestCoshSinhc).
const seriesMaxW = 1.5

// coshSeries and sinhcSeries are 1/(2n)! and 1/(2n+1)!, n = 0…9.
var coshSeries, sinhcSeries = func() (c, s [10]float64) {
	f := 1.0
	for n := 0; n < 10; n++ {
		if n > 0 {
			f /= float64(2*n-1) * float64(2*n)
		}
		c[n] = f
		s[n] = f / float64(2*n+1)
	}
	return
}()

// coshSinhc returns cosh√w and sinh(√w)/√w, entire functions of w (the
// branch of the root does not matter). For |w| ≤ seriesMaxW they are
// summed as power series, with no square root, exponential or sincos:
// each as E(w²) + w·O(w²) with its even and odd terms summed by Horner's
// rule in w² (Estrin's scheme, four independent chains, half the length
// of one Horner chain in w); otherwise with λ = √w = x + iy,
//
//	cosh λ = cosh x cos y + i sinh x sin y,
//	sinh λ = sinh x cos y + i cosh x sin y,  1/λ = λ̄/|w|.
func coshSinhc(w complex128) (ch, sh complex128) {
	wr, wi := real(w), imag(w)
	if w2 := wr*wr + wi*wi; w2 <= seriesMaxW*seriesMaxW {
		// Terms to w⁹ (|w| ≤ 1.5) or to w⁷ (|w| ≤ 0.5: the omitted terms
		// sum to less than 0.5⁸/16! < 2e-16).
		top := 9
		if w2 <= 0.5*0.5 {
			top = 7
		}
		vr, vi := wr*wr-wi*wi, 2*wr*wi // w²
		cer, cei := coshSeries[top-1], 0.0
		cor, coi := coshSeries[top], 0.0
		ser, sei := sinhcSeries[top-1], 0.0
		sor, soi := sinhcSeries[top], 0.0
		for n := top - 3; n >= 0; n -= 2 {
			cer, cei = cer*vr-cei*vi+coshSeries[n], cer*vi+cei*vr
			cor, coi = cor*vr-coi*vi+coshSeries[n+1], cor*vi+coi*vr
			ser, sei = ser*vr-sei*vi+sinhcSeries[n], ser*vi+sei*vr
			sor, soi = sor*vr-soi*vi+sinhcSeries[n+1], sor*vi+soi*vr
		}
		ch = complex(cer+cor*wr-coi*wi, cei+cor*wi+coi*wr)
		sh = complex(ser+sor*wr-soi*wi, sei+sor*wi+soi*wr)
		return ch, sh
	}
	lam, abs := csqrt(w)
	x, y := real(lam), imag(lam)
	ex := math.Exp(x)
	ix := 1 / ex
	chx, shx := (ex+ix)/2, (ex-ix)/2
	sn, cs := math.Sincos(y)
	ch = complex(chx*cs, shx*sn)
	s := complex(shx*cs, chx*sn)
	return ch, s * complex(x/abs, -y/abs)
}

// Weights of the fourth-order commutator-free Magnus integrator of the
// systematic row (Blanes & Moan 2006, J. Comput. Appl. Math. 184, 13).
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
// λ² = ((M00 − M11)/2)² + b·c = bc − κ²/4, which is even in λ so the branch
// of the square root does not matter. With x = λh,
//
//	e^{h·tr/2}·cosh x = (E₊ + E₋)/2,  e^{h·tr/2}·sinh x = (E₊ − E₋)/2,
//	E± = e^{mh ± Re x} · e^{i(κh/2 ± Im x)},
//
// two real exponentials and two sincos; 1/λ is conj(λ)/|λ|².
func expm2Apply(psi []complex128, h, m, kappa float64, b, c complex128) {
	l2 := b*c + complex(-kappa*kappa/4, 0)
	lam, abs := csqrt(l2)
	xr, xi := real(lam)*h, imag(lam)*h
	dk := complex(0, -kappa/2) // (M00 − M11)/2
	mh, kh := m*h, kappa*h/2
	var fch, fsh complex128 // e^{h tr/2}·cosh x and e^{h tr/2}·sinh(x)/λ
	if x2 := xr*xr + xi*xi; x2 < 1e-6 {
		// Series: cosh x = 1 + x²/2 + x⁴/24, sinh(x)/λ = h(1 + x²/6 + x⁴/120).
		xx := l2 * complex(h*h, 0)
		sn, cs := math.Sincos(kh)
		f := complex(math.Exp(mh)*cs, math.Exp(mh)*sn)
		fch = f * (1 + xx/2 + xx*xx/24)
		fsh = f * complex(h, 0) * (1 + xx/6 + xx*xx/120)
	} else {
		ep, em := math.Exp(mh+xr), math.Exp(mh-xr)
		sp, cp := math.Sincos(kh + xi)
		sm, cm := math.Sincos(kh - xi)
		Ep := complex(ep*cp, ep*sp)
		Em := complex(em*cm, em*sm)
		fch = (Ep + Em) * 0.5
		// 1/λ = conj(λ)/|λ|², |λ|² = |λ²|.
		w := 0.5 / abs
		fsh = (Ep - Em) * complex(real(lam)*w, -imag(lam)*w)
	}
	p0, p1 := psi[0], psi[1]
	psi[0] = fch*p0 + fsh*(dk*p0+b*p1)
	psi[1] = fch*p1 + fsh*(c*p0-dk*p1)
}

// csqrt returns the principal square root of z and |z|, without the
// special cases (infinities, signed zeros) of cmplx.Sqrt that a finite 2×2
// step never meets.
func csqrt(z complex128) (complex128, float64) {
	a, b := real(z), imag(z)
	r := math.Sqrt(a*a + b*b)
	if a >= 0 {
		t := math.Sqrt((r + a) / 2)
		if t == 0 {
			return 0, r
		}
		return complex(t, b/(2*t)), r
	}
	t := math.Sqrt((r - a) / 2)
	return complex(math.Abs(b)/(2*t), math.Copysign(t, b)), r
}

// beat2 is the square of Beat, without its square root.
func (st *twoBeamStepper) beat2(slope float64) float64 {
	k := st.s + slope
	return k*k + st.invXi2
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

// Intensities applies the pending mean absorption e^{−2μ·depth}.
func (st *twoBeamStepper) Intensities(psi []complex128, out []float64) {
	f := 1.0
	if st.pending > 0 {
		f = math.Exp(-2 * st.mu * st.pending)
	}
	out[0] = sq(psi[0]) * f
	out[1] = sq(psi[1]) * f
}

// expi returns exp(i x); for |x| < 0.01 (the departures of accepted
// slabs) by the series of cos and sin to x⁶ and x⁷, whose first omitted
// terms are below 3e-21.
func expi(x float64) complex128 {
	if math.Abs(x) < 0.01 {
		// Horner in x² with the reciprocal factorials as constants: no
		// division.
		x2 := x * x
		c := 1 + x2*(-1.0/2+x2*(1.0/24+x2*(-1.0/720)))
		s := x * (1 + x2*(-1.0/6+x2*(1.0/120+x2*(-1.0/5040))))
		return complex(c, s)
	}
	s, c := math.Sincos(x)
	return complex(c, s)
}

// phase returns exp(2πi c).
func phase(c float64) complex128 {
	s, co := math.Sincos(2 * math.Pi * c)
	return complex(co, s)
}

func sq(c complex128) float64 { return real(c)*real(c) + imag(c)*imag(c) }
